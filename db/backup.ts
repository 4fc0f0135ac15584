// Backup and restore of an embedded (PGlite) data directory.
//
// The archive is a gzip'd tar (`tar tzf` lists it) holding:
// - manifest.json: the migrations the data was written under, each table's row count and the
//   SHA-256 of its data, the sequences, and every upload file with its size and SHA-256;
// - database.sql: the data of every table in the plain format of `pg_dump --data-only`
//   (`COPY … FROM stdin;` blocks, then `setval` of the sequences), tables in foreign-key order, so
//   that psql can also load it into a PostgreSQL database migrated to the same level;
// - uploads/<sha256>: the bench capture files.
//
// Taking a backup opens the data directory itself, so it needs the directory to itself: PGlite is
// one process per directory (see db/dataDirLock.ts) and a running server holds the lock; the
// backup then refuses and says to stop the server. The dump is read in one REPEATABLE READ
// transaction, so the tables agree with each other.
//
// Restoring builds the data directory in a staging directory next to the target: it applies the
// migrations the backup was written under, loads the data with the foreign keys checked (the
// immutability triggers refuse UPDATE, DELETE and TRUNCATE only, so loading rows does not touch
// them), checks each table's count and data hash, then opens the result with openDatabase (which
// applies any newer migrations) and re-verifies every revision's SHA-256 and every file's hash.
// Only then does the staging directory's content move into the target. Any failure leaves the
// target as it was: empty.
import crypto from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import zlib from 'node:zlib';
import { PGlite, type Transaction } from '@electric-sql/pglite';
import { drizzle } from 'drizzle-orm/pglite';
import { migrate } from 'drizzle-orm/pglite/migrator';
import { readMigrationFiles } from 'drizzle-orm/migrator';
import { canonicalJson, sha256Hex } from '../server/services/canonical';
import { APP_VERSION } from '../server/version';
import { migrationsFolder, openDatabase } from './client';
import { LOCK_FILE, lockDataDir } from './dataDirLock';

export const BACKUP_FORMAT = 'ringwell-backup';
export const BACKUP_FORMAT_VERSION = 1;
const SQL_FILE = 'database.sql';
const MANIFEST_FILE = 'manifest.json';
const UPLOADS = 'uploads';
const SHA_NAME = /^[0-9a-f]{64}$/;

/** A backup or restore that cannot go ahead; the message says why and what to do. */
export class BackupError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'BackupError';
  }
}

export interface ManifestTable {
  rows: number;
  /** SHA-256 of the table's COPY data as written in database.sql. */
  sha256: string;
  columns: string[];
}

export interface ManifestFile {
  name: string;
  bytes: number;
  sha256: string;
}

export interface BackupManifest {
  format: typeof BACKUP_FORMAT;
  formatVersion: number;
  appVersion: string;
  createdAt: string;
  /** drizzle.__drizzle_migrations, oldest first. */
  migrations: { hash: string; createdAt: number }[];
  /** In load order (parents before children). */
  tables: Record<string, ManifestTable>;
  sequences: Record<string, { lastValue: number; isCalled: boolean }>;
  database: { file: string; bytes: number; sha256: string };
  files: ManifestFile[];
  /** Entries of the data directory not in the backup (the JWT secret, temp files, the lock). */
  notIncluded: string[];
}

export interface BackupSummary {
  out: string;
  bytes: number;
  tables: Record<string, number>;
  files: number;
}

export interface RestoreSummary {
  dataDir: string;
  tables: Record<string, number>;
  revisionsVerified: number;
  filesVerified: number;
  migrationsApplied: number;
  migrationsAddedAfter: number;
}

/** PGlite itself or one of its transactions. */
type Queryable = Pick<Transaction, 'query'>;

const quote = (name: string) => `"${name.replace(/"/g, '""')}"`;
const hashOf = (data: Buffer | string) => crypto.createHash('sha256').update(data).digest('hex');

// ---------------------------------------------------------------------------------------------
// tar (ustar), enough for regular files with short names

