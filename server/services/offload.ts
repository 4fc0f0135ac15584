// A pool of worker threads (piscina) that runs the slow engine calls listed in offloaded.ts, so a
// sweep or a sizing never blocks the event loop: health checks, sign-ins and single checks keep
// answering while it runs. Results are plain JSON; errors come back as data and are rebuilt here
// (HttpError and ZodError), so the API answers exactly as if the call had run in this thread.
import path from 'node:path';
import { availableParallelism } from 'node:os';
import { Piscina } from 'piscina';
import { ZodError } from 'zod';
import { HttpError } from '../errors';
import type * as engine from './engine';
import type { OffloadedCall } from './offloaded';

type WorkerReply =
  | { ok: true; value: unknown }
  | {
      ok: false;
      error:
        | { kind: 'http'; status: number; code: string; message: string; fields?: HttpError['fields'] }
        | { kind: 'zod'; issues: ZodError['issues'] }
        | { kind: 'other'; message: string };
    };

let pool: Piscina | null = null;

function enginePool(): Piscina {
  pool ??= new Piscina({
    filename: path.join(__dirname, 'engineWorker.js'),
    // One thread per core but one: the main thread keeps a core for the API.
    minThreads: 1,
    maxThreads: Math.max(1, availableParallelism() - 1),
    idleTimeout: 60_000,
  });
  return pool;
}

/** Runs an engine call on the pool and resolves with what it returns (or throws what it threw). */
export async function offload<K extends OffloadedCall>(
  fn: K,
  ...args: Parameters<(typeof engine)[K]>
): Promise<ReturnType<(typeof engine)[K]>> {
  const reply = (await enginePool().run({ fn, args })) as WorkerReply;
  if (reply.ok) return reply.value as ReturnType<(typeof engine)[K]>;
  const error = reply.error;
  if (error.kind === 'http') throw new HttpError(error.status, error.code, error.message, error.fields);
  if (error.kind === 'zod') throw new ZodError(error.issues);
  throw new Error(error.message);
}

/** Ends the pool's threads (shutdown and tests); the next call starts a new pool. */
export async function closeEnginePool(): Promise<void> {
  const current = pool;
  pool = null;
  await current?.destroy();
}
