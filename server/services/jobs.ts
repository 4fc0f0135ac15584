// Background analysis jobs (the tolerance spread), kept in the database table analysis_jobs.
// Every server process runs one worker: it claims the oldest queued job with
// `FOR UPDATE SKIP LOCKED` (so several processes on one PostgreSQL server split the work and no
// job is taken twice), runs it, writes progress and a heartbeat while it runs, and reads the
// cancel flag at the same moment. A job whose worker died (no heartbeat for STALE_AFTER_S) goes
// back to the queue, up to MAX_ATTEMPTS; the result is stored under a unique key, so a re-run
// never files it twice. What a job kind does is the caller's `runner` (server/services/analyses.ts).
import os from 'node:os';
import { randomBytes } from 'node:crypto';
import { and, desc, eq, inArray } from 'drizzle-orm';
import type { DatabaseHandle } from '../../db/client';
import { analysisJobs, type AnalysisJobRow } from '../../db/schema';

export type JobState = AnalysisJobRow['state'];

export interface JobHooks {
  onProgress(done: number, total: number): void;
  signal: AbortSignal;
}

export type JobOutcome = { cancelled: true } | { cancelled: false; runId: string };

/** Runs one claimed job to its end; throws on failure. */
export type JobRunner = (job: AnalysisJobRow, hooks: JobHooks) => Promise<JobOutcome>;

export interface NewJob {
  teamId: string;
  revisionId: string;
  kind: AnalysisJobRow['kind'];
  options: Record<string, unknown>;
  optionsHash: string;
  /** Samples the run will take (known before it starts). */
  total: number;
  requestedBy: string;
  audit: Record<string, unknown>;
}

/** How often a running job writes progress and reads its cancel flag. */
const HEARTBEAT_MS = 250;
/** A running job without a heartbeat for this long is taken to have lost its worker (default). */
const STALE_AFTER_S = 60;
const MAX_ATTEMPTS = 3;
const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

const ACTIVE: JobState[] = ['queued', 'running'];

/**
 * Queues a job, or returns the queued or running job for the same analysis (a second request joins
 * it). The partial unique index analysis_jobs_active_unique decides between two racing requests.
 */
export async function enqueueJob(database: DatabaseHandle, job: NewJob): Promise<AnalysisJobRow> {
  for (let attempt = 0; attempt < 3; attempt++) {
    const [inserted] = await database.db
      .insert(analysisJobs)
      .values({ ...job, state: 'queued' })
      .onConflictDoNothing()
      .returning();
    if (inserted) {
      for (const worker of workers) if (worker.database === database) worker.kick();
      return inserted;
    }
    const [active] = await database.db
      .select()
      .from(analysisJobs)
      .where(
        and(
          eq(analysisJobs.revisionId, job.revisionId),
          eq(analysisJobs.kind, job.kind),
          eq(analysisJobs.optionsHash, job.optionsHash),
          inArray(analysisJobs.state, ACTIVE),
        ),
      )
      .orderBy(desc(analysisJobs.createdAt))
      .limit(1);
    if (active) return active;
    // The active one ended between the two statements: try again.
  }
  throw new Error('could not queue the analysis job');
}

/** The job as its team sees it; null for an unknown id or another team's job. */
export async function findJob(database: DatabaseHandle, teamId: string, id: string): Promise<AnalysisJobRow | null> {
  if (!UUID.test(id)) return null;
  const [row] = await database.db
    .select()
    .from(analysisJobs)
    .where(and(eq(analysisJobs.id, id), eq(analysisJobs.teamId, teamId)));
  return row ?? null;
}

/** Cancels a queued job at once, and asks a running one to stop. Null when not found. */
export async function cancelJob(database: DatabaseHandle, teamId: string, id: string): Promise<AnalysisJobRow | null> {
  const job = await findJob(database, teamId, id);
  if (!job) return null;
  const [queued] = await database.db
    .update(analysisJobs)
    .set({ state: 'cancelled', endedAt: new Date(), cancelRequested: true })
    .where(and(eq(analysisJobs.id, id), eq(analysisJobs.state, 'queued')))
    .returning();
  if (queued) return queued;
  const [running] = await database.db
    .update(analysisJobs)
    .set({ cancelRequested: true })
    .where(and(eq(analysisJobs.id, id), eq(analysisJobs.state, 'running')))
    .returning();
  if (running) for (const worker of workers) if (worker.database === database) worker.checkCancel(id);
  return running ?? (await findJob(database, teamId, id));
}

