// Revisions: immutable saved states of a design. Saving validates the design with the engine,
// stores its canonical JSON and that text's SHA-256, the engine version, the derating policy in
// force and the check's results; the database refuses any later UPDATE or DELETE. A new revision
// supersedes the open review requests of the design's earlier revisions.
import { and, asc, desc, eq, sql } from 'drizzle-orm';
import { analysisRuns, designs, reviews, revisions, type RevisionRow } from '../../db/schema';
import type { Page } from '../../lib/contracts/common';
import type { RevisionDetail, RevisionSummary, VerifyRevisionResponse } from '../../lib/contracts/designs';
import type { AppContext } from '../context';
import { HttpError, notFound } from '../errors';
import { recordAudit, type AuditEntry } from './audit';
import { canonicalHash, canonicalJson, CanonicalJsonError, sha256Hex } from './canonical';
import { teamPolicyOverrides } from './derating';
import { getDesignRow, shapeRevisionSummary } from './designs';
import { engineVersion, runCheck, storedOutcome, type CheckOutcome, type StoredPolicy } from './engine';
import { afterSerialCursor, toPage } from './pagination';
import { loadUsers } from './shape';
import { shapeAnalysisSummary } from './analyses';

type AuditBase = Pick<AuditEntry, 'actor' | 'ip'>;

export const CHECK_OPTIONS_HASH = canonicalHash({});

export async function saveRevision(
  ctx: AppContext,
  teamId: string,
  designId: string,
  authorId: string,
  input: { note: string; design?: unknown },
  audit: AuditBase,
): Promise<RevisionDetail> {
  const { design } = await getDesignRow(ctx.db, teamId, designId);
  const fromBody = input.design !== undefined;
  const designInput = fromBody ? input.design : design.draft;
  const prefix = fromBody ? 'design' : 'draft';
  const teamPolicy = await teamPolicyOverrides(ctx, teamId);
  const check = runCheck(designInput, teamPolicy, { fieldPrefix: prefix });
  let text: string;
  try {
    text = canonicalJson(designInput);
  } catch (error) {
    if (error instanceof CanonicalJsonError) {
      throw new HttpError(422, 'invalid_design', error.message, [
        { path: [prefix, error.path].filter(Boolean).join('.'), message: error.message },
      ]);
    }
    throw error;
  }
  const results = storedOutcome(check);
  const started = Date.now();
  const revisionId = await ctx.db.transaction(async (tx) => {
    // Bumping the count first serialises concurrent saves of one design and gives the sequence.
    const [bumped] = await tx
      .update(designs)
      .set({ revisionCount: sql`${designs.revisionCount} + 1` })
      .where(and(eq(designs.id, designId), eq(designs.teamId, teamId)))
      .returning({ sequence: designs.revisionCount });
    if (!bumped) throw notFound('No such design.');
    const [row] = await tx
      .insert(revisions)
      .values({
        teamId,
        designId,
        sequence: bumped.sequence,
        designJson: text,
        sha256: sha256Hex(text),
        engineVersion: results.engineVersion,
        policy: check.policy,
        results,
        worstStatus: results.worstStatus,
        note: input.note,
        authorId,
      })
      .returning();
    await tx.insert(analysisRuns).values({
      teamId,
      revisionId: row.id,
      kind: 'check',
      optionsHash: CHECK_OPTIONS_HASH,
      options: {},
      result: results,
      engineVersion: results.engineVersion,
      durationMs: Date.now() - started,
      createdBy: authorId,
    });
    const superseded = await tx
      .update(reviews)
      .set({ state: 'superseded', supersededAt: new Date() })
      .where(and(eq(reviews.designId, designId), eq(reviews.state, 'requested')))
      .returning({ id: reviews.id });
    const now = new Date();
    await tx
      .update(designs)
      .set({
        latestRevisionId: row.id,
        status: results.worstStatus,
        reviewState: 'none',
        updatedAt: now,
        // Saving from the working copy leaves it as is; saving a posted design makes that the copy.
        ...(fromBody ? { draft: designInput as object, draftUpdatedAt: now } : {}),
      })
      .where(eq(designs.id, designId));
    await recordAudit(tx, {
      ...audit,
      action: 'revision.saved',
      teamId,
      entity: { type: 'revision', id: row.id },
      details: {
        designId,
        sequence: row.sequence,
        sha256: row.sha256,
        worstStatus: row.worstStatus,
        supersededReviews: superseded.map((r) => r.id),
      },
    });
    return row.id;
  });
  return getRevision(ctx, teamId, revisionId);
}

export async function getRevisionRow(ctx: AppContext, teamId: string, id: string): Promise<RevisionRow> {
  const [row] = await ctx.db
    .select()
    .from(revisions)
    .where(and(eq(revisions.id, id), eq(revisions.teamId, teamId)));
  if (!row) throw notFound('No such revision.');
  return row;
}