function tarHeader(name: string, size: number, mtime: number): Buffer {
  if (Buffer.byteLength(name) > 100) throw new Error(`tar: the name ${name} is too long`);
  const header = Buffer.alloc(512);
  const field = (offset: number, length: number, value: string) => header.write(value, offset, length, 'utf8');
  const octal = (offset: number, length: number, value: number) =>
    field(offset, length, value.toString(8).padStart(length - 1, '0') + '\0');
  field(0, 100, name);
  octal(100, 8, 0o644);
  octal(108, 8, 0);
  octal(116, 8, 0);
  octal(124, 12, size);
  octal(136, 12, mtime);
  header.fill(' ', 148, 156);
  field(156, 1, '0');
  field(257, 6, 'ustar\0');
  field(263, 2, '00');
  field(265, 32, 'ringwell');
  field(297, 32, 'ringwell');
  let sum = 0;
  for (const byte of header) sum += byte;
  field(148, 8, sum.toString(8).padStart(6, '0') + '\0 ');
  return header;
}

function writeTar(entries: { name: string; data: Buffer }[], mtime: number): Buffer {
  const parts: Buffer[] = [];
  for (const entry of entries) {
    parts.push(tarHeader(entry.name, entry.data.length, mtime), entry.data);
    const pad = (512 - (entry.data.length % 512)) % 512;
    if (pad) parts.push(Buffer.alloc(pad));
  }
  parts.push(Buffer.alloc(1024));
  return Buffer.concat(parts);
}

function readTar(tar: Buffer): Map<string, Buffer> {
  const entries = new Map<string, Buffer>();
  let offset = 0;
  for (;;) {
    if (offset + 512 > tar.length) throw new BackupError('The archive is truncated: its file list ends early.');
    const header = tar.subarray(offset, offset + 512);
    if (header.every((b) => b === 0)) return entries;
    const text = (start: number, length: number) =>
      header
        .subarray(start, start + length)
        .toString('utf8')
        .replace(/\0.*$/s, '');
    let sum = 0;
    for (let i = 0; i < 512; i++) sum += i >= 148 && i < 156 ? 32 : header[i];
    if (parseInt(text(148, 8).trim(), 8) !== sum)
      throw new BackupError(`The archive is damaged: a file header at byte ${offset} does not add up.`);
    const prefix = text(345, 155);
    const name = (prefix ? `${prefix}/` : '') + text(0, 100);
    const size = parseInt(text(124, 12).trim(), 8);
    const type = text(156, 1);
    offset += 512;
    if (offset + size > tar.length) throw new BackupError(`The archive is truncated: ${name} is cut short.`);
    if (type === '0' || type === '') {
      if (entries.has(name)) throw new BackupError(`The archive holds ${name} twice.`);
      entries.set(name, tar.subarray(offset, offset + size));
    }
    offset += size + ((512 - (size % 512)) % 512);
  }
}

// ---------------------------------------------------------------------------------------------
// the catalogue

interface TableInfo {
  name: string;
  columns: string[];
}

async function listTables(pg: Queryable): Promise<TableInfo[]> {
  const tables = await pg.query<{ name: string; columns: string[] }>(
    `select c.relname as name,
            array(select a.attname::text from pg_attribute a
                  where a.attrelid = c.oid and a.attnum > 0 and not a.attisdropped and a.attgenerated = ''
                  order by a.attnum) as columns
       from pg_class c join pg_namespace n on n.oid = c.relnamespace
      where n.nspname = 'public' and c.relkind in ('r', 'p')`,
  );
  const edges = await pg.query<{ child: string; parent: string }>(
    `select c.relname as child, p.relname as parent
       from pg_constraint k
       join pg_class c on c.oid = k.conrelid join pg_namespace cn on cn.oid = c.relnamespace
       join pg_class p on p.oid = k.confrelid
      where k.contype = 'f' and cn.nspname = 'public' and k.conrelid <> k.confrelid`,
  );
  // Parents before children (Kahn's algorithm, names in order for a stable file).
  const byName = new Map(tables.rows.map((t) => [t.name, t]));
  const parents = new Map<string, Set<string>>([...byName.keys()].map((n) => [n, new Set<string>()]));
  for (const { child, parent } of edges.rows) if (byName.has(parent)) parents.get(child)?.add(parent);
  const ordered: TableInfo[] = [];
  const done = new Set<string>();
  while (done.size < byName.size) {
    const ready = [...byName.keys()].filter((n) => !done.has(n) && [...parents.get(n)!].every((p) => done.has(p))).sort();
    if (ready.length === 0) {
      const left = [...byName.keys()].filter((n) => !done.has(n)).sort();
      throw new BackupError(`The foreign keys between ${left.join(', ')} form a cycle; this backup cannot order them.`);
    }
    for (const name of ready) {
      done.add(name);
      ordered.push(byName.get(name)!);
    }
  }
  return ordered;
}

