// `npm run restore -- --in FILE --data-dir DIR`: loads a backup archive (npm run backup) into an
// empty data directory, then verifies it: row counts per table against the manifest, every
// revision's SHA-256, every upload file's hash (db/backup.ts). A failed restore leaves the
// directory empty.
import path from 'node:path';
import { parseArgs } from 'node:util';
import { BackupError, restoreBackup } from '../db/backup';
import { DataDirInUseError } from '../db/dataDirLock';
import { readConfig } from '../server/config';

const USAGE = 'Usage: npm run restore -- --in FILE --data-dir DIR';

export async function main(argv: string[], env: Record<string, string | undefined> = process.env): Promise<number> {
  let values: { in?: string; 'data-dir'?: string; help?: boolean };
  try {
    ({ values } = parseArgs({
      args: argv,
      options: { in: { type: 'string' }, 'data-dir': { type: 'string' }, help: { type: 'boolean', short: 'h' } },
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
  if (!values.in) {
    console.error(`--in: name the backup archive to restore.\n${USAGE}`);
    return 2;
  }
  if (env.DATABASE_URL && !values['data-dir']) {
    console.error(
      'DATABASE_URL is set: restore a PostgreSQL server with pg_restore (or psql for a plain dump). To restore ' +
        'an embedded data directory, give --data-dir.',
    );
    return 2;
  }
  const dataDir = values['data-dir'] ? path.resolve(values['data-dir']) : readConfig(env as NodeJS.ProcessEnv).dataDir;
  try {
    const summary = await restoreBackup({ archive: values.in, dataDir });
    const rows = Object.values(summary.tables).reduce((a, b) => a + b, 0);
    console.log(
      `Restored ${values.in} into ${summary.dataDir}: ${Object.keys(summary.tables).length} tables, ${rows} rows ` +
        `(counts match the manifest), ${summary.revisionsVerified} revisions verified against their SHA-256, ` +
        `${summary.filesVerified} upload files verified` +
        (summary.migrationsAddedAfter ? `, ${summary.migrationsAddedAfter} newer migrations applied.` : '.'),
    );
    console.log(
      'The JWT secret (<DATA_DIR>/jwt-secret) is not in backups: unless JWT_SECRET is set, the server makes a new ' +
        'one on start, and the app renews its short-lived access tokens from the restored sessions.',
    );
    return 0;
  } catch (error) {
    if (error instanceof BackupError || error instanceof DataDirInUseError) {
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
      console.error('Restore failed:', error instanceof Error ? error.message : error);
      process.exit(1);
    },
  );
}
