// Background analysis jobs (the tolerance spread). Kept in memory: a queue run one job at a time
// (the spread itself spreads over worker threads), with progress, cancel, and the finished result
// handed to the caller's `finish` (which stores it in analysis_runs). Everything the routes need
// goes through this module's functions, so the queue can move into PostgreSQL later without the
// routes changing.
import { randomUUID } from 'node:crypto';

export type JobState = 'queued' | 'running' | 'done' | 'cancelled' | 'failed';

export interface JobHooks {
  onProgress(done: number, total: number): void;
  signal: AbortSignal;
}

export interface JobSpec {
  teamId: string;
  revisionId: string;
  kind: string;
  optionsHash: string;
  /** Samples the run will take (known before it starts). */
  total: number;
  /** Runs the work; resolves 'cancelled' when the signal stopped it. */
  run(hooks: JobHooks): Promise<{ cancelled: true } | { cancelled: false; value: unknown }>;
  /** Stores the finished value; what it returns is the job's result. */
  finish(value: unknown, durationMs: number): Promise<unknown>;
}

export interface JobView {
  id: string;
  revisionId: string;
  kind: string;
  state: JobState;
  done: number;
  total: number;
  createdAt: string;
  result?: unknown;
  error?: { message: string; fields?: unknown };
}

interface Job {
  id: string;
  spec: JobSpec;
  state: JobState;
  done: number;
  total: number;
  createdAt: Date;
  endedAt: Date | null;
  controller: AbortController;
  result?: unknown;
  error?: { message: string; fields?: unknown };
}

/** Finished jobs are kept this long for a poll to read. */
const KEEP_FINISHED_MS = 60 * 60 * 1000;

const jobs = new Map<string, Job>();
const queue: Job[] = [];
let running: Job | null = null;
let log: (message: string, error?: unknown) => void = () => undefined;

export function setJobLog(fn: (message: string, error?: unknown) => void): void {
  log = fn;
}

const view = (job: Job): JobView => ({
  id: job.id,
  revisionId: job.spec.revisionId,
  kind: job.spec.kind,
  state: job.state,
  done: job.done,
  total: job.total,
  createdAt: job.createdAt.toISOString(),
  ...(job.result !== undefined ? { result: job.result } : {}),
  ...(job.error ? { error: job.error } : {}),
});

function prune(now = Date.now()): void {
  for (const [id, job] of jobs) if (job.endedAt && now - job.endedAt.getTime() > KEEP_FINISHED_MS) jobs.delete(id);
}

function end(job: Job, state: JobState): void {
  job.state = state;
  job.endedAt = new Date();
}

async function pump(): Promise<void> {
  if (running) return;
  const job = queue.shift();
  if (!job) return;
  running = job;
  job.state = 'running';
  const started = Date.now();
  try {
    const outcome = await job.spec.run({
      onProgress: (done, total) => {
        job.done = done;
        job.total = total;
      },
      signal: job.controller.signal,
    });
    if (outcome.cancelled || job.controller.signal.aborted) end(job, 'cancelled');
    else {
      job.result = await job.spec.finish(outcome.value, Date.now() - started);
      job.done = job.total;
      end(job, 'done');
    }
  } catch (error) {
    log(`analysis job ${job.id} failed`, error);
    const fields = (error as { fields?: unknown }).fields;
    job.error = { message: error instanceof Error ? error.message : String(error), ...(fields ? { fields } : {}) };
    end(job, 'failed');
  } finally {
    running = null;
    void pump();
  }
}

/** The queued or running job for the same analysis, if any (a second request joins it). */
function sameJob(spec: Pick<JobSpec, 'revisionId' | 'kind' | 'optionsHash'>): Job | undefined {
  for (const job of jobs.values())
    if (
      (job.state === 'queued' || job.state === 'running') &&
      job.spec.revisionId === spec.revisionId &&
      job.spec.kind === spec.kind &&
      job.spec.optionsHash === spec.optionsHash
    )
      return job;
  return undefined;
}

export function enqueueJob(spec: JobSpec): JobView {
  prune();
  const existing = sameJob(spec);
  if (existing) return view(existing);
  const job: Job = {
    id: randomUUID(),
    spec,
    state: 'queued',
    done: 0,
    total: spec.total,
    createdAt: new Date(),
    endedAt: null,
    controller: new AbortController(),
  };
  jobs.set(job.id, job);
  queue.push(job);
  void pump();
  return view(job);
}

/** The job as its team sees it; null for an unknown id or another team's job. */
export function getJob(teamId: string, id: string): JobView | null {
  const job = jobs.get(id);
  return job && job.spec.teamId === teamId ? view(job) : null;
}

/** Cancels a queued or running job (a finished one is left as it is). Null when not found. */
export function cancelJob(teamId: string, id: string): JobView | null {
  const job = jobs.get(id);
  if (!job || job.spec.teamId !== teamId) return null;
  if (job.state === 'queued') {
    queue.splice(queue.indexOf(job), 1);
    end(job, 'cancelled');
  } else if (job.state === 'running') {
    job.controller.abort();
  }
  return view(job);
}

/** Waits for every queued and running job to end (tests and shutdown). Cancels them when asked. */
export async function drainJobs(cancel = false): Promise<void> {
  if (cancel) for (const job of [...queue, ...(running ? [running] : [])]) cancelJob(job.spec.teamId, job.id);
  while (running || queue.length) await new Promise((r) => setTimeout(r, 20));
}
