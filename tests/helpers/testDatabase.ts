// A fresh database with the real migrations for one test file. By default an in-memory PGlite
// (starting one costs seconds). With TEST_DATABASE_URL set (the URL of a PostgreSQL server's
// maintenance database), a new database is created on that server for the file and dropped when it
// closes: that is how CI runs the API suites against a real PostgreSQL server as well.
import { randomBytes } from 'node:crypto';
import pg from 'pg';
import { openDatabase, type DatabaseHandle } from '@/db/client';

export function testServerUrl(): string | null {
  return process.env.TEST_DATABASE_URL || null;
}

export async function openTestDatabase(): Promise<DatabaseHandle> {
  const serverUrl = testServerUrl();
  if (!serverUrl) return openDatabase({ dataDir: null });
  const name = `ringwell_test_${randomBytes(6).toString('hex')}`;
  await adminQuery(serverUrl, `create database ${name}`);
  const url = new URL(serverUrl);
  url.pathname = `/${name}`;
  const handle = await openDatabase({ url: url.toString() });
  return {
    ...handle,
    close: async () => {
      await handle.close();
      await adminQuery(serverUrl, `drop database if exists ${name} with (force)`);
    },
  };
}

async function adminQuery(serverUrl: string, sql: string): Promise<void> {
  const client = new pg.Client({ connectionString: serverUrl });
  await client.connect();
  try {
    await client.query(sql);
  } finally {
    await client.end();
  }
}
