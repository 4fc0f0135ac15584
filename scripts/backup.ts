// `npm run backup -- --out FILE [--data-dir DIR]`: writes a backup archive of an embedded data
// directory (DATA_DIR, or ./data by default, as the server uses): the data of every table as
// pg_dump-style SQL, the bench capture files, and a manifest with counts and hashes (db/backup.ts).
// The server must be stopped first: PGlite is one process per directory, and a running server
// holds the directory's lock, so the backup refuses rather than open it a second time.
import path from 'node:path';
import { parseArgs } from 'node:util';
import { BackupError, createBackup } from '../db/backup';
import { DataDirInUseError } from '../db/dataDirLock';
import { readConfig } from '../server/config';

const USAGE = 'Usage: npm run backup -- --out FILE [--data-dir DIR]';

export async function main(argv: string[], env: Record<string, string | undefined> = process.env): Promise<number> {
  let values: { out?: string; 'data-dir'?: string; help?: boolean };
  try {
    ({ values } = parseArgs({
      args: argv,
      options: { out: { type: 'string' }, 'data-dir': { type: 'string' }, help: { type: 'boolean', short: 'h' } },
      strict: true,
      allowPositionals: false,
    }));
  } catch (error) {
    console.error(`${(error as Error).message}\n${USAGE}`);
    return 2;
  }
  if (values.help) {
    console.log(USAGE);
    return 0;
  }
  if (!values.out) {
    console.error(`--out: say where to write the backup archive (e.g. --out ringwell-backup.tar.gz).\n${USAGE}`);
    return 2;
  }
  if (env.DATABASE_URL && !values['data-dir']) {
    console.error(
      'DATABASE_URL is set: the database is on a PostgreSQL server, not in a data directory. Back it up with ' +
        'pg_dump (e.g. pg_dump --format=custom --file=ringwell.dump "$DATABASE_URL") and copy the uploads ' +
        'directory (<DATA_DIR>/uploads) beside it. To back up an embedded data directory anyway, give --data-dir.',
    );
    return 2;
  }
  const dataDir = values['data-dir'] ? path.resolve(values['data-dir']) : readConfig(env as NodeJS.ProcessEnv).dataDir;
  try {
    const summary = await createBackup({ dataDir, out: values.out });
    const rows = Object.values(summary.tables).reduce((a, b) => a + b, 0);
    console.log(
      `Backed up ${dataDir} to ${summary.out} (${summary.bytes} bytes): ${Object.keys(summary.tables).length} tables, ` +
        `${rows} rows, ${summary.files} upload files.`,
    );
    for (const [table, n] of Object.entries(summary.tables)) console.log(`  ${table.padEnd(18)} ${n}`);
    return 0;
  } catch (error) {
    if (error instanceof DataDirInUseError) {
      console.error(`${error.message}\nStop the server (Ctrl-C or SIGTERM), run the backup, then start it again.`);
      return 1;
    }
    if (error instanceof BackupError) {
      console.error(error.message);
      return 1;
    }
    throw error;
  }
}

if (require.main === module) {
  main(process.argv.slice(2)).then(
    (code) => process.exit(code),
    (error) => {
      console.error('Backup failed:', error instanceof Error ? error.message : error);
      process.exit(1);
    },
  );
}