export async function getRevision(ctx: AppContext, teamId: string, id: string): Promise<RevisionDetail> {
  const row = await getRevisionRow(ctx, teamId, id);
  const [design] = await ctx.db.select({ latest: designs.latestRevisionId }).from(designs).where(eq(designs.id, row.designId));
  const runs = await ctx.db
    .select()
    .from(analysisRuns)
    .where(eq(analysisRuns.revisionId, id))
    .orderBy(asc(analysisRuns.createdAt), asc(analysisRuns.id));
  const people = await loadUsers(ctx.db, [row.authorId]);
  return {
    ...shapeRevisionSummary(row, people),
    teamId: row.teamId,
    design: JSON.parse(row.designJson),
    canonicalJson: row.designJson,
    policy: row.policy,
    results: row.results as RevisionDetail['results'],
    isLatest: design?.latest === row.id,
    analyses: runs.map(shapeAnalysisSummary),
  };
}

/** Newest first, by sequence number; the cursor is the last sequence seen. */
export async function listRevisions(
  ctx: AppContext,
  teamId: string,
  designId: string,
  query: { limit: number; cursor?: string },
): Promise<Page<RevisionSummary>> {
  await getDesignRow(ctx.db, teamId, designId);
  const rows = await ctx.db
    .select()
    .from(revisions)
    .where(
      and(eq(revisions.designId, designId), eq(revisions.teamId, teamId), afterSerialCursor(query.cursor, revisions.sequence)),
    )
    .orderBy(desc(revisions.sequence))
    .limit(query.limit + 1);
  const people = await loadUsers(
    ctx.db,
    rows.map((r) => r.authorId),
  );
  return toPage(
    rows,
    query.limit,
    (r) => [r.sequence],
    (r) => shapeRevisionSummary(r, people),
  );
}

/** Relative tolerance for "the same number": far below any margin anyone reads, far above noise. */
const SAME_NUMBER = 1e-12;

type Difference = VerifyRevisionResponse['differences'][number];

export function compareJson(stored: unknown, recomputed: unknown, path: string, out: Difference[], max = 50): void {
  if (out.length >= max) return;
  if (typeof stored === 'number' && typeof recomputed === 'number') {
    const scale = Math.max(Math.abs(stored), Math.abs(recomputed));
    if (Math.abs(stored - recomputed) > SAME_NUMBER * scale) out.push({ path, stored, recomputed });
    return;
  }
  if (Array.isArray(stored) && Array.isArray(recomputed)) {
    if (stored.length !== recomputed.length) {
      out.push({ path: `${path}.length`, stored: stored.length, recomputed: recomputed.length });
      return;
    }
    stored.forEach((item, i) => compareJson(item, recomputed[i], `${path}.${i}`, out, max));
    return;
  }
  if (
    stored &&
    recomputed &&
    typeof stored === 'object' &&
    typeof recomputed === 'object' &&
    !Array.isArray(stored) &&
    !Array.isArray(recomputed)
  ) {
    const keys = new Set([...Object.keys(stored), ...Object.keys(recomputed)]);
    for (const key of [...keys].sort())
      compareJson(
        (stored as Record<string, unknown>)[key],
        (recomputed as Record<string, unknown>)[key],
        path ? `${path}.${key}` : key,
        out,
        max,
      );
    return;
  }
  if (stored !== recomputed) out.push({ path, stored: stored ?? null, recomputed: recomputed ?? null });
}

/** Recomputes the hash and the check from the stored canonical text and policy, and compares. */
export async function verifyRevision(ctx: AppContext, teamId: string, id: string): Promise<VerifyRevisionResponse> {
  const row = await getRevisionRow(ctx, teamId, id);
  const stored = row.results as CheckOutcome;
  const hashMatches = sha256Hex(row.designJson) === row.sha256 && canonicalJson(JSON.parse(row.designJson)) === row.designJson;
  const differences: Difference[] = [];
  const currentEngineVersion = engineVersion();
  try {
    const again = storedOutcome(runCheck(JSON.parse(row.designJson), (row.policy as StoredPolicy).team));
    compareJson(stored.metrics, again.metrics, 'metrics', differences);
    compareJson(stored.checks, again.checks, 'checks', differences);
    compareJson(stored.worstStatus, again.worstStatus, 'worstStatus', differences);
  } catch (error) {
    const message = error instanceof Error ? error.message : String(error);
    differences.push({ path: 'design', stored: 'valid', recomputed: message });
  }
  return {
    revisionId: row.id,
    sha256: row.sha256,
    hashMatches,
    reproduced: hashMatches && differences.length === 0,
    storedEngineVersion: row.engineVersion,
    currentEngineVersion,
    differences,
  };
}