async function listSequences(pg: Queryable): Promise<string[]> {
  const result = await pg.query<{ name: string }>(
    `select c.relname as name from pg_class c join pg_namespace n on n.oid = c.relnamespace
      where n.nspname = 'public' and c.relkind = 'S' order by c.relname`,
  );
  return result.rows.map((r) => r.name);
}

/** The settings pg_dump writes at the top of a plain dump, plus a fixed time zone so that
 * timestamps come out the same wherever the dump is taken or loaded. */
const SESSION_SETTINGS = [
  "SET client_encoding = 'UTF8';",
  'SET standard_conforming_strings = on;',
  "SET TimeZone = 'UTC';",
  "SET DateStyle = 'ISO, MDY';",
  "SET IntervalStyle = 'postgres';",
  'SET extra_float_digits = 3;',
  "SET bytea_output = 'hex';",
];

async function copyOut(pg: Queryable, table: TableInfo): Promise<Buffer> {
  const result = await pg.query(`COPY "public".${quote(table.name)} (${table.columns.map(quote).join(', ')}) TO '/dev/blob'`);
  return result.blob ? Buffer.from(await result.blob.arrayBuffer()) : Buffer.alloc(0);
}

const countLines = (data: Buffer) => {
  let n = 0;
  for (const byte of data) if (byte === 10) n++;
  return n;
};

// ---------------------------------------------------------------------------------------------
// backup

export async function createBackup(options: { dataDir: string; out: string }): Promise<BackupSummary> {
  const dataDir = path.resolve(options.dataDir);
  const out = path.resolve(options.out);
  const pgDir = path.join(dataDir, 'pg');
  if (!fs.existsSync(path.join(pgDir, 'PG_VERSION')))
    throw new BackupError(`${dataDir} is not a Ringwell data directory (no database in ${pgDir}); check --data-dir or DATA_DIR.`);
  if (fs.existsSync(out)) throw new BackupError(`${out} already exists; choose another --out file.`);
  if (out.startsWith(dataDir + path.sep)) throw new BackupError(`Write the backup outside the data directory (--out ${out}).`);

  const lock = lockDataDir(dataDir);
  let taken: { dump: { sql: Buffer; manifest: BackupManifest }; uploads: ReturnType<typeof readUploads> };
  try {
    const pg = new PGlite(pgDir);
    let dump: { sql: Buffer; manifest: BackupManifest };
    try {
      await pg.waitReady;
      dump = await dumpDatabase(pg);
    } finally {
      await pg.close();
    }
    // Files are read while the directory is still locked, so no upload can land in between.
    taken = { dump, uploads: readUploads(dataDir) };
  } finally {
    lock.release();
  }
  const { dump, uploads } = taken;
  const files = uploads.files;
  const manifest = dump.manifest;
  manifest.notIncluded = uploads.notIncluded;
  manifest.files = files.map((f) => ({ name: f.name, bytes: f.data.length, sha256: hashOf(f.data) }));
  const tar = writeTar(
    [
      { name: MANIFEST_FILE, data: Buffer.from(JSON.stringify(manifest, null, 2) + '\n') },
      { name: SQL_FILE, data: dump.sql },
      ...files.map((f) => ({ name: `${UPLOADS}/${f.name}`, data: f.data })),
    ],
    Math.floor(Date.parse(manifest.createdAt) / 1000),
  );
  const gz = zlib.gzipSync(tar);
  // Written beside the target and renamed, so a failed backup never leaves a half-written file.
  fs.mkdirSync(path.dirname(out), { recursive: true });
  const temp = `${out}.${crypto.randomBytes(6).toString('hex')}.partial`;
  const handle = fs.openSync(temp, 'wx', 0o600);
  try {
    fs.writeFileSync(handle, gz);
    fs.fsyncSync(handle);
  } finally {
    fs.closeSync(handle);
  }
  try {
    fs.linkSync(temp, out); // fails if out appeared in the meantime, instead of replacing it
  } finally {
    fs.rmSync(temp, { force: true });
  }
  return {
    out,
    bytes: gz.length,
    tables: Object.fromEntries(Object.entries(manifest.tables).map(([name, t]) => [name, t.rows])),
    files: files.length,
  };
}

