// One in-memory PGlite per test file (starting one costs seconds), with the real migrations.
import { openDatabase, type DatabaseHandle } from '@/db/client';

export async function openTestDatabase(): Promise<DatabaseHandle> {
  return openDatabase({ dataDir: null });
}
