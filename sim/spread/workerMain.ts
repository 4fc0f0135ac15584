/**
 * The worker side of the parallel spread: receives a job's evaluation context once, then runs the
 * sample ranges it is sent and posts each block back (its arrays transferred, not copied).
 * Node only; loaded through worker.js.
 */
import { parentPort } from 'node:worker_threads';

import { evaluateRange, type EvaluationContext, type SampleBlock } from './evaluate';

export type ToWorker =
  | { type: 'job'; job: number; ctx: EvaluationContext }
  | { type: 'range'; job: number; from: number; to: number }
  | { type: 'end'; job: number };

export type FromWorker =
  | { type: 'ready' }
  | { type: 'block'; job: number; block: SampleBlock }
  | { type: 'error'; job: number; message: string; stack?: string };

const port = parentPort;
if (!port) throw new Error('workerMain.ts runs only inside a worker thread (see parallel.ts)');

const jobs = new Map<number, EvaluationContext>();

port.on('message', (message: ToWorker) => {
  if (message.type === 'job') {
    jobs.set(message.job, message.ctx);
  } else if (message.type === 'end') {
    jobs.delete(message.job);
  } else {
    const ctx = jobs.get(message.job);
    try {
      if (!ctx) throw new Error(`no context for spread job ${message.job}`);
      const block = evaluateRange(ctx, message.from, message.to);
      const reply: FromWorker = { type: 'block', job: message.job, block };
      // The block's arrays own fresh ArrayBuffers (never SharedArrayBuffers), so they can move.
      const buffers = [block.metrics, block.checkValues, block.checkMargins, block.checkStatus, block.solver].map(
        (a) => a.buffer as ArrayBuffer,
      );
      port.postMessage(reply, buffers);
    } catch (error) {
      const reply: FromWorker = {
        type: 'error',
        job: message.job,
        message: error instanceof Error ? error.message : String(error),
        stack: error instanceof Error ? error.stack : undefined,
      };
      port.postMessage(reply);
    }
  }
});

port.postMessage({ type: 'ready' } satisfies FromWorker);
