/**
 * runSpreadParallel: the same spread as runSpread, with the samples spread over worker threads (one
 * per core by default). Node only, and deliberately not exported from sim/index.ts (the app's
 * bundle must not see worker_threads): the server imports it from 'sim/spread/parallel'.
 *
 * Samples are a pure function of (plan, index), so the main thread deals out index ranges of at
 * most 1 % of the run, each worker returns its range's columns, and they are merged by index and
 * summarised exactly as the single-thread run does: the result is identical for the same seed
 * (only `run.elapsedMs` and `run.workers` differ).
 *
 * The workers are kept in a pool between runs (starting one loads tsx and the engine, a few hundred
 * ms) and do not hold the process open while idle; `closeSpreadWorkers()` ends them. Cancelling a
 * run terminates the pool's workers at once (a range in flight cannot be interrupted otherwise);
 * the next run starts fresh ones.
 *
 * Workers load TypeScript through worker.js, which registers tsx's CommonJS hook: that works under
 * tsx (the server) and under Jest, whose Babel transform does not reach worker threads.
 */
import { availableParallelism } from 'node:os';
import path from 'node:path';
import { Worker } from 'node:worker_threads';

import { DesignError } from '../errors';
import { emptyBlock, mergeBlock, type SampleBlock } from './evaluate';
import type { SpreadDesign } from './paths';
import { prepareSpread, progressStep, type SpreadOptions } from './run';
import { summariseSpread, type SpreadResult } from './summary';
import type { Tolerances, TolerancesInput } from './tolerances';
import type { FromWorker, ToWorker } from './workerMain';

export interface ParallelSpreadOptions extends SpreadOptions {
  /** Worker threads, default os.availableParallelism(). */
  workers?: number;
}

const WORKER_ENTRY = path.join(__dirname, 'worker.js');

interface PooledWorker {
  worker: Worker;
  ready: Promise<void>;
}

let pool: PooledWorker[] = [];
let nextJob = 1;
/** Runs in progress; the pool holds the process open only while there are some. */
let activeJobs = 0;

function startWorker(): PooledWorker {
  const worker = new Worker(WORKER_ENTRY);
  worker.unref();
  // A worker that dies leaves the pool; the run it was serving sees it through its own listeners.
  const drop = () => (pool = pool.filter((p) => p.worker !== worker));
  worker.on('error', drop);
  worker.on('exit', drop);
  const ready = new Promise<void>((resolve, reject) => {
    const onMessage = (m: FromWorker) => {
      if (m.type === 'ready') {
        worker.off('error', onError);
        worker.off('message', onMessage);
        resolve();
      }
    };
    const onError = (error: Error) => reject(error);
    worker.on('message', onMessage);
    worker.once('error', onError);
  });
  return { worker, ready };
}

function workersFor(count: number): PooledWorker[] {
  while (pool.length < count) pool.push(startWorker());
  return pool.slice(0, count);
}

/** Ends the pooled worker threads (tests and shutdown). */
export async function closeSpreadWorkers(): Promise<void> {
  const ending = pool;
  pool = [];
  await Promise.all(ending.map((p) => p.worker.terminate()));
}

export async function runSpreadParallel(
  design: SpreadDesign,
  tolerances: Tolerances | TolerancesInput,
  options: ParallelSpreadOptions,
): Promise<SpreadResult> {
  const started = performance.now();
  const { ctx, nominal } = prepareSpread(design, tolerances, options);
  const { total } = ctx.plan;
  const step = progressStep(total);
  const ranges: [number, number][] = [];
  for (let from = 0; from < total; from += step) ranges.push([from, Math.min(total, from + step)]);
  const requested = options.workers ?? availableParallelism();
  if (!Number.isInteger(requested) || requested < 1)
    throw new DesignError('must be a whole number of threads, at least 1', 'workers');
  const threads = Math.min(requested, ranges.length);
  const cancelled = (done: number): SpreadResult => ({
    status: 'cancelled',
    method: ctx.plan.method,
    seed: ctx.plan.method === 'monte-carlo' ? ctx.plan.seed : null,
    done,
    total,
  });
  if (options.signal?.aborted) return cancelled(0);

  const workers = workersFor(threads);
  const job = nextJob++;
  const columns = emptyBlock(ctx, 0, total);
  options.onProgress?.(0, total);

  activeJobs++;
  for (const p of workers) p.worker.ref();
  const outcome = await new Promise<{ done: number; aborted: boolean }>((resolve, reject) => {
    let next = 0;
    let done = 0;
    let finished = false;
    const cleanups: (() => void)[] = [];
    const finish = (aborted: boolean, error?: unknown) => {
      if (finished) return;
      finished = true;
      activeJobs--;
      for (const cleanup of cleanups) cleanup();
      if ((aborted || error) && activeJobs === 0) {
        // A range in flight cannot be interrupted: end these workers (no other run is using them);
        // the next run starts new ones. With other runs on the pool, the range in flight (≤ 1 % of
        // this run) finishes and its reply is ignored.
        pool = pool.filter((p) => !workers.includes(p));
        void Promise.all(workers.map((p) => p.worker.terminate()));
      } else {
        for (const p of workers) p.worker.postMessage({ type: 'end', job } satisfies ToWorker);
      }
      if (activeJobs === 0) for (const p of pool) p.worker.unref();
      if (error) reject(error instanceof Error ? error : new Error(String(error)));
      else resolve({ done, aborted });
    };
    const onAbort = () => finish(true);
    options.signal?.addEventListener('abort', onAbort, { once: true });
    cleanups.push(() => options.signal?.removeEventListener('abort', onAbort));

    const dispatch = (p: PooledWorker) => {
      if (next >= ranges.length) return;
      const [from, to] = ranges[next++];
      p.worker.postMessage({ type: 'range', job, from, to } satisfies ToWorker);
    };
    for (const p of workers) {
      const onMessage = (m: FromWorker) => {
        if (finished || m.type === 'ready' || m.job !== job) return;
        if (m.type === 'error') {
          finish(false, new Error(`spread worker failed: ${m.message}${m.stack ? `\n${m.stack}` : ''}`));
          return;
        }
        mergeBlock(columns, m.block as SampleBlock);
        done += m.block.count;
        try {
          options.onProgress?.(done, total);
        } catch (error) {
          finish(false, error);
          return;
        }
        if (done === total) finish(false);
        else if (!finished) dispatch(p);
      };
      const onError = (error: Error) => finish(false, error);
      const onExit = (code: number) => {
        if (!finished) finish(false, new Error(`spread worker exited with code ${code}`));
      };
      p.worker.on('message', onMessage);
      p.worker.on('error', onError);
      p.worker.on('exit', onExit);
      cleanups.push(() => {
        p.worker.off('message', onMessage);
        p.worker.off('error', onError);
        p.worker.off('exit', onExit);
      });
    }
    Promise.all(workers.map((p) => p.ready)).then(
      () => {
        if (finished) return;
        for (const p of workers) {
          p.worker.postMessage({ type: 'job', job, ctx } satisfies ToWorker);
          dispatch(p);
        }
      },
      (error: Error) => finish(false, error),
    );
  });

  if (outcome.aborted) return cancelled(outcome.done);
  return summariseSpread({ ctx, nominal, columns, run: { elapsedMs: performance.now() - started, workers: threads } });
}
