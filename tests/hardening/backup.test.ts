// Backup and restore (db/backup.ts, scripts/backup.ts, scripts/restore.ts): a data directory with
// the demo workspace plus more revisions, a decided review, a comment and a bench capture is backed
// up, restored into a fresh directory, and every table compared row for row; damaged archives and
// non-empty or busy directories are refused with a clear message, leaving the target empty.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import zlib from 'node:zlib';
import request from 'supertest';
import { eq } from 'drizzle-orm';
import { openDatabase, type DatabaseHandle } from '@/db/client';
import { BackupError, createBackup, readBackup, restoreBackup } from '@/db/backup';
import { DataDirInUseError, LOCK_FILE } from '@/db/dataDirLock';
import { demoAccounts, seedDemo } from '@/db/seed';
import { users } from '@/db/schema';
import { createApp, createAppContext, type AppOptions } from '@/server/app';
import { hashPassword } from '@/server/auth/passwords';
import { loadOrCreateJwtSecret, randomJwtSecret } from '@/server/auth/secret';
import { seedDemoWorkspace } from '@/server/services/demoWorkspace';
import { main as backupMain } from '@/scripts/backup';
import { main as restoreMain } from '@/scripts/restore';

jest.setTimeout(240_000);

const tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'ringwell-backup-test-'));
const sourceDir = path.join(tmp, 'source');
const archive = path.join(tmp, 'backup.tar.gz');
const password = (role: string) => demoAccounts.find((a) => a.role === role)!.password;
const email = (role: string) => demoAccounts.find((a) => a.role === role)!.email;
const CAPTURE = 'time_us,v_mV\n0,0\n1,10\n2,19\n3,27\n4,34\n5,40\n';
const MAPPING = { time: { column: 0, unit: 'us' }, channels: [{ column: 1, quantity: 'capacitorVoltage', unit: 'mV' }] };

let seededCounts: Record<string, number>;

/** Every table of the public schema and the migrations table, each row as its text form, sorted. */
async function snapshot(handle: DatabaseHandle): Promise<Record<string, string[]>> {
  const tables = await handle.pg.query<{ name: string }>(
    `select quote_ident(table_schema) || '.' || quote_ident(table_name) as name from information_schema.tables
      where (table_schema = 'public' or (table_schema = 'drizzle' and table_name = '__drizzle_migrations'))
        and table_type = 'BASE TABLE' order by 1`,
  );
  const out: Record<string, string[]> = {};
  for (const { name } of tables.rows) {
    const rows = await handle.pg.query<{ r: string }>(`select t::text as r from ${name} t order by 1`);
    out[name] = rows.rows.map((row) => row.r);
  }
  const seq = await handle.pg.query<{ v: string }>(
    "select last_value::text || (case when is_called then '+' else '-' end) as v from audit_log_id_seq",
  );
  out['sequence audit_log_id_seq'] = seq.rows.map((r) => r.v);
  return out;
}

async function withDatabase<T>(dataDir: string, work: (handle: DatabaseHandle) => Promise<T>): Promise<T> {
  const handle = await openDatabase({ dataDir });
  try {
    return await work(handle);
  } finally {
    await handle.close();
  }
}

const listDir = (dir: string) => (fs.existsSync(dir) ? fs.readdirSync(dir) : []);

