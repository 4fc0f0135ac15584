// Ringwell's server process: opens the database under DATA_DIR (migrating it), seeds the demo team
// on first start, and serves the API and the exported web app.
import { openDatabase } from '../db/client';
import { demoAccounts, DEMO_TEAM, seedDemo } from '../db/seed';
import { createApp } from './app';
import { hashPassword } from './auth/passwords';
import { readConfig } from './config';

export async function startServer() {
  const config = readConfig();
  const database = await openDatabase({ dataDir: config.dataDir });
  if (config.seedDemo) {
    const seeded = await seedDemo(database.db, hashPassword);
    if (seeded.seeded) {
      console.log(`[ringwell] Seeded the demo team "${DEMO_TEAM}". Sign in with:`);
      for (const a of demoAccounts) console.log(`[ringwell]   ${a.role.padEnd(9)} ${a.email.padEnd(26)} ${a.password}`);
    }
  }
  const app = createApp({ database, webDir: config.webDir });
  const server = app.listen(config.port, config.host, () => {
    const address = server.address();
    const port = typeof address === 'object' && address ? address.port : config.port;
    console.log(`[ringwell] Serving on http://localhost:${port} (data in ${config.dataDir})`);
  });
  const stop = async () => {
    server.close();
    await database.close();
    process.exit(0);
  };
  process.once('SIGINT', stop);
  process.once('SIGTERM', stop);
  return { server, database };
}

if (require.main === module) {
  startServer().catch((error) => {
    console.error('[ringwell] Could not start:', error instanceof Error ? error.message : error);
    process.exit(1);
  });
}
