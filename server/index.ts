// Ringwell's server process: opens the database under DATA_DIR (migrating it), seeds the demo team
// on first start, starts the local mail capture when no SMTP_URL is set, and serves the API and the
// exported web app.
import path from 'node:path';
import { openDatabase } from '../db/client';
import { demoAccounts, DEMO_TEAM, seedDemo } from '../db/seed';
import { createApp, createAppContext } from './app';
import { hashPassword } from './auth/passwords';
import { loadOrCreateJwtSecret } from './auth/secret';
import { readConfig } from './config';
import { startCaptureServer } from './mail/captureServer';
import { createMailer } from './mail/mailer';
import { sweepStaleUploads } from './services/captures';
import { seedDemoWorkspace } from './services/demoWorkspace';
import { stopJobWorkers } from './services/jobs';
import { closeEnginePool } from './services/offload';

export async function startServer() {
  const config = readConfig();
  const log = (message: string, error?: unknown) => console.error(`[ringwell] ${message}`, error ?? '');
  const database = await openDatabase(config.databaseUrl ? { url: config.databaseUrl } : { dataDir: config.dataDir });
  if (database.kind === 'server' && !config.jwtSecret)
    console.warn(
      '[ringwell] DATABASE_URL is set but JWT_SECRET is not: this instance signs sessions with its own key, so a sign-in is not valid on other instances. Give every instance the same JWT_SECRET.',
    );
  const capture = config.smtpUrl ? null : await startCaptureServer({ db: database.db, port: config.smtpPort, log });
  const mailer = createMailer({ db: database.db, transport: config.smtpUrl ?? capture!.url, from: config.mailFrom, log });
  if (capture)
    console.log(
      `[ringwell] No SMTP_URL: mail is captured by the local SMTP server on port ${capture.port} (see the admin outbox).`,
    );
  const appOptions = {
    database,
    mailer,
    webDir: config.webDir,
    dataDir: config.dataDir,
    publicUrl: config.publicUrl,
    jwtSecret: loadOrCreateJwtSecret(config.dataDir, config.jwtSecret),
    log,
  };
  if (config.seedDemo) {
    // Several instances may start at once against one PostgreSQL server: one seeds, the others wait.
    await database.exclusive('seed-demo', async () => {
      const seeded = await seedDemo(database.db, hashPassword);
      if (seeded.seeded && seeded.teamId) {
        await seedDemoWorkspace(createAppContext(appOptions), seeded.teamId);
        console.log(`[ringwell] Seeded the demo team "${DEMO_TEAM}". Sign in with:`);
        for (const a of demoAccounts) console.log(`[ringwell]   ${a.role.padEnd(9)} ${a.email.padEnd(26)} ${a.password}`);
      }
    });
  }
  const swept = await sweepStaleUploads(path.join(config.dataDir, 'uploads'));
  if (swept.length) console.log(`[ringwell] Removed ${swept.length} unfinished upload file(s) left by an earlier crash.`);
  const app = createApp(appOptions);
  const server = app.listen(config.port, config.host, () => {
    const address = server.address();
    const port = typeof address === 'object' && address ? address.port : config.port;
    console.log(
      `[ringwell] Serving on http://localhost:${port} (data ${database.serverUrl ? `on ${database.serverUrl}` : `in ${config.dataDir}`})`,
    );
  });
  const stop = async () => {
    server.close();
    await stopJobWorkers(database);
    await closeEnginePool();
    await mailer.flush();
    mailer.close();
    await capture?.close();
    await database.close();
    process.exit(0);
  };
  process.once('SIGINT', stop);
  process.once('SIGTERM', stop);
  return { server, database, capture, mailer };
}

if (require.main === module) {
  startServer().catch((error) => {
    console.error('[ringwell] Could not start:', error instanceof Error ? error.message : error);
    process.exit(1);
  });
}
