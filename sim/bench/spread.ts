/**
 * Spread benchmarks (issue 7): 10 000 closed-form samples ≤ 1 s and 1 000 ODE samples of the
 * stiff-free example (the cargo-bike LC filter with its constant-power load, solved by odex)
 * ≤ 2 s, spread over worker threads (one per core). Medians of a few runs, measured here and
 * printed as they are; the single-thread figures are shown alongside for comparison.
 *
 * `runSpreadBench()` returns the rows for sim/bench/run.ts; `npx tsx sim/bench/spread.ts` runs it alone.
 */
import { availableParallelism } from 'node:os';

import { parseDesign, type DesignInput } from '../design';
import { presets } from '../presets';
import { runSpread, type SpreadOptions, type TolerancesInput } from '../spread';
import { closeSpreadWorkers, runSpreadParallel } from '../spread/parallel';

export interface Row {
  name: string;
  /** Median wall time, seconds. */
  median: number;
  /** Target, seconds (null: shown for comparison only). */
  target: number | null;
  ok: boolean | null;
}

const closedFormDesign: DesignInput = presets.find((p) => p.id === 'dc-link-precharge')!.design;
/** The bleeder keeps the preset off the closed form; without it the series RLC has one. */
const closedFormCase = { ...closedFormDesign, bleeder: undefined };
const closedFormTolerances: TolerancesInput = {
  'source.voltage': { percent: 5 },
  'precharge.resistance': { percent: 5 },
  'capacitor.capacitance': { percent: 20, drift: -20 },
  'capacitor.esr': { percent: 20, drift: 100 },
  'precharge.bypass.delay': { min: '15 ms', max: '25 ms' },
};
const odeCase: DesignInput = presets.find((p) => p.id === 'lc-filter')!.design;
const odeTolerances: TolerancesInput = {
  'source.voltage': { percent: 5 },
  'filter.inductance': { percent: 10 },
  'capacitor.capacitance': { percent: 20, drift: -20 },
  'damping.resistance': { percent: 5 },
  'load.value': { percent: 10 },
};

function median(values: number[]): number {
  const sorted = [...values].sort((a, b) => a - b);
  const mid = Math.floor(sorted.length / 2);
  return sorted.length % 2 ? sorted[mid] : 0.5 * (sorted[mid - 1] + sorted[mid]);
}

async function time(runs: number, body: () => Promise<unknown>): Promise<number> {
  const seconds: number[] = [];
  for (let k = 0; k < runs; k++) {
    const started = performance.now();
    const result = (await body()) as { status?: string; solver?: { used: string } };
    if (result.status !== 'complete') throw new Error('benchmark spread did not complete');
    seconds.push((performance.now() - started) / 1000);
  }
  return median(seconds);
}

function row(name: string, median: number, target: number | null): Row {
  return { name, median, target, ok: target === null ? null : median <= target };
}

export async function runSpreadBench(): Promise<Row[]> {
  const threads = availableParallelism();
  const closed = parseDesign(closedFormCase);
  const ode = parseDesign(odeCase);
  const mc = (samples: number): SpreadOptions => ({ method: 'monte-carlo', samples, seed: 1 });
  const rows: Row[] = [];
  try {
    // Starting the pool (tsx and the engine in each worker) and warming its JIT is paid once per
    // server process; it is timed here once, then the steady state is measured.
    const started = performance.now();
    await runSpreadParallel(closed, closedFormTolerances, mc(2000));
    await runSpreadParallel(ode, odeTolerances, mc(100));
    rows.push(
      row(
        `spread: start ${threads} worker threads and a first run (once per process)`,
        (performance.now() - started) / 1000,
        null,
      ),
    );
    await runSpread(closed, closedFormTolerances, mc(2000));

    const check = await runSpread(closed, closedFormTolerances, mc(10));
    if (check.status !== 'complete' || check.solver.used !== 'closed-form')
      throw new Error('the closed-form case does not use the closed form');
    const odeCheck = await runSpread(ode, odeTolerances, mc(4));
    if (odeCheck.status !== 'complete' || odeCheck.solver.used !== 'engine')
      throw new Error('the ODE case does not use the engine');

    rows.push(
      row(
        `spread: 10 000 closed-form samples, ${threads} workers`,
        await time(5, () => runSpreadParallel(closed, closedFormTolerances, mc(10_000))),
        1,
      ),
    );
    rows.push(
      row(
        'spread: 10 000 closed-form samples, one thread',
        await time(3, () => runSpread(closed, closedFormTolerances, mc(10_000))),
        null,
      ),
    );
    rows.push(
      row(
        `spread: 1 000 ODE samples (lc-filter, odex), ${threads} workers`,
        await time(3, () => runSpreadParallel(ode, odeTolerances, mc(1000))),
        2,
      ),
    );
    rows.push(
      row(
        'spread: 1 000 ODE samples (lc-filter, odex), one thread',
        await time(3, () => runSpread(ode, odeTolerances, mc(1000))),
        null,
      ),
    );
  } finally {
    await closeSpreadWorkers();
  }
  return rows;
}

function printRows(rows: Row[]): void {
  const width = Math.max(...rows.map((r) => r.name.length));
  for (const r of rows) {
    const target = r.target === null ? '—' : `≤ ${r.target} s`;
    const verdict = r.ok === null ? '' : r.ok ? 'ok' : 'SLOW';
    console.log(`${r.name.padEnd(width)}  ${r.median.toFixed(3).padStart(7)} s  ${target.padEnd(7)}  ${verdict}`);
  }
}

if (require.main === module) {
  runSpreadBench().then(printRows, (error) => {
    console.error(error);
    process.exitCode = 1;
  });
}
