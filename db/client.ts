// Opens Ringwell's database with the migrations in migrations/ applied on every open. Two kinds:
// - embedded (the default): PGlite, PostgreSQL compiled to WebAssembly, on disk under the data
//   directory, or in memory for tests; one process owns it;
// - server: a PostgreSQL server reached through `DATABASE_URL` (node-postgres pool), so that
//   several Ringwell processes on several machines can share one database.
// Both run the same Drizzle schema and the same migrations.
import path from 'node:path';
import fs from 'node:fs';
import { PGlite } from '@electric-sql/pglite';
import { drizzle as drizzlePglite } from 'drizzle-orm/pglite';
import { migrate as migratePglite } from 'drizzle-orm/pglite/migrator';
import { drizzle as drizzleNodePg } from 'drizzle-orm/node-postgres';
import { migrate as migrateNodePg } from 'drizzle-orm/node-postgres/migrator';
import type { PgDatabase, PgQueryResultHKT } from 'drizzle-orm/pg-core';
import pg from 'pg';
import * as schema from './schema';
import { lockDataDir } from './dataDirLock';

export type Database = PgDatabase<PgQueryResultHKT, typeof schema>;

/** Plain SQL on the same database, for the few places that need it (health, tests, the queue). */
export interface RawSql {
  query<T = Record<string, unknown>>(sql: string, params?: unknown[]): Promise<{ rows: T[]; affectedRows?: number }>;
  /** Runs one or more statements without parameters. */
  exec(sql: string): Promise<unknown>;
}

export type DatabaseKind = 'embedded' | 'server';

export interface DatabaseHandle {
  db: Database;
  pg: RawSql;
  kind: DatabaseKind;
  /** Where the embedded data lives, or null (in memory, or on a server). */
  dataDir: string | null;
  /** The server URL with its password masked, or null for the embedded database. */
  serverUrl: string | null;
  /** Runs `work` while holding a database-wide lock named `name` (other processes wait). */
  exclusive<T>(name: string, work: () => Promise<T>): Promise<T>;
  /** True once close() has begun: background loops stop quietly instead of failing. */
  isClosed(): boolean;
  close(): Promise<void>;
}

export const migrationsFolder = path.resolve(__dirname, '..', 'migrations');

export type OpenOptions = { dataDir: string | null } | { url: string; poolSize?: number };

/**
 * Opens (and migrates) the database. `{ dataDir: null }` gives a fresh in-memory PGlite,
 * `{ dataDir }` a PGlite on disk, `{ url }` a PostgreSQL server.
 */
export async function openDatabase(options: OpenOptions): Promise<DatabaseHandle> {
  if ('url' in options) return openServer(options.url, options.poolSize);
  let client: PGlite;
  // PGlite has no lock of its own: refuse a directory another live process holds (db/dataDirLock.ts).
  const lock = options.dataDir ? lockDataDir(options.dataDir) : null;
  if (options.dataDir) {
    const pgDir = path.join(options.dataDir, 'pg');
    fs.mkdirSync(pgDir, { recursive: true });
    client = new PGlite(pgDir);
  } else {
    client = new PGlite();
  }
  let closing = false;
  const db = drizzlePglite(client, { schema });
  try {
    await client.waitReady;
    await migratePglite(db, { migrationsFolder });
  } catch (error) {
    if (!client.closed) await client.close().catch(() => undefined);
    lock?.release();
    throw error;
  }
  return {
    db: db as unknown as Database,
    pg: client as unknown as RawSql,
    kind: 'embedded',
    dataDir: options.dataDir,
    serverUrl: null,
    // One process owns an embedded database; a queue in this process is enough.
    exclusive: (() => {
      let tail: Promise<unknown> = Promise.resolve();
      return <T>(_name: string, work: () => Promise<T>) => {
        const run = tail.then(work, work);
        tail = run.catch(() => undefined);
        return run;
      };
    })(),
    isClosed: () => client.closed || closing,
    close: async () => {
      closing = true;
      if (!client.closed) await client.close();
      lock?.release();
    },
  };
}

async function openServer(url: string, poolSize = 10): Promise<DatabaseHandle> {
  const pool = new pg.Pool({ connectionString: url, max: poolSize });
  // An idle connection dropped by the server must not crash the process; the pool reconnects.
  pool.on('error', () => undefined);
  try {
    await pool.query('select 1');
  } catch (error) {
    await pool.end().catch(() => undefined);
    throw new Error(`DATABASE_URL: cannot reach the PostgreSQL server at ${maskUrl(url)}: ${(error as Error).message}`);
  }
  const db = drizzleNodePg(pool, { schema });
  const exclusive = async <T>(name: string, work: () => Promise<T>): Promise<T> => {
    const lock = await pool.connect();
    try {
      await lock.query('select pg_advisory_lock(hashtext($1))', [`ringwell:${name}`]);
      return await work();
    } finally {
      await lock.query('select pg_advisory_unlock(hashtext($1))', [`ringwell:${name}`]).catch(() => undefined);
      lock.release();
    }
  };
  // Several processes may start at once against one server: one migrates, the others wait.
  await exclusive('migrate', () => migrateNodePg(db, { migrationsFolder }));
  let closed = false;
  const raw: RawSql = {
    query: async <T>(sql: string, params?: unknown[]) => {
      const result = await pool.query(sql, params as unknown[] | undefined);
      return { rows: result.rows as T[], affectedRows: result.rowCount ?? undefined };
    },
    exec: (sql: string) => pool.query(sql),
  };
  return {
    db: db as unknown as Database,
    pg: raw,
    kind: 'server',
    dataDir: null,
    serverUrl: maskUrl(url),
    exclusive,
    isClosed: () => closed,
    close: async () => {
      if (closed) return;
      closed = true;
      await pool.end();
    },
  };
}

/** The URL with any password replaced, for logs and error messages. */
export function maskUrl(url: string): string {
  try {
    const parsed = new URL(url);
    if (parsed.password) parsed.password = '***';
    return parsed.toString();
  } catch {
    return '(unreadable URL)';
  }
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
