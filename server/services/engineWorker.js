// Worker-thread entry of the engine pool (offload.ts). Plain CommonJS so that Node starts it the same
// way under the server (tsx) and under Jest (whose Babel transform does not reach worker threads):
// register tsx's CommonJS hook, then load the TypeScript engine service.
require('tsx/cjs');
const { ZodError } = require('zod');
const engine = require('./engine.ts');
const { HttpError } = require('../errors.ts');
const { OFFLOADED } = require('./offloaded.ts');

/** Runs one engine call; errors come back as data, since class identity does not cross threads. */
module.exports = function call({ fn, args }) {
  if (!OFFLOADED.includes(fn)) return { ok: false, error: { kind: 'other', message: `not an offloaded engine call: ${fn}` } };
  try {
    return { ok: true, value: engine[fn](...args) };
  } catch (error) {
    if (error instanceof HttpError)
      return { ok: false, error: { kind: 'http', status: error.status, code: error.code, message: error.message, fields: error.fields } };
    if (error instanceof ZodError) return { ok: false, error: { kind: 'zod', issues: error.issues } };
    return { ok: false, error: { kind: 'other', message: error instanceof Error ? error.message : String(error) } };
  }
};
