// Worker-thread entry of the parallel spread (parallel.ts). Plain CommonJS so that Node starts it
// the same way under every runner — the server under tsx, the tests under Jest (whose Babel
// transform does not reach worker threads): register tsx's CommonJS hook, then load the TypeScript.
require('tsx/cjs');
require('./workerMain.ts');
