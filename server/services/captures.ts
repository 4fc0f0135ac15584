// Bench captures: the original file on disk under <uploadsDir>/<sha256> (written to a temp file and
// renamed, so a half-written file is never visible), the row with its mapping and a decimated copy.
// A file that does not parse stores nothing: no row, no file.
import crypto from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { and, desc, eq } from 'drizzle-orm';
import { benchCaptures, designs, type BenchCaptureRow } from '../../db/schema';
import type { AppContext } from '../context';
import { notFound } from '../errors';
import { decimateForChart, fitDesignToCapture, mapParsed, parseCaptureFile, type FitRequest, type ParseOptions } from './bench';
import { iso, loadUsers, userRef } from './shape';

export interface StoredMapping {
  options: ParseOptions;
  mapping: unknown;
}

export interface NewCapture {
  name: string;
  fileName: string;
  contentType: string;
  bytes: Buffer;
  options: ParseOptions;
  mapping: unknown;
}

function summary(row: BenchCaptureRow, uploadedBy: { id: string; name: string } | null) {
  return {
    id: row.id,
    designId: row.designId,
    name: row.name,
    fileName: row.fileName,
    contentType: row.contentType,
    byteSize: row.byteSize,
    sha256: row.sha256,
    rows: row.rows,
    mapping: row.mapping as StoredMapping,
    uploadedBy,
    createdAt: iso(row.createdAt),
  };
}

/** Writes the bytes to <dir>/<sha256> through a temp file in the same directory; true if written now. */
async function storeFile(dir: string, sha256: string, bytes: Buffer): Promise<boolean> {
  await fs.promises.mkdir(dir, { recursive: true });
  const target = path.join(dir, sha256);
  if (fs.existsSync(target)) return false;
  const temp = path.join(dir, `.${sha256}.${crypto.randomBytes(6).toString('hex')}.tmp`);
  const handle = await fs.promises.open(temp, 'wx', 0o600);
  try {
    await handle.writeFile(bytes);
    await handle.sync();
  } finally {
    await handle.close();
  }
  await fs.promises.rename(temp, target);
  // The rename itself is durable only once the directory entry is on disk.
  const dirHandle = await fs.promises.open(dir, 'r');
  try {
    await dirHandle.sync();
  } finally {
    await dirHandle.close();
  }
  return true;
}

/**
 * Removes temp files that a process killed mid-upload left behind (`.<sha>.<random>.tmp`), older
 * than `olderThanMs` so that an upload in flight on another instance sharing the folder is spared.
 * Run at start; returns the names removed.
 */
export async function sweepStaleUploads(dir: string, olderThanMs = 60 * 60 * 1000, now = Date.now()): Promise<string[]> {
  if (!fs.existsSync(dir)) return [];
  const removed: string[] = [];
  for (const name of await fs.promises.readdir(dir)) {
    if (!/^\.[0-9a-f]{64}\.[0-9a-f]{12}\.tmp$/.test(name)) continue;
    const file = path.join(dir, name);
    const stat = await fs.promises.stat(file).catch(() => null);
    if (!stat || now - stat.mtimeMs < olderThanMs) continue;
    await fs.promises.rm(file, { force: true });
    removed.push(name);
  }
  return removed;
}

export async function createCapture(ctx: AppContext, teamId: string, designId: string, userId: string, input: NewCapture) {
  // Parse and map first: any error is thrown before anything touches the disk or the database.
  const parsed = parseCaptureFile(input.bytes, input.options);
  const capture = mapParsed(parsed, input.mapping);
  const decimated = decimateForChart(capture);
  const sha256 = crypto.createHash('sha256').update(input.bytes).digest('hex');
  const written = await storeFile(ctx.uploadsDir, sha256, input.bytes);
  try {
    const [row] = await ctx.db.transaction(async (tx) =>
      tx
        .insert(benchCaptures)
        .values({
          teamId,
          designId,
          name: input.name || input.fileName,
          fileName: input.fileName,
          contentType: input.contentType,
          byteSize: input.bytes.length,
          sha256,
          storedAs: sha256,
          mapping: { options: input.options, mapping: input.mapping } satisfies StoredMapping,
          rows: parsed.rows,
          decimated,
          uploadedBy: userId,
        })
        .returning(),
    );
    const people = await loadUsers(ctx.db, [userId]);
    return { ...summary(row, userRef(people, userId)), data: decimated };
  } catch (error) {
    if (written) await fs.promises.rm(path.join(ctx.uploadsDir, sha256), { force: true });
    throw error;
  }
}

export async function listCaptures(ctx: AppContext, teamId: string, designId: string) {
  const rows = await ctx.db
    .select()
    .from(benchCaptures)
    .where(and(eq(benchCaptures.teamId, teamId), eq(benchCaptures.designId, designId)))
    .orderBy(desc(benchCaptures.createdAt), desc(benchCaptures.id));
  const people = await loadUsers(
    ctx.db,
    rows.map((r) => r.uploadedBy),
  );
  return { items: rows.map((r) => summary(r, userRef(people, r.uploadedBy))) };
}

async function captureRow(ctx: AppContext, teamId: string, id: string): Promise<BenchCaptureRow> {
  const [row] = await ctx.db
    .select()
    .from(benchCaptures)
    .where(and(eq(benchCaptures.id, id), eq(benchCaptures.teamId, teamId)));
  if (!row) throw notFound('No such capture.');
  return row;
}

export async function getCapture(ctx: AppContext, teamId: string, id: string) {
  const row = await captureRow(ctx, teamId, id);
  const people = await loadUsers(ctx.db, [row.uploadedBy]);
  return { ...summary(row, userRef(people, row.uploadedBy)), data: row.decimated };
}

export async function deleteCapture(ctx: AppContext, teamId: string, id: string): Promise<void> {
  const row = await captureRow(ctx, teamId, id);
  await ctx.db.delete(benchCaptures).where(eq(benchCaptures.id, row.id));
  // The file goes when no other capture has the same bytes.
  const [other] = await ctx.db.select({ id: benchCaptures.id }).from(benchCaptures).where(eq(benchCaptures.sha256, row.sha256)).limit(1);
  if (!other) await fs.promises.rm(path.join(ctx.uploadsDir, row.storedAs), { force: true });
}

/** Re-reads the original file (full resolution) and fits the design's current draft to it. */
export async function fitStoredCapture(ctx: AppContext, teamId: string, id: string, request: FitRequest) {
  const row = await captureRow(ctx, teamId, id);
  const [design] = await ctx.db.select({ draft: designs.draft }).from(designs).where(and(eq(designs.id, row.designId), eq(designs.teamId, teamId)));
  if (!design) throw notFound('No such capture.');
  const stored = row.mapping as StoredMapping;
  const bytes = await fs.promises.readFile(path.join(ctx.uploadsDir, row.storedAs));
  const capture = mapParsed(parseCaptureFile(bytes, stored.options), stored.mapping);
  return fitDesignToCapture(capture, design.draft, request);
}