async function dumpDatabase(pg: PGlite): Promise<{ sql: Buffer; manifest: BackupManifest }> {
  const createdAt = new Date().toISOString();
  const parts: Buffer[] = [
    Buffer.from(
      [
        '--',
        `-- Ringwell ${APP_VERSION} backup, ${createdAt}: the data of every table in the plain format of`,
        '-- pg_dump --data-only. Load it into a database migrated to the migrations listed in',
        '-- manifest.json (npm run restore does that).',
        '--',
        '',
        ...SESSION_SETTINGS,
        '',
        '',
      ].join('\n'),
    ),
  ];
  const manifest: BackupManifest = {
    format: BACKUP_FORMAT,
    formatVersion: BACKUP_FORMAT_VERSION,
    appVersion: APP_VERSION,
    createdAt,
    migrations: [],
    tables: {},
    sequences: {},
    database: { file: SQL_FILE, bytes: 0, sha256: '' },
    files: [],
    notIncluded: [],
  };
  await pg.transaction(async (tx) => {
    await tx.exec('SET TRANSACTION ISOLATION LEVEL REPEATABLE READ, READ ONLY');
    for (const setting of SESSION_SETTINGS) await tx.exec(setting.replace(/^SET /, 'SET LOCAL '));
    const migrations = await tx.query<{ hash: string; created_at: string }>(
      'select hash, created_at::text as created_at from drizzle.__drizzle_migrations order by id',
    );
    manifest.migrations = migrations.rows.map((m) => ({ hash: m.hash, createdAt: Number(m.created_at) }));
    for (const table of await listTables(tx)) {
      const data = await copyOut(tx, table);
      const [{ n }] = (await tx.query<{ n: number }>(`select count(*)::int as n from "public".${quote(table.name)}`)).rows;
      if (countLines(data) !== n)
        throw new BackupError(`Table ${table.name}: ${n} rows but ${countLines(data)} lines of data were read.`);
      manifest.tables[table.name] = { rows: n, sha256: hashOf(data), columns: table.columns };
      parts.push(
        Buffer.from(`--\n-- Data for Name: ${table.name}; Type: TABLE DATA; Schema: public\n--\n\n`),
        Buffer.from(`COPY "public".${quote(table.name)} (${table.columns.map(quote).join(', ')}) FROM stdin;\n`),
        data,
        Buffer.from('\\.\n\n\n'),
      );
    }
    for (const name of await listSequences(tx)) {
      const [row] = (
        await tx.query<{ last_value: string; is_called: boolean }>(
          `select last_value::text, is_called from "public".${quote(name)}`,
        )
      ).rows;
      manifest.sequences[name] = { lastValue: Number(row.last_value), isCalled: row.is_called };
      parts.push(Buffer.from(`SELECT pg_catalog.setval('"public".${quote(name)}', ${row.last_value}, ${row.is_called});\n`));
    }
  });
  const sql = Buffer.concat(parts);
  manifest.database = { file: SQL_FILE, bytes: sql.length, sha256: hashOf(sql) };
  return { sql, manifest };
}

