// The JWT signing secret: JWT_SECRET when set, otherwise a random secret generated on first start and
// kept in <DATA_DIR>/jwt-secret (mode 0600) so that sessions survive a restart.
import fs from 'node:fs';
import path from 'node:path';
import { randomBytes } from 'node:crypto';

export function loadOrCreateJwtSecret(dataDir: string, fromEnv: string | null): string {
  if (fromEnv) return fromEnv;
  const file = path.join(dataDir, 'jwt-secret');
  if (fs.existsSync(file)) {
    const stored = fs.readFileSync(file, 'utf8').trim();
    if (stored.length >= 32) return stored;
  }
  fs.mkdirSync(dataDir, { recursive: true });
  const secret = randomBytes(48).toString('base64url');
  fs.writeFileSync(file, `${secret}\n`, { mode: 0o600 });
  fs.chmodSync(file, 0o600);
  return secret;
}

/** A fresh secret for an in-memory database (tests): nothing outlives the process anyway. */
export function randomJwtSecret(): string {
  return randomBytes(48).toString('base64url');
}