export interface JobWorker {
  database: DatabaseHandle;
  /** host:pid:random, written on every job it takes. */
  name: string;
  /** Look for work now instead of at the next poll. */
  kick(): void;
  /** Re-read the cancel flag of the running job now. */
  checkCancel(id: string): void;
  /** True while no job of this worker is running. */
  idle(): boolean;
  /** Stops taking jobs; a running job is cancelled and put back in the queue. */
  stop(): Promise<void>;
}

const workers = new Set<JobWorker>();

export interface WorkerOptions {
  database: DatabaseHandle;
  runner: JobRunner;
  log?: (message: string, error?: unknown) => void;
  /** How often an idle worker looks for work. Default 500 ms. */
  pollMs?: number;
  /** A running job without a heartbeat for this long goes back to the queue. Default 60 s. */
  staleAfterS?: number;
  /** Called after each job this worker ends (tests, the worker process). */
  onJobEnded?: (job: AnalysisJobRow) => void;
}

export function startJobWorker(options: WorkerOptions): JobWorker {
  const { database, runner } = options;
  const log = options.log ?? (() => undefined);
  const pollMs = options.pollMs ?? 500;
  const staleAfterS = options.staleAfterS ?? STALE_AFTER_S;
  const name = `${os.hostname()}:${process.pid}:${randomBytes(3).toString('hex')}`;
  let stopped = false;
  let wake: (() => void) | null = null;
  let current: { id: string; controller: AbortController; stopping: boolean } | null = null;
  let loopDone: Promise<void> = Promise.resolve();

  const sleep = () =>
    new Promise<void>((resolve) => {
      const timer = setTimeout(() => {
        wake = null;
        resolve();
      }, pollMs);
      timer.unref?.();
      wake = () => {
        clearTimeout(timer);
        wake = null;
        resolve();
      };
    });

  async function claim(): Promise<AnalysisJobRow | null> {
    // Jobs whose worker vanished go back to the queue (or fail after MAX_ATTEMPTS).
    await database.pg.query(
      `update analysis_jobs set state = case when attempts >= $1 then 'failed'::job_state else 'queued'::job_state end,
         worker = null,
         error = case when attempts >= $1 then '{"message":"the worker running this analysis stopped answering"}'::jsonb else error end,
         ended_at = case when attempts >= $1 then now() else null end
       where state = 'running' and heartbeat_at < now() - make_interval(secs => $2)`,
      [MAX_ATTEMPTS, staleAfterS],
    );
    const claimed = await database.pg.query<{ id: string }>(
      `update analysis_jobs set state = 'running', worker = $1, started_at = now(), heartbeat_at = now(),
         attempts = attempts + 1, done = 0
       where id = (select id from analysis_jobs where state = 'queued' order by created_at, id
                   for update skip locked limit 1)
       returning id`,
      [name],
    );
    const id = claimed.rows[0]?.id;
    if (!id) return null;
    const [row] = await database.db.select().from(analysisJobs).where(eq(analysisJobs.id, id));
    return row ?? null;
  }

  async function beat(id: string, done: number, total: number): Promise<boolean> {
    const result = await database.pg.query<{ cancel_requested: boolean }>(
      `update analysis_jobs set done = $2, total = $3, heartbeat_at = now() where id = $1 and worker = $4
       returning cancel_requested`,
      [id, done, total, name],
    );
    // No row: the job was taken from this worker (it looked dead); stop working on it.
    return result.rows.length === 0 || result.rows[0].cancel_requested;
  }

  async function runOne(job: AnalysisJobRow): Promise<void> {
    const controller = new AbortController();
    current = { id: job.id, controller, stopping: false };
    let done = job.done;
    let total = job.total;
    let beating = false;
    const heartbeat = setInterval(() => {
      if (beating) return;
      beating = true;
      beat(job.id, done, total)
        .then((cancel) => {
          if (cancel) controller.abort();
        })
        .catch(() => undefined)
        .finally(() => {
          beating = false;
        });
    }, HEARTBEAT_MS);
    heartbeat.unref?.();
    const finish = async (set: Partial<AnalysisJobRow>) => {
      const [ended] = await database.db
        .update(analysisJobs)
        .set({ ...set, endedAt: new Date() })
        .where(and(eq(analysisJobs.id, job.id), eq(analysisJobs.worker, name), eq(analysisJobs.state, 'running')))
        .returning();
      if (ended) options.onJobEnded?.(ended);
    };
    try {
      const outcome = await runner(job, {
        onProgress: (d, t) => {
          done = d;
          total = t;
        },
        signal: controller.signal,
      });
      clearInterval(heartbeat);
      if (outcome.cancelled || controller.signal.aborted) {
        if (current?.stopping) {
          // This process is stopping: leave the job for another worker.
          await database.db
            .update(analysisJobs)
            .set({ state: 'queued', worker: null, done: 0 })
            .where(and(eq(analysisJobs.id, job.id), eq(analysisJobs.worker, name)));
        } else await finish({ state: 'cancelled' });
      } else await finish({ state: 'done', runId: outcome.runId, done: total, total });
    } catch (error) {
      clearInterval(heartbeat);
      if (database.isClosed()) return;
      log(`analysis job ${job.id} failed`, error);
      const fields = (error as { fields?: unknown }).fields;
      await finish({
        state: 'failed',
        error: { message: error instanceof Error ? error.message : String(error), ...(fields ? { fields } : {}) },
      }).catch(() => undefined);
    } finally {
      clearInterval(heartbeat);
      current = null;
    }
  }

  async function loop(): Promise<void> {
    while (!stopped && !database.isClosed()) {
      let job: AnalysisJobRow | null = null;
      try {
        job = await claim();
      } catch (error) {
        if (stopped || database.isClosed()) return;
        log('the analysis worker could not read the queue', error);
      }
      if (job) await runOne(job);
      else if (!stopped) await sleep();
    }
  }

  const worker: JobWorker = {
    database,
    name,
    kick: () => wake?.(),
    checkCancel: (id) => {
      if (current?.id !== id) return;
      const running = current;
      void beat(id, 0, 0)
        .then((cancel) => {
          if (cancel) running.controller.abort();
        })
        .catch(() => undefined);
    },
    idle: () => current === null,
    stop: async () => {
      stopped = true;
      workers.delete(worker);
      if (current) {
        current.stopping = true;
        current.controller.abort();
      }
      wake?.();
      await loopDone;
    },
  };
  workers.add(worker);
  loopDone = loop();
  return worker;
}

