// Environment variables are read once, here, at boot.
import path from 'node:path';

export interface ServerConfig {
  port: number;
  host: string;
  dataDir: string;
  /** A PostgreSQL server to use instead of the embedded database under dataDir, or null. */
  databaseUrl: string | null;
  /** Directory holding the exported web build, or null to serve the API only. */
  webDir: string | null;
  jwtSecret: string | null;
  smtpUrl: string | null;
  /** Port of the local capture SMTP server when SMTP_URL is unset; 0 = any free port. */
  smtpPort: number;
  mailFrom: string;
  publicUrl: string;
  seedDemo: boolean;
  nodeEnv: string;
}

export function readConfig(env: NodeJS.ProcessEnv = process.env): ServerConfig {
  const port = readPort(env.PORT, 8080, 'PORT');
  const root = path.resolve(__dirname, '..');
  return {
    port,
    host: env.HOST ?? '0.0.0.0',
    dataDir: path.resolve(env.DATA_DIR ?? path.join(root, 'data')),
    databaseUrl: env.DATABASE_URL || null,
    webDir: env.WEB_DIR === '' ? null : path.resolve(env.WEB_DIR ?? path.join(root, 'dist')),
    jwtSecret: env.JWT_SECRET || null,
    smtpUrl: env.SMTP_URL || null,
    smtpPort: readPort(env.SMTP_PORT, 0, 'SMTP_PORT'),
    mailFrom: env.MAIL_FROM ?? 'Ringwell <ringwell@northfold.example>',
    publicUrl: env.PUBLIC_URL ?? `http://localhost:${port}`,
    seedDemo: env.SEED_DEMO !== 'false',
    nodeEnv: env.NODE_ENV ?? 'development',
  };
}

function readPort(text: string | undefined, fallback: number, name: string): number {
  const port = Number(text ?? fallback);
  if (!Number.isInteger(port) || port < 0 || port > 65535) {
    throw new Error(`${name} must be a whole number from 0 to 65535, got "${text}".`);
  }
  return port;
}