function readUploads(dataDir: string): { files: { name: string; data: Buffer }[]; notIncluded: string[] } {
  const notIncluded = fs
    .readdirSync(dataDir)
    .filter((e) => e !== 'pg' && e !== UPLOADS && e !== LOCK_FILE)
    .sort();
  const dir = path.join(dataDir, UPLOADS);
  const files: { name: string; data: Buffer }[] = [];
  if (!fs.existsSync(dir)) return { files, notIncluded };
  for (const name of fs.readdirSync(dir).sort()) {
    const full = path.join(dir, name);
    if (!SHA_NAME.test(name) || !fs.statSync(full).isFile()) {
      // Temp files of an upload that never finished (their rename never happened).
      notIncluded.push(`${UPLOADS}/${name}`);
      continue;
    }
    const data = fs.readFileSync(full);
    const actual = hashOf(data);
    if (actual !== name)
      throw new BackupError(
        `${full} is damaged: its content hashes to ${actual}, not to its name. Move it aside and back up again.`,
      );
    files.push({ name, data });
  }
  return { files, notIncluded };
}

// ---------------------------------------------------------------------------------------------
// restore

/** Reads and checks an archive: gzip and tar framing, the manifest, and every hash in it. */
export function readBackup(archive: Buffer): { manifest: BackupManifest; sql: Buffer; files: Map<string, Buffer> } {
  let tar: Buffer;
  try {
    tar = zlib.gunzipSync(archive);
  } catch (error) {
    const reason = (error as Error).message;
    throw new BackupError(
      /unexpected end/i.test(reason)
        ? 'The archive is truncated (the compressed data ends early).'
        : `The archive is damaged or not a Ringwell backup (${reason}).`,
    );
  }
  const entries = readTar(tar);
  const manifestBytes = entries.get(MANIFEST_FILE);
  if (!manifestBytes) throw new BackupError(`The archive has no ${MANIFEST_FILE}; it is not a Ringwell backup.`);
  let manifest: BackupManifest;
  try {
    manifest = JSON.parse(manifestBytes.toString('utf8'));
  } catch {
    throw new BackupError(`The archive's ${MANIFEST_FILE} is not readable JSON.`);
  }
  if (!manifest || manifest.format !== BACKUP_FORMAT)
    throw new BackupError('The archive is not a Ringwell backup (manifest.format).');
  if (manifest.formatVersion !== BACKUP_FORMAT_VERSION)
    throw new BackupError(
      `The backup has format version ${manifest.formatVersion}; this Ringwell reads version ${BACKUP_FORMAT_VERSION}.`,
    );
  const shapeOk =
    Array.isArray(manifest.migrations) &&
    Array.isArray(manifest.files) &&
    typeof manifest.tables === 'object' &&
    manifest.tables !== null &&
    typeof manifest.sequences === 'object' &&
    manifest.sequences !== null &&
    typeof manifest.database?.sha256 === 'string';
  if (!shapeOk) throw new BackupError(`The archive's ${MANIFEST_FILE} lacks migrations, tables, sequences, database or files.`);
  const sql = entries.get(SQL_FILE);
  if (!sql) throw new BackupError(`The archive has no ${SQL_FILE}.`);
  if (sql.length !== manifest.database.bytes || hashOf(sql) !== manifest.database.sha256)
    throw new BackupError(`${SQL_FILE} in the archive does not match the hash in the manifest: the archive is damaged.`);
  const files = new Map<string, Buffer>();
  for (const file of manifest.files) {
    const data = entries.get(`${UPLOADS}/${file.name}`);
    if (!data) throw new BackupError(`The archive lacks ${UPLOADS}/${file.name}, which the manifest lists.`);
    if (!SHA_NAME.test(file.name) || data.length !== file.bytes || hashOf(data) !== file.sha256 || file.sha256 !== file.name)
      throw new BackupError(`${UPLOADS}/${file.name} in the archive does not match its hash: the archive is damaged.`);
    files.set(file.name, data);
  }
  const extra = [...entries.keys()].filter(
    (n) => n !== MANIFEST_FILE && n !== SQL_FILE && !files.has(n.slice(UPLOADS.length + 1)),
  );
  if (extra.length) throw new BackupError(`The archive holds files the manifest does not list: ${extra.slice(0, 5).join(', ')}.`);
  return { manifest, sql, files };
}

