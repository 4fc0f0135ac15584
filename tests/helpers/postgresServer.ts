// A throwaway PostgreSQL server on loopback for tests and CI: Debian's postgresql binaries, a fresh
// cluster in a temporary directory, a free port, trust authentication for the local user only.
// As root (CI containers) the cluster runs as the `postgres` system user, since PostgreSQL refuses
// to run as root.
import { execFileSync, spawnSync } from 'node:child_process';
import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';

export interface PostgresServer {
  /** postgres://… URL of the maintenance database `postgres`. */
  url: string;
  port: number;
  dataDir: string;
  /** A URL for another database on the same server. */
  urlFor(database: string): string;
  stop(): void;
}

/** Where Debian keeps the server binaries (initdb and postgres are not on PATH there). */
export function postgresBinDir(): string | null {
  const root = '/usr/lib/postgresql';
  if (!fs.existsSync(root)) return null;
  const versions = fs
    .readdirSync(root)
    .filter((v) => fs.existsSync(path.join(root, v, 'bin', 'initdb')))
    .sort((a, b) => Number(b) - Number(a));
  return versions.length ? path.join(root, versions[0], 'bin') : null;
}

async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const probe = net.createServer();
    probe.once('error', reject);
    probe.listen(0, '127.0.0.1', () => {
      const address = probe.address();
      const port = typeof address === 'object' && address ? address.port : 0;
      probe.close(() => resolve(port));
    });
  });
}

export async function startPostgres(): Promise<PostgresServer> {
  const bin = postgresBinDir();
  if (!bin) {
    throw new Error(
      "PostgreSQL server binaries not found under /usr/lib/postgresql: install Debian's package (apt-get install postgresql).",
    );
  }
  const asRoot = process.getuid?.() === 0;
  const user = asRoot ? 'postgres' : os.userInfo().username;
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'ringwell-pg-'));
  if (asRoot) execFileSync('chown', ['postgres:postgres', dataDir]);
  const run = (program: string, args: string[]) => {
    const command = asRoot ? 'runuser' : path.join(bin, program);
    const argv = asRoot ? ['-u', 'postgres', '--', path.join(bin, program), ...args] : args;
    const result = spawnSync(command, argv, { encoding: 'utf8' });
    if (result.status !== 0) {
      throw new Error(`${program} failed (${result.status}): ${result.stderr || result.stdout}`);
    }
  };
  run('initdb', ['-D', dataDir, '-U', user, '--auth=trust', '--encoding=UTF8', '--no-locale', '-N']);
  const port = await freePort();
  run('pg_ctl', [
    '-D',
    dataDir,
    '-w',
    '-t',
    '60',
    '-l',
    path.join(dataDir, 'server.log'),
    '-o',
    `-p ${port} -k ${dataDir} -c listen_addresses=127.0.0.1 -c fsync=on -c max_connections=200`,
    'start',
  ]);
  const urlFor = (database: string) => `postgres://${user}@127.0.0.1:${port}/${database}`;
  let stopped = false;
  return {
    url: urlFor('postgres'),
    port,
    dataDir,
    urlFor,
    stop: () => {
      if (stopped) return;
      stopped = true;
      try {
        run('pg_ctl', ['-D', dataDir, '-m', 'fast', '-w', 'stop']);
      } finally {
        fs.rmSync(dataDir, { recursive: true, force: true });
      }
    },
  };
}
