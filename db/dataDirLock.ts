// One process at a time on an embedded data directory. PGlite takes no lock of its own: a second
// process opening the same directory starts a second PostgreSQL on the same files without any
// error (checked with PGlite 0.5.17), and both then write pages the other does not know about.
// The lock is a file, <dataDir>/db.lock, created exclusively and holding the owner's pid; a lock
// whose process is gone (a crash, a SIGKILL) is taken over.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';

export const LOCK_FILE = 'db.lock';

export class DataDirInUseError extends Error {
  constructor(
    readonly dataDir: string,
    readonly pid: number,
  ) {
    super(
      `The data directory ${dataDir} is in use by process ${pid} (a running Ringwell server?). ` +
        `Stop that process first. If no Ringwell process uses the directory, delete ${path.join(dataDir, LOCK_FILE)}.`,
    );
    this.name = 'DataDirInUseError';
  }
}

interface LockContent {
  pid: number;
  host: string;
  startedAt: string;
}

/** Directories this process holds, so that a lock with our own pid left by an earlier process
 * that had the same pid (a container restart) is not mistaken for our own. */
const heldHere = new Set<string>();

function alive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (error) {
    return (error as NodeJS.ErrnoException).code === 'EPERM';
  }
}

function readLock(file: string): LockContent | null {
  try {
    const parsed = JSON.parse(fs.readFileSync(file, 'utf8')) as Partial<LockContent>;
    return typeof parsed.pid === 'number' ? (parsed as LockContent) : null;
  } catch {
    return null;
  }
}

/** The pid holding the directory, or null when nobody (or only a dead process) does. */
export function dataDirHolder(dataDir: string): number | null {
  const dir = path.resolve(dataDir);
  const lock = readLock(path.join(dir, LOCK_FILE));
  if (!lock) return null;
  if (lock.pid === process.pid) return heldHere.has(dir) ? lock.pid : null;
  if (lock.host !== os.hostname()) return lock.pid; // another machine on a shared disk: cannot check
  return alive(lock.pid) ? lock.pid : null;
}

export interface DataDirLock {
  release(): void;
}

/** Takes the directory for this process, or throws DataDirInUseError. */
export function lockDataDir(dataDir: string): DataDirLock {
  const dir = path.resolve(dataDir);
  fs.mkdirSync(dir, { recursive: true });
  const file = path.join(dir, LOCK_FILE);
  const content: LockContent = { pid: process.pid, host: os.hostname(), startedAt: new Date().toISOString() };
  for (let attempt = 0; attempt < 3; attempt++) {
    try {
      fs.writeFileSync(file, JSON.stringify(content), { flag: 'wx', mode: 0o600 });
      heldHere.add(dir);
      return {
        release() {
          heldHere.delete(dir);
          if (readLock(file)?.pid === process.pid) fs.rmSync(file, { force: true });
        },
      };
    } catch (error) {
      if ((error as NodeJS.ErrnoException).code !== 'EEXIST') throw error;
      const holder = dataDirHolder(dir);
      if (holder !== null) throw new DataDirInUseError(dir, holder);
      // A stale lock (its process is gone): remove it and try again; if another process takes it
      // in between, the next attempt sees that process as the holder.
      fs.rmSync(file, { force: true });
    }
  }
  throw new Error(`Could not take the lock ${file}; try again.`);
}