beforeAll(async () => {
  // The demo team and workspace, as a first server start makes them, on disk.
  const database = await openDatabase({ dataDir: sourceDir });
  try {
    const options: AppOptions = {
      database,
      dataDir: sourceDir,
      webDir: null,
      // As the server does: the secret lives in the data directory (and stays out of backups).
      jwtSecret: loadOrCreateJwtSecret(sourceDir, null),
      secureCookies: false,
      log: () => undefined,
      jobWorker: false,
    };
    const seeded = await seedDemo(database.db, hashPassword);
    await seedDemoWorkspace(createAppContext(options), seeded.teamId!);
    const app = createApp(options);
    const sam = request.agent(app);
    const priya = request.agent(app);
    await sam
      .post('/api/auth/sign-in')
      .send({ email: email('engineer'), password: password('engineer') })
      .expect(200);
    await priya
      .post('/api/auth/sign-in')
      .send({ email: email('reviewer'), password: password('reviewer') })
      .expect(200);
    const [reviewer] = await database.db
      .select()
      .from(users)
      .where(eq(users.email, email('reviewer')));

    // More revisions, a review requested, commented on and approved, and a bench capture.
    const designs = (await sam.get('/api/designs').expect(200)).body.items as { id: string; name: string }[];
    expect(designs.length).toBeGreaterThanOrEqual(3);
    let lastRevision = '';
    for (const design of designs.slice(0, 3)) {
      for (let i = 0; i < 2; i++) {
        const saved = await sam
          .post(`/api/designs/${design.id}/revisions`)
          .send({ note: `Backup test save ${i + 1}` })
          .expect(201);
        lastRevision = saved.body.id;
      }
    }
    const requested = await sam
      .post(`/api/revisions/${lastRevision}/reviews`)
      .send({ reviewerIds: [reviewer.id], note: 'Before the backup.' })
      .expect(201);
    const reviewId = requested.body.items[0].id;
    await priya
      .post(`/api/reviews/${reviewId}/comments`)
      .send({ body: 'Margins read fine; “µ” and ü survive a dump.' })
      .expect(201);
    await priya.post(`/api/reviews/${reviewId}/approve`).send({ comment: 'Approved for the backup test.' }).expect(200);
    await sam
      .post(`/api/designs/${designs[0].id}/captures`)
      .field('mapping', JSON.stringify(MAPPING))
      .attach('file', Buffer.from(CAPTURE), { filename: 'scope.csv', contentType: 'text/csv' })
      .expect(201);
    const counts = await database.pg.query<{ name: string; n: number }>(
      `select 'revisions' as name, count(*)::int as n from revisions union all select 'reviews', count(*)::int from reviews
       union all select 'bench_captures', count(*)::int from bench_captures union all select 'review_comments', count(*)::int from review_comments
       union all select 'audit_log', count(*)::int from audit_log`,
    );
    seededCounts = Object.fromEntries(counts.rows.map((r) => [r.name, r.n]));
  } finally {
    await database.close();
  }
});

afterAll(() => {
  fs.rmSync(tmp, { recursive: true, force: true });
});

