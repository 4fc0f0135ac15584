// Opens Ringwell's database: PGlite (PostgreSQL compiled to WebAssembly) on disk under the data
// directory, or in memory for tests, with the migrations in migrations/ applied on every open.
import path from 'node:path';
import fs from 'node:fs';
import { PGlite } from '@electric-sql/pglite';
import { drizzle, type PgliteDatabase } from 'drizzle-orm/pglite';
import { migrate } from 'drizzle-orm/pglite/migrator';
import * as schema from './schema';

export type Database = PgliteDatabase<typeof schema>;

export interface DatabaseHandle {
  db: Database;
  pg: PGlite;
  /** Where the data lives, or null for an in-memory database. */
  dataDir: string | null;
  close(): Promise<void>;
}

export const migrationsFolder = path.resolve(__dirname, '..', 'migrations');

/** Opens (and migrates) the database. `dataDir: null` gives a fresh in-memory database. */
export async function openDatabase(options: { dataDir: string | null }): Promise<DatabaseHandle> {
  let pg: PGlite;
  if (options.dataDir) {
    const pgDir = path.join(options.dataDir, 'pg');
    fs.mkdirSync(pgDir, { recursive: true });
    pg = new PGlite(pgDir);
  } else {
    pg = new PGlite();
  }
  await pg.waitReady;
  const db = drizzle(pg, { schema });
  await migrate(db, { migrationsFolder });
  return {
    db,
    pg,
    dataDir: options.dataDir,
    close: async () => {
      if (!pg.closed) await pg.close();
    },
  };
}

/** A cheap round trip that says whether the database answers. */
export async function pingDatabase(handle: DatabaseHandle): Promise<boolean> {
  try {
    const result = await handle.pg.query<{ ok: number }>('select 1 as ok');
    return result.rows[0]?.ok === 1;
  } catch {
    return false;
  }
}