interface CopyBlock {
  table: string;
  columns: string[];
  data: Buffer;
}

/** Splits database.sql into its settings, COPY blocks and setval calls; anything else is refused,
 * so that an archive cannot run arbitrary SQL. */
function parseDump(sql: Buffer): {
  settings: string[];
  blocks: CopyBlock[];
  setvals: { name: string; value: string; called: boolean }[];
} {
  const settings: string[] = [];
  const blocks: CopyBlock[] = [];
  const setvals: { name: string; value: string; called: boolean }[] = [];
  let offset = 0;
  const nextLine = (): string | null => {
    if (offset >= sql.length) return null;
    const end = sql.indexOf(10, offset);
    const line = sql.subarray(offset, end < 0 ? sql.length : end).toString('utf8');
    offset = end < 0 ? sql.length : end + 1;
    return line;
  };
  const identifiers = (text: string) => [...text.matchAll(/"((?:[^"]|"")+)"/g)].map((m) => m[1].replace(/""/g, '"'));
  for (let line = nextLine(); line !== null; line = nextLine()) {
    if (line === '' || line.startsWith('--')) continue;
    if (SESSION_SETTINGS.includes(line)) {
      settings.push(line);
      continue;
    }
    const copy = /^COPY "public"\."((?:[^"]|"")+)" \((.*)\) FROM stdin;$/.exec(line);
    if (copy) {
      const start = offset;
      let end = -1;
      for (let probe = start; probe < sql.length;) {
        const lineEnd = sql.indexOf(10, probe);
        if (lineEnd < 0) break;
        if (lineEnd - probe === 2 && sql[probe] === 0x5c && sql[probe + 1] === 0x2e) {
          end = probe;
          break;
        }
        probe = lineEnd + 1;
      }
      if (end < 0) throw new BackupError(`${SQL_FILE}: the data of ${copy[1]} has no end marker.`);
      blocks.push({ table: copy[1].replace(/""/g, '"'), columns: identifiers(copy[2]), data: sql.subarray(start, end) });
      offset = end + 3;
      continue;
    }
    const setval = /^SELECT pg_catalog\.setval\('"public"\.("(?:[^"]|"")+")', (\d+), (true|false)\);$/.exec(line);
    if (setval) {
      setvals.push({ name: identifiers(setval[1])[0], value: setval[2], called: setval[3] === 'true' });
      continue;
    }
    throw new BackupError(`${SQL_FILE}: unexpected statement "${line.slice(0, 80)}".`);
  }
  return { settings, blocks, setvals };
}

/** A migrations folder holding only the first `count` migrations of ours. */
function partialMigrationsFolder(count: number): string {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'ringwell-migrations-'));
  const journal = JSON.parse(fs.readFileSync(path.join(migrationsFolder, 'meta', '_journal.json'), 'utf8')) as {
    entries: { tag: string }[];
  };
  journal.entries = journal.entries.slice(0, count);
  fs.mkdirSync(path.join(dir, 'meta'));
  fs.writeFileSync(path.join(dir, 'meta', '_journal.json'), JSON.stringify(journal));
  for (const entry of journal.entries)
    fs.copyFileSync(path.join(migrationsFolder, `${entry.tag}.sql`), path.join(dir, `${entry.tag}.sql`));
  return dir;
}

function isEmptyDir(dir: string): boolean {
  return !fs.existsSync(dir) || fs.readdirSync(dir).length === 0;
}

