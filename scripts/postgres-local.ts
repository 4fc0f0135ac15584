// Runs a command with a throwaway PostgreSQL server on loopback, its URL in TEST_DATABASE_URL:
//   tsx scripts/postgres-local.ts -- npx jest tests/server --selectProjects node
// The server and its data are removed afterwards; the command's exit code is passed on.
import { spawnSync } from 'node:child_process';
import { startPostgres } from '../tests/helpers/postgresServer';

async function main() {
  const separator = process.argv.indexOf('--');
  const command = separator >= 0 ? process.argv.slice(separator + 1) : [];
  if (command.length === 0) {
    console.error('usage: tsx scripts/postgres-local.ts -- <command> [args…]');
    process.exit(2);
  }
  const server = await startPostgres();
  console.log(`[ringwell] PostgreSQL server on ${server.url}`);
  let status = 1;
  try {
    const result = spawnSync(command[0], command.slice(1), {
      stdio: 'inherit',
      env: { ...process.env, TEST_DATABASE_URL: server.url },
    });
    status = result.status ?? 1;
  } finally {
    server.stop();
  }
  process.exit(status);
}

main().catch((error) => {
  console.error('[ringwell]', error instanceof Error ? error.message : error);
  process.exit(1);
});
