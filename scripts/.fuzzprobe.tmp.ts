import * as fc from 'fast-check';
import fs from 'node:fs';
import { safeParseDesign, simulate } from '../sim';
import { legalDesign, mutatedDesign } from '../tests/hardening/designArbitraries';
const which = process.argv[2] === 'm' ? mutatedDesign : legalDesign;
const samples = fc.sample(which as fc.Arbitrary<unknown>, { seed: Number(process.argv[3] ?? 1001), numRuns: Number(process.argv[4] ?? 100) });
samples.forEach((s: unknown, k: number) => {
  fs.writeSync(1, `${k} ${JSON.stringify(s)}\n`);
  const p = safeParseDesign(s); const t0 = performance.now();
  if (p.ok) { try { simulate(p.design, { points: 200 }); } catch (e) { fs.writeSync(1, `threw ${String(e).slice(0, 80)}\n`); } }
  fs.writeSync(1, `  ${(performance.now() - t0).toFixed(0)} ms\n`);
});