export async function restoreBackup(options: { archive: string; dataDir: string }): Promise<RestoreSummary> {
  const target = path.resolve(options.dataDir);
  if (fs.existsSync(target) && !fs.statSync(target).isDirectory())
    throw new BackupError(`--data-dir ${target} is a file, not a directory.`);
  if (!isEmptyDir(target)) {
    const entries = fs.readdirSync(target).slice(0, 5).join(', ');
    throw new BackupError(
      `The data directory ${target} is not empty (it holds ${entries}); restore only into an empty directory: give another --data-dir.`,
    );
  }
  let archive: Buffer;
  try {
    archive = fs.readFileSync(path.resolve(options.archive));
  } catch (error) {
    throw new BackupError(`Cannot read the backup --in ${options.archive}: ${(error as Error).message}`);
  }
  const { manifest, sql, files } = readBackup(archive);
  const dump = parseDump(sql);

  // The backup's migrations must be ours, in order; newer ones of ours run after the load.
  const ours = readMigrationFiles({ migrationsFolder });
  if (manifest.migrations.length > ours.length)
    throw new BackupError(
      `The backup was written by a newer Ringwell (${manifest.migrations.length} migrations, this one has ${ours.length}); restore it with that version.`,
    );
  manifest.migrations.forEach((m, i) => {
    if (ours[i].hash !== m.hash || ours[i].folderMillis !== m.createdAt)
      throw new BackupError(
        `The backup's migration ${i + 1} differs from this Ringwell's migrations/; restore it with the version that wrote it (${manifest.appVersion}).`,
      );
  });

  fs.mkdirSync(target, { recursive: true });
  const staging = fs.mkdtempSync(path.join(path.dirname(target), `.${path.basename(target)}.restoring-`));
  const folder = partialMigrationsFolder(manifest.migrations.length);
  try {
    // 1. The schema as it was, then the data, in one transaction with the foreign keys checked.
    const lock = lockDataDir(staging);
    try {
      const pg = new PGlite(path.join(staging, 'pg'));
      try {
        await pg.waitReady;
        await migrate(drizzle(pg), { migrationsFolder: folder });
        await loadData(pg, manifest, dump);
      } finally {
        await pg.close();
      }
    } finally {
      lock.release();
    }
    const uploadsDir = path.join(staging, UPLOADS);
    fs.mkdirSync(uploadsDir, { recursive: true });
    for (const [name, data] of files) fs.writeFileSync(path.join(uploadsDir, name), data, { mode: 0o600 });

    // 2. Open it the way the server does (newer migrations apply here) and verify.
    const verified = await verifyDataDir(staging, manifest);

    // 3. Move into place.
    for (const entry of fs.readdirSync(staging)) fs.renameSync(path.join(staging, entry), path.join(target, entry));
    return {
      dataDir: target,
      tables: Object.fromEntries(Object.entries(manifest.tables).map(([name, t]) => [name, t.rows])),
      revisionsVerified: verified.revisions,
      filesVerified: verified.files,
      migrationsApplied: manifest.migrations.length,
      migrationsAddedAfter: ours.length - manifest.migrations.length,
    };
  } catch (error) {
    // Leave the target as it was found: empty.
    for (const entry of fs.existsSync(target) ? fs.readdirSync(target) : [])
      fs.rmSync(path.join(target, entry), { recursive: true, force: true });
    throw error;
  } finally {
    fs.rmSync(staging, { recursive: true, force: true });
    fs.rmSync(folder, { recursive: true, force: true });
  }
}

