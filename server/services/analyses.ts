// Analyses on a revision, cached by (revision, kind, options hash). Each kind is one entry in the
// registry: its options schema and how it runs. Kinds the engine cannot do yet are listed as
// unavailable and answer 422 analysis_unavailable; a later version slots them in here.
import { and, eq } from 'drizzle-orm';
import { z } from 'zod';
import { analysisRuns, type AnalysisRunRow, type RevisionRow } from '../../db/schema';
import type { AnalysisKind, AnalysisRun } from '../../lib/contracts/designs';
import type { AppContext } from '../context';
import { HttpError } from '../errors';
import { recordAudit, type AuditEntry } from './audit';
import { canonicalHash } from './canonical';
import {
  engineVersion,
  mainsColdHotOptionsSchema,
  mainsSweepOptionsSchema,
  prepareSpreadForDesign,
  runMainsColdHot,
  runMainsSweep,
  runCheck,
  runSnubber,
  runSpreadJob,
  runStability,
  sizePrechargeForDesign,
  snubberOptionsSchema,
  spreadOptionsSchema,
  stabilityOptionsSchema,
  storedOutcome,
  type SpreadRequest,
  type StoredPolicy,
} from './engine';
import { enqueueJob, type JobHooks, type JobView } from './jobs';
import { iso } from './shape';

interface AvailableAnalysis {
  available: true;
  options: z.ZodType<Record<string, unknown>>;
  run(revision: RevisionRow, options: Record<string, unknown>): unknown;
}
/** Runs in the background (jobs.ts): validated and sized at once, run later. */
interface BackgroundAnalysis {
  available: true;
  background: true;
  options: z.ZodType<Record<string, unknown>>;
  prepare(
    revision: RevisionRow,
    options: Record<string, unknown>,
  ): { total: number; run(hooks: JobHooks): Promise<{ cancelled: true } | { cancelled: false; value: unknown }> };
}
interface UnavailableAnalysis {
  available: false;
  /** Said to the user. */
  reason: string;
}


/** A spread's tolerances: the options' own, else the design file's `tolerances` section. */
function spreadTolerances(revision: RevisionRow, options: Record<string, unknown>): unknown {
  if (options.tolerances !== undefined) return options.tolerances;
  const fromDesign = (JSON.parse(revision.designJson) as { tolerances?: unknown }).tolerances;
  if (fromDesign !== undefined) return fromDesign;
  throw new HttpError(422, 'validation_failed', 'options.tolerances: give the tolerances to spread (the design has none)', [
    { path: 'options.tolerances', message: 'give the tolerances to spread (the design has none)' },
  ]);
}

export const analysisRegistry: Record<AnalysisKind, AvailableAnalysis | BackgroundAnalysis | UnavailableAnalysis> = {
  check: {
    available: true,
    // The check of a revision is judged by the policy stored with it; it takes no options.
    options: z.object({}).strict(),
    run: (revision) => storedOutcome(runCheck(JSON.parse(revision.designJson), (revision.policy as StoredPolicy).team)),
  },
  precharge: {
    available: true,
    // The engine's sizing schema validates these (with the revision's design added).
    options: z.record(z.string(), z.unknown()),
    run: (revision, options) =>
      sizePrechargeForDesign(JSON.parse(revision.designJson), options, (revision.policy as StoredPolicy).team),
  },
  spread: {
    available: true,
    background: true,
    options: spreadOptionsSchema,
    prepare: (revision, options) => {
      const { tolerances: _given, ...rest } = options;
      const request = rest as unknown as SpreadRequest;
      const prepared = prepareSpreadForDesign(
        JSON.parse(revision.designJson),
        spreadTolerances(revision, options),
        request,
        (revision.policy as StoredPolicy).team,
      );
      return {
        total: prepared.total,
        run: async (hooks) => {
          const result = await runSpreadJob(prepared, request, hooks);
          return result.status === 'cancelled' ? { cancelled: true } : { cancelled: false, value: result };
        },
      };
    },
  },
  stability: {
    available: true,
    options: stabilityOptionsSchema,
    run: (revision, options) => runStability(JSON.parse(revision.designJson), options),
  },
  snubber: {
    available: true,
    options: snubberOptionsSchema,
    run: (revision, options) =>
      runSnubber(JSON.parse(revision.designJson), options as never, (revision.policy as StoredPolicy).team),
  },
  'mains-sweep': {
    available: true,
    options: mainsSweepOptionsSchema,
    run: (revision, options) => runMainsSweep(JSON.parse(revision.designJson), options),
  },
  'mains-cold-hot': {
    available: true,
    options: mainsColdHotOptionsSchema,
    run: (revision, options) =>
      runMainsColdHot(JSON.parse(revision.designJson), options, (revision.policy as StoredPolicy).team),
  },
};