describe('backup', () => {
  it('refuses a data directory that a live process holds, naming the process', async () => {
    const holder = await openDatabase({ dataDir: sourceDir });
    try {
      const attempt = createBackup({ dataDir: sourceDir, out: path.join(tmp, 'busy.tar.gz') });
      await expect(attempt).rejects.toThrow(DataDirInUseError);
      await expect(createBackup({ dataDir: sourceDir, out: path.join(tmp, 'busy.tar.gz') })).rejects.toThrow(
        new RegExp(`in use by process ${process.pid}.*Stop that process first`),
      );
      expect(fs.existsSync(path.join(tmp, 'busy.tar.gz'))).toBe(false);
    } finally {
      await holder.close();
    }
    expect(fs.existsSync(path.join(sourceDir, LOCK_FILE))).toBe(false);
  });

  it('writes an archive through the command, with a manifest of counts and hashes', async () => {
    expect(seededCounts.revisions).toBeGreaterThanOrEqual(11);
    expect(seededCounts.bench_captures).toBe(1);
    const log = jest.spyOn(console, 'log').mockImplementation(() => undefined);
    try {
      expect(await backupMain(['--out', archive, '--data-dir', sourceDir], {})).toBe(0);
    } finally {
      log.mockRestore();
    }
    const { manifest, sql, files } = readBackup(fs.readFileSync(archive));
    expect(manifest.tables.revisions.rows).toBe(seededCounts.revisions);
    expect(manifest.tables.reviews.rows).toBe(seededCounts.reviews);
    expect(manifest.tables.audit_log.rows).toBe(seededCounts.audit_log);
    expect(manifest.files).toHaveLength(1);
    expect(files.get(manifest.files[0].name)?.toString()).toBe(CAPTURE);
    expect(manifest.notIncluded).toEqual(['jwt-secret']);
    // Parents load before children.
    const order = Object.keys(manifest.tables);
    expect(order.indexOf('teams')).toBeLessThan(order.indexOf('designs'));
    expect(order.indexOf('designs')).toBeLessThan(order.indexOf('revisions'));
    expect(order.indexOf('revisions')).toBeLessThan(order.indexOf('reviews'));
    expect(order.indexOf('reviews')).toBeLessThan(order.indexOf('review_comments'));
    const text = sql.toString('utf8');
    expect(text).toMatch(/^COPY "public"\."revisions" \("id", "team_id", "design_id", "sequence", /m);
    expect(text).toMatch(/^SELECT pg_catalog\.setval\('"public"\."audit_log_id_seq"', \d+, true\);$/m);
    // Refuses to overwrite.
    await expect(createBackup({ dataDir: sourceDir, out: archive })).rejects.toThrow(/already exists; choose another --out/);
  });

  it('says what is missing on the command line, naming the option', async () => {
    const error = jest.spyOn(console, 'error').mockImplementation(() => undefined);
    try {
      expect(await backupMain([], {})).toBe(2);
      expect(error.mock.calls.flat().join(' ')).toMatch(/--out/);
      expect(await backupMain(['--out', path.join(tmp, 'x.tar.gz')], { DATABASE_URL: 'postgres://localhost/ringwell' })).toBe(2);
      expect(error.mock.calls.flat().join(' ')).toMatch(/pg_dump/);
      expect(await restoreMain(['--data-dir', path.join(tmp, 'nowhere')], {})).toBe(2);
      expect(error.mock.calls.flat().join(' ')).toMatch(/--in/);
      expect(await backupMain(['--out', path.join(tmp, 'y.tar.gz'), '--data-dir', path.join(tmp, 'no-such-dir')], {})).toBe(1);
      expect(error.mock.calls.flat().join(' ')).toMatch(/not a Ringwell data directory/);
    } finally {
      error.mockRestore();
    }
  });
});

describe('restore', () => {
  it('round-trips: every table, row for row, the sequence, the files; and the server works on it', async () => {
    const target = path.join(tmp, 'restored');
    const log = jest.spyOn(console, 'log').mockImplementation(() => undefined);
    try {
      expect(await restoreMain(['--in', archive, '--data-dir', target], {})).toBe(0);
      expect(log.mock.calls.flat().join(' ')).toMatch(new RegExp(`${seededCounts.revisions} revisions verified`));
    } finally {
      log.mockRestore();
    }
    const before = await withDatabase(sourceDir, snapshot);
    const after = await withDatabase(target, snapshot);
    expect(Object.keys(after)).toEqual(Object.keys(before));
    for (const table of Object.keys(before)) expect({ table, rows: after[table] }).toEqual({ table, rows: before[table] });
    expect(after['public.revisions']).toHaveLength(seededCounts.revisions);
    expect(listDir(path.join(target, 'uploads'))).toEqual(
      listDir(path.join(sourceDir, 'uploads')).filter((n) => /^[0-9a-f]{64}$/.test(n)),
    );
    expect(listDir(target).sort()).toEqual(['pg', 'uploads']);

    // The restored directory serves: sign in, list, verify a revision, save one more.
    await withDatabase(target, async (database) => {
      const app = createApp({
        database,
        dataDir: target,
        webDir: null,
        jwtSecret: randomJwtSecret(),
        secureCookies: false,
        log: () => undefined,
        jobWorker: false,
      });
      const sam = request.agent(app);
      await sam
        .post('/api/auth/sign-in')
        .send({ email: email('engineer'), password: password('engineer') })
        .expect(200);
      const designs = (await sam.get('/api/designs').expect(200)).body.items as { id: string; latestRevisionId?: string }[];
      const revisions = (await sam.get(`/api/designs/${designs[0].id}/revisions`).expect(200)).body.items as { id: string }[];
      const verify = await sam.get(`/api/revisions/${revisions[0].id}/verify`).expect(200);
      expect(verify.body).toMatchObject({ hashMatches: true, reproduced: true });
      await sam.post(`/api/designs/${designs[0].id}/revisions`).send({ note: 'After the restore' }).expect(201);
      const [{ max, last }] = (
        await database.pg.query<{ max: number; last: number }>(
          'select max(id)::int as max, (select last_value::int from audit_log_id_seq) as last from audit_log',
        )
      ).rows;
      // The identity sequence went on from where the backup left it: no id was handed out twice.
      expect(max).toBe(last);
      expect(max).toBeGreaterThan(seededCounts.audit_log);
    });
  });

  it('refuses a non-empty directory, naming --data-dir, and leaves it alone', async () => {
    const target = path.join(tmp, 'occupied');
    fs.mkdirSync(target);
    fs.writeFileSync(path.join(target, 'notes.txt'), 'keep me');
    await expect(restoreBackup({ archive, dataDir: target })).rejects.toThrow(/is not empty \(it holds notes\.txt\).*--data-dir/);
    expect(listDir(target)).toEqual(['notes.txt']);
  });

  const damaged: [string, (bytes: Buffer) => Buffer, RegExp][] = [
    ['a truncated archive', (b) => b.subarray(0, Math.floor(b.length / 2)), /truncated/],
    ['an archive cut just before its end', (b) => b.subarray(0, b.length - 4), /truncated|damaged/],
    [
      'a flipped byte in the compressed data',
      (b) => {
        const copy = Buffer.from(b);
        copy[Math.floor(copy.length / 2)] ^= 0xff;
        return copy;
      },
      /damaged|truncated/,
    ],
    [
      'a changed row in database.sql (valid gzip, stale manifest hash)',
      (b) => {
        const tar = zlib.gunzipSync(b);
        const at = tar.indexOf('Backup test save 2');
        expect(at).toBeGreaterThan(0);
        tar.write('Backup test save 9', at);
        return zlib.gzipSync(tar);
      },
      /database\.sql in the archive does not match the hash/,
    ],
    [
      'a manifest that disagrees with the data (found only after the load)',
      (b) => {
        const tar = zlib.gunzipSync(b);
        const at = tar.indexOf('"rows": ', tar.indexOf('"revisions": {')) + '"rows": '.length;
        const digit = tar[at];
        tar[at] = digit === 0x39 ? 0x38 : digit + 1;
        return zlib.gzipSync(tar);
      },
      /revisions: \d+ rows loaded, the manifest says \d+/,
    ],
    ['a file that is not a backup', () => zlib.gzipSync(Buffer.from('hello')), /truncated|not a Ringwell backup/],
    ['random bytes', () => Buffer.from('definitely not gzip'), /damaged or not a Ringwell backup/],
  ];

  it.each(damaged)('refuses %s with a clear error and leaves the target empty', async (_label, damage, message) => {
    const bad = path.join(tmp, `bad-${Math.random().toString(36).slice(2)}.tar.gz`);
    fs.writeFileSync(bad, damage(fs.readFileSync(archive)));
    const target = path.join(tmp, `target-${Math.random().toString(36).slice(2)}`);
    fs.mkdirSync(target);
    const attempt = restoreBackup({ archive: bad, dataDir: target });
    await expect(attempt).rejects.toThrow(BackupError);
    await expect(restoreBackup({ archive: bad, dataDir: target })).rejects.toThrow(message);
    expect(listDir(target)).toEqual([]);
    // No staging directory is left beside it either.
    expect(listDir(tmp).filter((n) => n.includes('.restoring-'))).toEqual([]);
  });
});
