// Property-based fuzzing of the design parser and the engine (issue 10). Every random or hostile
// design either parses and simulates to finite metrics and waveforms, or is refused with a
// DesignError whose issues name a field. Never another exception, never NaN/Infinity, never a case
// that runs longer than CASE_BUDGET_MS. Fixed seeds; FUZZ_RUNS raises the count (npm run fuzz:nightly).
import * as fc from 'fast-check';
import { DesignError, safeParseDesign, simulate, type Design, type SimulationResult } from '@/sim';
import { isPlainObject, junk, legalDesign, mutatedDesign } from './designArbitraries';

const RUNS = Number(process.env.FUZZ_RUNS ?? 1000);
/** Simulating is the slow part (≈ 0.1 s a legal case on a shared core): the normal run does 400
 * legal designs plus 1 000 mutated and 1 000 junk inputs (2 400 cases); FUZZ_RUNS sets all three. */
const LEGAL_RUNS = Number(process.env.FUZZ_RUNS ?? 400);
/** Runaway guard for one case (parse + 200-point simulation), not a speed target: generous, so a
 * loaded machine does not trip it. Sync code cannot be pre-empted, so a true infinite loop would
 * hang the file; this catches runaway-but-finishing cases. The slowest case goes in the tally. */
const CASE_BUDGET_MS = Number(process.env.FUZZ_CASE_BUDGET_MS ?? 30_000);
const seed = (n: number) => Number(process.env.FUZZ_SEED ?? 0) + n;

jest.setTimeout(Math.max(120_000, RUNS * 60));

type Outcome = { kind: 'refused'; paths: string[] } | { kind: 'ran'; result: SimulationResult };

/** Every number anywhere in a value must be finite (nulls allowed). Returns the first bad path. */
function firstNonFinite(value: unknown, path = ''): string | null {
  if (typeof value === 'number') return Number.isFinite(value) ? null : `${path} = ${value}`;
  if (Array.isArray(value)) {
    for (let k = 0; k < value.length; k++) {
      const bad = firstNonFinite(value[k], `${path}[${k}]`);
      if (bad) return bad;
    }
    return null;
  }
  if (value && typeof value === 'object') {
    for (const [key, v] of Object.entries(value)) {
      const bad = firstNonFinite(v, path ? `${path}.${key}` : key);
      if (bad) return bad;
    }
  }
  return null;
}


/** Parses and runs one input; throws (failing the property) on anything but the two good outcomes. */
function runCase(input: unknown): Outcome {
  const started = performance.now();
  const protoKeys = Object.getOwnPropertyNames(Object.prototype).length;
  let outcome: Outcome;
  const parsed = safeParseDesign(input);
  if (!parsed.ok) {
    outcome = { kind: 'refused', paths: parsed.issues.map((i) => i.path) };
    expect(parsed.issues.length).toBeGreaterThan(0);
    for (const issue of parsed.issues) expect(typeof issue.message).toBe('string');
    // Only a non-object root may be refused without naming a field.
    if (isPlainObject(input)) expect(parsed.issues.some((i) => i.path !== '')).toBe(true);
  } else {
    outcome = simulateOrRefuse(parsed.design);
  }
  const elapsed = performance.now() - started;
  tally.slowestMs = Math.max(tally.slowestMs, Math.round(elapsed));
  if (elapsed > CASE_BUDGET_MS) throw new Error(`case took ${elapsed.toFixed(0)} ms (budget ${CASE_BUDGET_MS} ms)`);
  // Prototype-pollution keys in the input must not reach Object.prototype.
  expect(Object.getOwnPropertyNames(Object.prototype).length).toBe(protoKeys);
  expect(({} as Record<string, unknown>).polluted).toBeUndefined();
  return outcome;
}

function simulateOrRefuse(design: Design): Outcome {
  let result: SimulationResult;
  try {
    result = simulate(design, { points: 200 });
  } catch (error) {
    if (error instanceof DesignError) {
      expect(error.issues.length).toBeGreaterThan(0);
      expect(error.issues.some((i) => i.path !== '')).toBe(true);
      return { kind: 'refused', paths: error.issues.map((i) => i.path) };
    }
    throw error;
  }
  const badMetric = firstNonFinite(result.metrics);
  if (badMetric) throw new Error(`non-finite metric ${badMetric}`);
  const badWave = firstNonFinite(result.waveform);
  if (badWave) throw new Error(`non-finite waveform sample ${badWave}`);
  expect(result.waveform.t.length).toBeGreaterThan(1);
  return { kind: 'ran', result };
}

// ---- properties -------------------------------------------------------------------------------

const tally = { legalRan: 0, legalRefused: 0, mutatedRan: 0, mutatedRefused: 0, junkRefused: 0, slowestMs: 0 };
afterAll(() => {
  // The figures docs/reliability.md quotes.
  if (process.env.FUZZ_REPORT) console.log(`fuzz tally (legal ${LEGAL_RUNS}, others ${RUNS}):`, JSON.stringify(tally));
});

describe('design parser and engine under fuzzing', () => {
  it('extreme but legal designs give finite metrics and waveforms, or a DesignError naming a field', () => {
    fc.assert(
      fc.property(legalDesign, (design) => {
        const outcome = runCase(design);
        if (outcome.kind === 'ran') tally.legalRan++;
        else tally.legalRefused++;
      }),
      { seed: seed(1001), numRuns: LEGAL_RUNS },
    );
    // The generator must mostly produce designs the engine runs; otherwise the property is vacuous.
    expect(tally.legalRan).toBeGreaterThan(LEGAL_RUNS * 0.3);
  });

  it('legal designs with hostile fields are refused naming a field, or run finitely', () => {
    fc.assert(
      fc.property(mutatedDesign, (design) => {
        const outcome = runCase(design);
        if (outcome.kind === 'ran') tally.mutatedRan++;
        else tally.mutatedRefused++;
      }),
      { seed: seed(2002), numRuns: RUNS },
    );
    expect(tally.mutatedRefused).toBeGreaterThan(RUNS * 0.5);
  });

  it('arbitrary JSON and hostile values at the root are refused, never crash', () => {
    fc.assert(
      fc.property(junk, (input) => {
        const outcome = runCase(input);
        expect(outcome.kind).toBe('refused');
        tally.junkRefused++;
      }),
      { seed: seed(3003), numRuns: RUNS },
    );
  });

  it('refuses the classic hostile values in a required field, naming that field', () => {
    const base = { source: { voltage: 800, resistance: 0.02 }, capacitor: { capacitance: 1e-3 }, duration: 0.1 };
    for (const bad of ['NaN', 'Infinity', '-Infinity', '1e400', NaN, Infinity, '5 V', {}, [], null, true]) {
      const outcome = runCase({ ...base, capacitor: { capacitance: bad } });
      expect(outcome).toEqual({ kind: 'refused', paths: expect.arrayContaining(['capacitor.capacitance']) });
    }
    const polluted = JSON.parse('{"source":{"voltage":1,"resistance":1},"capacitor":{"capacitance":1},"duration":1,"__proto__":{"polluted":1}}');
    expect(runCase(polluted).kind).toBe('refused');
  });
});
