/**
 * npm run bench — medians of the engine's timings on this machine, printed as a table next to the
 * targets. Not a test: the numbers depend on the machine and on what else it is running.
 */
import { parseDesign, type DesignInput } from '../design';
import { presets } from '../presets';
import { simulate } from '../simulate';
import { closedFormMetrics } from '../solvers/closedForm';

interface Case {
  name: string;
  target: string;
  /** Work per repetition; the reported figure is the median per repetition divided by `per`. */
  run: () => void;
  per: number;
  unit: 'µs' | 'ms';
  repetitions: number;
}

function median(values: number[]): number {
  const sorted = [...values].sort((a, b) => a - b);
  const mid = sorted.length >> 1;
  return sorted.length % 2 ? sorted[mid] : 0.5 * (sorted[mid - 1] + sorted[mid]);
}

function measure(c: Case): { median: number; min: number } {
  for (let k = 0; k < Math.min(20, c.repetitions); k++) c.run(); // warm the JIT
  const times: number[] = [];
  for (let k = 0; k < c.repetitions; k++) {
    const start = performance.now();
    c.run();
    times.push((performance.now() - start) / c.per);
  }
  const scale = c.unit === 'µs' ? 1000 : 1;
  return { median: median(times) * scale, min: Math.min(...times) * scale };
}

const byId = (id: string) => parseDesign(presets.find((p) => p.id === id)?.design as DesignInput);
const hotPlug = byId('hot-plug');
const turnOff = byId('switch-turn-off');
const lcFilter = byId('lc-filter');
const dcLink = byId('dc-link-precharge');
const stiff = parseDesign({
  source: { voltage: 400, resistance: 1, inductance: '10 nH' },
  capacitor: { capacitance: '1 mF' },
  duration: '5 ms',
});
const precharge = parseDesign({
  source: { voltage: 800, resistance: '20 mΩ', inductance: '5 µH' },
  precharge: { resistance: 47, bypass: { fraction: 0.95, delay: '20 ms' } },
  capacitor: { capacitance: '940 µF', esr: '25 mΩ' },
  duration: '300 ms',
});

const cases: Case[] = [
  {
    name: 'closed-form metrics, one circuit (hot-plug)',
    target: '≤ 20 µs',
    run: () => void closedFormMetrics(hotPlug),
    per: 1,
    unit: 'µs',
    repetitions: 20_000,
  },
  {
    name: 'closed-form metrics, precharge + bypass',
    target: '≤ 20 µs',
    run: () => void closedFormMetrics(precharge),
    per: 1,
    unit: 'µs',
    repetitions: 20_000,
  },
  {
    name: '10 000 closed-form evaluations',
    target: '≤ 200 ms',
    run: () => {
      for (let k = 0; k < 10_000; k++) closedFormMetrics(hotPlug);
    },
    per: 1,
    unit: 'ms',
    repetitions: 15,
  },
  {
    name: 'full check, hot-plug (exact + closed form + odex, 2000 pts)',
    target: '≤ 5 ms',
    run: () => void simulate(hotPlug),
    per: 1,
    unit: 'ms',
    repetitions: 60,
  },
  {
    name: 'full check, switch turn-off (exact + odex, 2000 pts)',
    target: '≤ 5 ms',
    run: () => void simulate(turnOff),
    per: 1,
    unit: 'ms',
    repetitions: 60,
  },
  {
    name: 'full check, LC filter + constant power (odex ×2, 2000 pts)',
    target: '—',
    run: () => void simulate(lcFilter),
    per: 1,
    unit: 'ms',
    repetitions: 30,
  },
  {
    name: 'full check, DC link precharge (exact, stiff, 2000 pts)',
    target: '—',
    run: () => void simulate(dcLink),
    per: 1,
    unit: 'ms',
    repetitions: 60,
  },
  {
    name: 'stiff example 1 Ω, 10 nH, 1 mF (2000 pts)',
    target: '≤ 50 ms',
    run: () => void simulate(stiff),
    per: 1,
    unit: 'ms',
    repetitions: 60,
  },
  {
    name: 'check without cross-checks, hot-plug (2 pts)',
    target: '—',
    run: () => void simulate(hotPlug, { points: 2, crossCheck: false }),
    per: 1,
    unit: 'ms',
    repetitions: 200,
  },
];

const rows = cases.map((c) => {
  const { median: m, min } = measure(c);
  return [c.name, `${m.toPrecision(3)} ${c.unit}`, `${min.toPrecision(3)} ${c.unit}`, c.target];
});
const header = ['case', 'median', 'best', 'target'];
const widths = header.map((h, k) => Math.max(h.length, ...rows.map((r) => r[k].length)));
const line = (cells: string[]) => cells.map((cell, k) => cell.padEnd(widths[k])).join('  ');
console.log(line(header));
console.log(widths.map((w) => '-'.repeat(w)).join('  '));
for (const row of rows) console.log(line(row));