async function loadData(pg: PGlite, manifest: BackupManifest, dump: ReturnType<typeof parseDump>): Promise<void> {
  const tables = await listTables(pg);
  const byName = new Map(tables.map((t) => [t.name, t]));
  const inDump = new Set(dump.blocks.map((b) => b.table));
  const missing = tables.filter((t) => !inDump.has(t.name)).map((t) => t.name);
  if (missing.length) throw new BackupError(`${SQL_FILE} has no data for the tables ${missing.join(', ')}.`);
  await pg.transaction(async (tx) => {
    for (const setting of dump.settings) await tx.exec(setting.replace(/^SET /, 'SET LOCAL '));
    for (const block of dump.blocks) {
      const table = byName.get(block.table);
      if (!table) throw new BackupError(`${SQL_FILE} has data for a table this schema does not have: ${block.table}.`);
      if (table.columns.join(',') !== block.columns.join(','))
        throw new BackupError(
          `${SQL_FILE}: the columns of ${block.table} do not match the schema (${block.columns.join(', ')}).`,
        );
      const expected = manifest.tables[block.table];
      if (!expected || hashOf(block.data) !== expected.sha256)
        throw new BackupError(`${SQL_FILE}: the data of ${block.table} does not match the manifest.`);
      try {
        await tx.query(`COPY "public".${quote(table.name)} (${table.columns.map(quote).join(', ')}) FROM '/dev/blob'`, [], {
          blob: new Blob([new Uint8Array(block.data)]),
        });
      } catch (error) {
        throw new BackupError(`Loading ${block.table} failed: ${(error as Error).message}`);
      }
      // Read it back: the same rows, byte for byte, in the same order.
      const again = await copyOut(tx, table);
      const [{ n }] = (await tx.query<{ n: number }>(`select count(*)::int as n from "public".${quote(table.name)}`)).rows;
      if (n !== expected.rows) throw new BackupError(`${block.table}: ${n} rows loaded, the manifest says ${expected.rows}.`);
      if (hashOf(again) !== expected.sha256) throw new BackupError(`${block.table}: the rows read back differ from the backup.`);
    }
    for (const { name, value, called } of dump.setvals) {
      if (!manifest.sequences[name]) throw new BackupError(`${SQL_FILE} sets a sequence the manifest does not list: ${name}.`);
      await tx.query(`select pg_catalog.setval($1, $2::bigint, $3)`, [`"public".${quote(name)}`, value, called]);
    }
  });
}

/** Opens a data directory with openDatabase and checks it against the manifest. */
async function verifyDataDir(dataDir: string, manifest: BackupManifest): Promise<{ revisions: number; files: number }> {
  const handle = await openDatabase({ dataDir });
  try {
    for (const [name, table] of Object.entries(manifest.tables)) {
      const [{ n }] = (await handle.pg.query<{ n: number }>(`select count(*)::int as n from "public".${quote(name)}`)).rows;
      if (n !== table.rows) throw new BackupError(`After restore, ${name} has ${n} rows; the manifest says ${table.rows}.`);
    }
    const revisions = await handle.pg.query<{ id: string; design_json: string; sha256: string }>(
      'select id, design_json, sha256 from revisions',
    );
    for (const r of revisions.rows) {
      if (sha256Hex(r.design_json) !== r.sha256 || canonicalJson(JSON.parse(r.design_json)) !== r.design_json)
        throw new BackupError(`Revision ${r.id} does not verify against its SHA-256 after restore.`);
    }
    const approvals = await handle.pg.query<{ id: string }>(
      `select v.id from reviews v join revisions r on r.id = v.revision_id
        where v.approved_sha256 is not null and v.approved_sha256 <> r.sha256`,
    );
    if (approvals.rows.length)
      throw new BackupError(`Review ${approvals.rows[0].id} was approved against a hash its revision does not have.`);
    const captures = await handle.pg.query<{ id: string; stored_as: string; sha256: string; byte_size: number }>(
      'select id, stored_as, sha256, byte_size from bench_captures',
    );
    for (const c of captures.rows) {
      const file = path.join(dataDir, UPLOADS, c.stored_as);
      if (!fs.existsSync(file))
        throw new BackupError(`Capture ${c.id}: its file ${UPLOADS}/${c.stored_as} is not in the backup.`);
      const data = fs.readFileSync(file);
      if (hashOf(data) !== c.sha256 || data.length !== c.byte_size)
        throw new BackupError(`Capture ${c.id}: its file does not match its hash.`);
    }
    const stored = await handle.pg.query<{ id: string; ok: boolean }>(
      `select id, encode(sha256(content), 'hex') = sha256 and length(content) = byte_size as ok from uploads`,
    );
    const bad = stored.rows.find((u) => !u.ok);
    if (bad) throw new BackupError(`Upload ${bad.id}: its stored content does not match its hash.`);
    const files = fs.readdirSync(path.join(dataDir, UPLOADS));
    for (const name of files)
      if (hashOf(fs.readFileSync(path.join(dataDir, UPLOADS, name))) !== name)
        throw new BackupError(`${UPLOADS}/${name} does not match its hash.`);
    return { revisions: revisions.rows.length, files: files.length };
  } finally {
    await handle.close();
  }
}
