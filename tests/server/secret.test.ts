import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { loadOrCreateJwtSecret } from '@/server/auth/secret';
import { createTokenService } from '@/server/auth/tokens';

describe('the JWT secret', () => {
  let dir: string;
  beforeEach(() => {
    dir = fs.mkdtempSync(path.join(os.tmpdir(), 'ringwell-secret-'));
  });
  afterEach(() => fs.rmSync(dir, { recursive: true, force: true }));

  it('is generated once into <DATA_DIR>/jwt-secret, readable by the owner only, and reused after a restart', () => {
    const first = loadOrCreateJwtSecret(dir, null);
    const file = path.join(dir, 'jwt-secret');
    expect(fs.statSync(file).mode & 0o777).toBe(0o600);
    expect(first.length).toBeGreaterThanOrEqual(32);
    expect(loadOrCreateJwtSecret(dir, null)).toBe(first);
  });

  it('comes from JWT_SECRET when that is set, and writes nothing', () => {
    expect(loadOrCreateJwtSecret(dir, 'x'.repeat(40))).toBe('x'.repeat(40));
    expect(fs.existsSync(path.join(dir, 'jwt-secret'))).toBe(false);
  });

  it('must be at least 32 bytes for HS256', () => {
    expect(() => createTokenService('too short', 900)).toThrow(/at least 32 bytes/);
  });

  it('signs tokens that verify with the same key only', async () => {
    const a = createTokenService('a'.repeat(32), 900);
    const b = createTokenService('b'.repeat(32), 900);
    const { token } = await a.issue({
      userId: '00000000-0000-4000-8000-000000000001',
      familyId: '00000000-0000-4000-8000-000000000002',
    });
    await expect(a.verify(token)).resolves.toEqual({
      userId: '00000000-0000-4000-8000-000000000001',
      familyId: '00000000-0000-4000-8000-000000000002',
    });
    await expect(b.verify(token)).resolves.toBeNull();
  });
});