export function shapeAnalysisSummary(row: AnalysisRunRow) {
  return {
    id: row.id,
    revisionId: row.revisionId,
    kind: row.kind,
    optionsHash: row.optionsHash,
    options: row.options,
    engineVersion: row.engineVersion,
    durationMs: row.durationMs,
    createdAt: iso(row.createdAt),
  };
}

const shapeRun = (row: AnalysisRunRow, cached: boolean): AnalysisRun => ({
  ...shapeAnalysisSummary(row),
  result: row.result,
  cached,
});

export async function runAnalysis(
  ctx: AppContext,
  revision: RevisionRow,
  kind: AnalysisKind,
  rawOptions: Record<string, unknown>,
  userId: string,
  audit: Pick<AuditEntry, 'actor' | 'ip'>,
): Promise<AnalysisRun | { job: JobView }> {
  const entry = analysisRegistry[kind];
  if (!entry.available) throw new HttpError(422, 'analysis_unavailable', entry.reason, [{ path: 'kind', message: entry.reason }]);
  const parsed = entry.options.safeParse(rawOptions);
  if (!parsed.success) {
    const fields = parsed.error.issues.map((i) => ({ path: ['options', ...i.path.map(String)].join('.'), message: i.message }));
    throw new HttpError(400, 'validation_failed', `${fields[0].path}: ${fields[0].message}`, fields);
  }
  const options = parsed.data;
  const optionsHash = canonicalHash(options);
  const [cached] = await ctx.db
    .select()
    .from(analysisRuns)
    .where(and(eq(analysisRuns.revisionId, revision.id), eq(analysisRuns.kind, kind), eq(analysisRuns.optionsHash, optionsHash)));
  if (cached) return shapeRun(cached, true);

  if ('background' in entry) {
    const prepared = entry.prepare(revision, options);
    const job = enqueueJob({
      teamId: revision.teamId,
      revisionId: revision.id,
      kind,
      optionsHash,
      total: prepared.total,
      run: prepared.run,
      finish: (value, durationMs) => storeRun(ctx, revision, kind, options, optionsHash, value, durationMs, userId, audit),
    });
    return { job };
  }

  const started = Date.now();
  const result = entry.run(revision, options);
  return storeRun(ctx, revision, kind, options, optionsHash, result, Date.now() - started, userId, audit);
}

async function storeRun(
  ctx: AppContext,
  revision: RevisionRow,
  kind: AnalysisKind,
  options: Record<string, unknown>,
  optionsHash: string,
  result: unknown,
  durationMs: number,
  userId: string,
  audit: Pick<AuditEntry, 'actor' | 'ip'>,
): Promise<AnalysisRun> {
  const row = await ctx.db.transaction(async (tx) => {
    const inserted = await tx
      .insert(analysisRuns)
      .values({
        teamId: revision.teamId,
        revisionId: revision.id,
        kind,
        optionsHash,
        options,
        result: result as object,
        engineVersion: engineVersion(),
        durationMs,
        createdBy: userId,
      })
      .onConflictDoNothing()
      .returning();
    if (inserted.length === 0) return null;
    await recordAudit(tx, {
      ...audit,
      action: 'analysis.run',
      teamId: revision.teamId,
      entity: { type: 'analysis', id: inserted[0].id },
      details: { revisionId: revision.id, kind, optionsHash },
    });
    return inserted[0];
  });
  if (row) return shapeRun(row, false);
  // Someone ran the same analysis a moment ago.
  const [existing] = await ctx.db
    .select()
    .from(analysisRuns)
    .where(and(eq(analysisRuns.revisionId, revision.id), eq(analysisRuns.kind, kind), eq(analysisRuns.optionsHash, optionsHash)));
  return shapeRun(existing, true);
}
