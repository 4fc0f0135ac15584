// Analyses on a revision, cached by (revision, kind, options hash). Each kind is one entry in the
// registry: its options schema and how it runs. Kinds the engine cannot do yet are listed as
// unavailable and answer 422 analysis_unavailable; a later version slots them in here.
import { and, eq } from 'drizzle-orm';
import { z } from 'zod';
import { analysisRuns, revisions, type AnalysisJobRow, type AnalysisRunRow, type RevisionRow } from '../../db/schema';
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
  runCheck,
  runSpreadJob,
  snubberOptionsSchema,
  spreadOptionsSchema,
  stabilityOptionsSchema,
  storedOutcome,
  type SpreadRequest,
  type StoredPolicy,
} from './engine';
import { offload } from './offload';
import { cancelJob, enqueueJob, findJob, type JobHooks, type JobRunner } from './jobs';
import { iso } from './shape';

interface AvailableAnalysis {
  available: true;
  options: z.ZodType<Record<string, unknown>>;
  /** Slow kinds run on the engine pool (offload.ts) and return a promise. */
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
      offload('sizePrechargeForDesign', JSON.parse(revision.designJson), options, (revision.policy as StoredPolicy).team),
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
    run: (revision, options) => offload('runStability', JSON.parse(revision.designJson), options),
  },
  snubber: {
    available: true,
    options: snubberOptionsSchema,
    run: (revision, options) =>
      offload('runSnubber', JSON.parse(revision.designJson), options as never, (revision.policy as StoredPolicy).team),
  },
  'mains-sweep': {
    available: true,
    options: mainsSweepOptionsSchema,
    run: (revision, options) => offload('runMainsSweep', JSON.parse(revision.designJson), options),
  },
  'mains-cold-hot': {
    available: true,
    options: mainsColdHotOptionsSchema,
    run: (revision, options) =>
      offload('runMainsColdHot', JSON.parse(revision.designJson), options, (revision.policy as StoredPolicy).team),
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
    // Validated and sized now (bad options answer 400 at once); run by whichever worker takes it.
    const prepared = entry.prepare(revision, options);
    const job = await enqueueJob(ctx.database, {
      teamId: revision.teamId,
      revisionId: revision.id,
      kind,
      options,
      optionsHash,
      total: prepared.total,
      requestedBy: userId,
      audit: { ...audit },
    });
    return { job: await shapeJob(ctx, job) };
  }

  const started = Date.now();
  const result = await entry.run(revision, options);
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
  userId: string | null,
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

/** A background job as the API shows it: progress, and the stored run once it is done. */
export interface JobView {
  id: string;
  revisionId: string;
  kind: string;
  state: AnalysisJobRow['state'];
  done: number;
  total: number;
  createdAt: string;
  result?: AnalysisRun;
  error?: { message: string; fields?: unknown };
}

async function shapeJob(ctx: AppContext, job: AnalysisJobRow): Promise<JobView> {
  let result: AnalysisRun | undefined;
  if (job.state === 'done' && job.runId) {
    const [run] = await ctx.db.select().from(analysisRuns).where(eq(analysisRuns.id, job.runId));
    if (run) result = shapeRun(run, false);
  }
  return {
    id: job.id,
    revisionId: job.revisionId,
    kind: job.kind,
    state: job.state,
    done: job.done,
    total: job.total,
    createdAt: iso(job.createdAt),
    ...(result ? { result } : {}),
    ...(job.error ? { error: job.error as JobView['error'] } : {}),
  };
}

export async function getJobView(ctx: AppContext, teamId: string, id: string): Promise<JobView | null> {
  const job = await findJob(ctx.database, teamId, id);
  return job ? shapeJob(ctx, job) : null;
}

export async function cancelJobView(ctx: AppContext, teamId: string, id: string): Promise<JobView | null> {
  const job = await cancelJob(ctx.database, teamId, id);
  return job ? shapeJob(ctx, job) : null;
}

/** What a worker does with a claimed job: the registry entry's run, then the result stored once. */
export function analysisJobRunner(ctx: AppContext): JobRunner {
  return async (job, hooks: JobHooks) => {
    const entry = analysisRegistry[job.kind];
    if (!entry.available || !('background' in entry)) throw new Error(`analysis kind ${job.kind} does not run in the background`);
    const [revision] = await ctx.db
      .select()
      .from(revisions)
      .where(and(eq(revisions.id, job.revisionId), eq(revisions.teamId, job.teamId)));
    if (!revision) throw new Error(`revision ${job.revisionId} not found`);
    const options = job.options as Record<string, unknown>;
    const started = Date.now();
    const outcome = await entry.prepare(revision, options).run(hooks);
    if (outcome.cancelled) return { cancelled: true };
    const run = await storeRun(
      ctx,
      revision,
      job.kind,
      options,
      job.optionsHash,
      outcome.value,
      Date.now() - started,
      job.requestedBy,
      job.audit as Pick<AuditEntry, 'actor' | 'ip'>,
    );
    return { cancelled: false, runId: run.id };
  };
}
