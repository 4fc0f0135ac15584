// A process that only runs background analyses (no HTTP): for teams that put the heavy work on
// machines of its own. It needs the shared PostgreSQL server (DATABASE_URL); every web process
// runs a worker too unless started with JOB_WORKER=false.
//   DATABASE_URL=postgres://… npm run worker
import { openDatabase } from '../db/client';
import { createAppContext } from './app';
import { analysisJobRunner } from './services/analyses';
import { startJobWorker, stopJobWorkers } from './services/jobs';

async function main() {
  const url = process.env.DATABASE_URL;
  if (!url) {
    console.error('[ringwell] DATABASE_URL: set it to the PostgreSQL server the web processes use (postgres://…).');
    process.exit(2);
  }
  const log = (message: string, error?: unknown) => console.error(`[ringwell] ${message}`, error ?? '');
  const database = await openDatabase({ url });
  const ctx = createAppContext({ database, log });
  const worker = startJobWorker({
    database,
    runner: analysisJobRunner(ctx),
    log,
    pollMs: Number(process.env.JOB_POLL_MS ?? 500),
    staleAfterS: Number(process.env.JOB_STALE_AFTER_S ?? 60),
    onJobEnded: (job) => console.log(`[ringwell] worker ${worker.name} ended job ${job.id} ${job.state}`),
  });
  console.log(`[ringwell] worker ${worker.name} waiting for analyses on ${database.serverUrl}`);
  const stop = async () => {
    await stopJobWorkers(database);
    await database.close();
    process.exit(0);
  };
  process.once('SIGINT', stop);
  process.once('SIGTERM', stop);
}

main().catch((error) => {
  console.error('[ringwell] The worker could not start:', error instanceof Error ? error.message : error);
  process.exit(1);
});