/** Stops the workers of this process (of one database, when given): at shutdown and in tests. */
export async function stopJobWorkers(database?: DatabaseHandle): Promise<void> {
  await Promise.all([...workers].filter((w) => !database || w.database === database).map((w) => w.stop()));
}

/**
 * Waits until no job is queued or running on the databases this process's workers serve (tests
 * and shutdown); cancels them first when asked.
 */
export async function drainJobs(cancel = false): Promise<void> {
  const databases = new Set([...workers].map((w) => w.database));
  for (const database of databases) {
    if (database.isClosed()) continue;
    if (cancel) {
      await database.db
        .update(analysisJobs)
        .set({ state: 'cancelled', endedAt: new Date(), cancelRequested: true })
        .where(eq(analysisJobs.state, 'queued'));
      await database.db.update(analysisJobs).set({ cancelRequested: true }).where(eq(analysisJobs.state, 'running'));
      for (const worker of workers) if (worker.database === database) worker.kick();
    }
    for (;;) {
      if (database.isClosed()) break;
      const [{ n }] = (
        await database.pg.query<{ n: number }>(`select count(*)::int as n from analysis_jobs where state in ('queued', 'running')`)
      ).rows;
      const busy = [...workers].some((w) => w.database === database && !w.idle());
      if (n === 0 && !busy) break;
      for (const worker of workers) if (worker.database === database && cancel) worker.kick();
      await new Promise((r) => setTimeout(r, 25));
    }
  }
}
