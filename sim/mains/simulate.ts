/**
 * One check of a mains design: picks the solver path, runs the independent solvers that apply,
 * compares them, and returns metrics, the waveform, the bridge's events and what it did.
 *
 * Paths (README "Solver paths"):
 *  - linear (fixed limiter resistance: a resistor, or an NTC held at its start temperature; no
 *    constant-power load): exact propagation produces the waveform and the metrics; odex on the
 *    engine's right-hand side cross-checks it when its estimated cost fits the budget (skipped, and
 *    said so, on stiff circuits);
 *  - nonlinear (an NTC with its thermal model, or a constant-power load): odex produces everything,
 *    checked against a second odex run at a looser tolerance when affordable; a circuit that would
 *    need more than the evaluation budget is refused with a clear error instead of crawling.
 */
import { DesignError } from '../errors';
import { MAX_POINTS } from '../design';
// One threshold for both engines: a disagreement above it is shown to the user.
import { DISAGREEMENT_WARNING } from '../simulate';
import * as roots from '../solvers/roots';
import * as expmModule from '../solvers/expm';
import { runExact, type ExactCounters } from './exact';
import { assembleMainsMetrics, type MainsMetrics } from './metrics';
import { exactSystem, modelOf, Z_I, Z_N, Z_VC, Z_VD, type MainsModel } from './model';
import { runMainsOde, type OdeCounters } from './ode';
import type { BridgeEvent, MainsRaw, SampleRow } from './record';
import type { MainsDesign } from './schema';

const { smallEigenvalues } = roots;
const { balance } = expmModule;

export const MAINS_ENGINE_VERSION = '1.0.0';

export type MainsSolverName = 'exact' | 'odex' | 'odex-check';

export interface MainsSimulateOptions {
  /** Waveform points on a uniform grid (default: the design's `points`); event and peak instants are added. */
  points?: number;
  /** odex relative tolerance on the nonlinear path (default 1e−10; its self-check runs 100× looser). */
  tolerance?: number;
  /** Run the cross-checks (default true). The angle sweep turns them off. */
  crossCheck?: boolean;
  /** Build the waveform (default true); false returns metrics only, with empty waveform arrays. */
  waveform?: boolean;
}

export interface MainsSolverReport {
  ran: MainsSolverName[];
  waveformFrom: MainsSolverName;
  /** Stiff for an explicit integrator (its cost would be set by stability, not accuracy). */
  stiff: boolean;
  /** Largest difference between solvers, relative to the peak magnitude of vC and of i. */
  maxDisagreement: { vC: number; i: number };
  skipped: { solver: MainsSolverName; reason: string }[];
  counters: { exact?: ExactCounters; odex?: OdeCounters; odexCheck?: OdeCounters; estimatedOdexEvaluations: number };
}

export interface MainsWaveform {
  t: number[];
  vC: number[];
  /** Bus node voltage (across the capacitor and its ESR). */
  v: number[];
  /** DC-side current = the magnitude of the line current, A (≥ 0). */
  i: number[];
  /** Signed current in the line (three-phase: line a), A. */
  lineCurrent: number[];
  /** The rectified source before the diode drops: |v_s| or the largest line-to-line voltage, V. */
  vSource: number[];
  limiterPower: number[];
  /** K; null without an NTC. */
  limiterTemperature: number[] | null;
  conducting: boolean[];
  /** The conducting pair's label at each point, null while the bridge blocks. */
  pair: (string | null)[];
}

export interface MainsResult {
  engineVersion: string;
  metrics: MainsMetrics;
  waveform: MainsWaveform;
  solvers: MainsSolverReport;
  warnings: string[];
  events: BridgeEvent[];
}


/** odex cross-checks the exact path when its estimated cost is below this many evaluations. */
export const CROSS_CHECK_BUDGET = 120_000;
/** Estimated evaluations beyond which the nonlinear path refuses the design up front. */
export const NONLINEAR_EVALUATION_BUDGET = 3_000_000;
const NONLINEAR_STEP_BUDGET = 200_000;
const DEFAULT_TOLERANCE = 1e-10;
/** odex's global error is 10–100× its tolerance: 1e−11 keeps the cross-check well inside 1e−8. */
const CROSS_CHECK_TOLERANCE = 1e-11;

/** Spectral radius and fastest oscillation of the conducting circuit (limiter in, load on). */
export function spectrumOf(model: MainsModel): { rho: number; omega: number; slowest: number } {
  let rho = 0;
  let omega = 0;
  let slowest = Infinity;
  for (const limiterIn of [true, false]) {
    const rows = exactSystem(model, {
      conducting: true,
      pair: 0,
      limiterIn: limiterIn && model.limiter.kind !== 'none',
      loadConnected: model.load !== null,
    });
    const { B } = balance(rows.M, Z_N);
    const active = [model.L > 0 ? Z_I : -1, Z_VC, model.damping ? Z_VD : -1].filter((k) => k >= 0);
    const sub = new Float64Array(active.length * active.length);
    active.forEach((r, a) => active.forEach((c, b) => (sub[a * active.length + b] = B[r * Z_N + c])));
    for (const e of smallEigenvalues(sub, active.length)) {
      const magnitude = Math.hypot(e.re, e.im);
      rho = Math.max(rho, magnitude);
      if (magnitude > 0) slowest = Math.min(slowest, magnitude);
      omega = Math.max(omega, Math.abs(e.im));
    }
  }
  return { rho, omega, slowest };
}

/**
 * Rough cost of an odex run, in evaluations: stability-bound steps (≈ 3 per unit of ρ·t), accuracy
 * steps (≈ 300 per oscillation of the circuit and of the mains) and restarts at the bridge's events
 * (≈ 150 each, four or more per cycle). The engine's coefficients (sim/solvers/ode.ts) plus the
 * restarts; on the designs tried here it was within 0.7–1× of the evaluations odex then took.
 */
export function estimateMainsOdeCost(model: MainsModel): { evaluations: number; stiffness: number } {
  const s = spectrumOf(model);
  const f = model.bridge.omega / (2 * Math.PI);
  const T = model.duration;
  const eventsPerCycle = model.bridge.kind === 'three-phase' ? 12 : 4;
  const evaluations = 3 * s.rho * T + (300 * s.omega * T) / (2 * Math.PI) + 300 * f * T + 150 * eventsPerCycle * f * T + 500;
  return { evaluations, stiffness: Number.isFinite(s.slowest) && s.slowest > 0 ? s.rho / s.slowest : 1 };
}

function sampleTimes(duration: number, points: number): number[] {
  const times: number[] = new Array(points);
  for (let k = 0; k < points; k++) times[k] = (duration * k) / (points - 1);
  times[points - 1] = duration;
  return times;
}

function compareSamples(a: SampleRow[], b: SampleRow[], scale: { vC: number; i: number }): { vC: number; i: number } {
  let vC = 0;
  let i = 0;
  const n = Math.min(a.length, b.length);
  for (let k = 0; k < n; k++) {
    vC = Math.max(vC, Math.abs(a[k].vC - b[k].vC) / scale.vC);
    i = Math.max(i, Math.abs(a[k].i - b[k].i) / scale.i);
  }
  return { vC, i };
}

function compareRaw(a: MainsRaw, b: MainsRaw, scale: { vC: number; i: number }): { vC: number; i: number } {
  const i2 = (raw: MainsRaw) => raw.pieces.reduce((sum, p) => sum + p.i2t, 0);
  const i2a = i2(a);
  return {
    vC:
      Math.max(
        Math.abs(a.peakCapacitorVoltage.value - b.peakCapacitorVoltage.value),
        Math.abs(a.minCapacitorVoltage.value - b.minCapacitorVoltage.value),
        Math.abs(a.finalCapacitorVoltage - b.finalCapacitorVoltage),
      ) / scale.vC,
    i: Math.max(Math.abs(a.peakCurrent.value - b.peakCurrent.value) / scale.i, i2a > 0 ? Math.abs(i2a - i2(b)) / i2a : 0),
  };
}

function scaleOf(raw: MainsRaw): { vC: number; i: number } {
  return {
    vC: Math.max(Math.abs(raw.peakCapacitorVoltage.value), Math.abs(raw.minCapacitorVoltage.value)) || 1,
    i: raw.peakCurrent.value || 1,
  };
}

function maxOf(a: { vC: number; i: number }, b: { vC: number; i: number }) {
  return { vC: Math.max(a.vC, b.vC), i: Math.max(a.i, b.i) };
}

function mergeRows(rows: SampleRow[], extra: SampleRow[]): SampleRow[] {
  const all = [...rows, ...extra].sort((x, y) => x.t - y.t);
  const out: SampleRow[] = [];
  for (const row of all) if (out.length === 0 || out[out.length - 1].t !== row.t) out.push(row);
  return out;
}

function waveformOf(model: MainsModel, rows: SampleRow[]): MainsWaveform {
  const ntc = model.limiter.kind === 'ntc';
  return {
    t: rows.map((r) => r.t),
    vC: rows.map((r) => r.vC),
    v: rows.map((r) => r.v),
    i: rows.map((r) => r.i),
    lineCurrent: rows.map((r) => r.lineCurrent),
    vSource: rows.map((r) => r.vSource),
    limiterPower: rows.map((r) => r.limiterPower),
    limiterTemperature: ntc ? rows.map((r) => r.limiterTemperature) : null,
    conducting: rows.map((r) => r.conducting),
    pair: rows.map((r) => (r.conducting ? model.bridge.pairs[r.pair].label : null)),
  };
}

const emptyWaveform = (): MainsWaveform => ({
  t: [],
  vC: [],
  v: [],
  i: [],
  lineCurrent: [],
  vSource: [],
  limiterPower: [],
  limiterTemperature: null,
  conducting: [],
  pair: [],
});

function checkedPoints(design: MainsDesign, options: MainsSimulateOptions): number {
  const points = options.points ?? design.points;
  if (!Number.isInteger(points) || points < 2 || points > MAX_POINTS) {
    throw new DesignError(`must be a whole number from 2 to ${MAX_POINTS}, got ${String(points)}`, 'points');
  }
  return points;
}

function designWarnings(design: MainsDesign, model: MainsModel): string[] {
  const warnings: string[] = [];
  const f = design.mains.frequency;
  if (f !== 50 && f !== 60) {
    warnings.push(
      `the mains frequency is ${f} Hz: the half-sine-equivalent surge current uses a ${(500 / f).toPrecision(3)} ms half-sine; IFSM is usually rated at 10 ms or 8.3 ms`,
    );
  }
  if (design.duration < 1 / f) warnings.push('the run is shorter than one mains cycle: the worst inrush may lie beyond it');
  if (model.bridge.kind === 'three-phase' && model.L > 0) {
    warnings.push(
      'three-phase commutation is taken as instantaneous: the overlap that the line inductance causes is not modelled',
    );
  }
  if (model.bypassTime !== null && model.bypassTime > design.duration)
    warnings.push('the bypass relay closes after the end of the run');
  return warnings;
}

/** Checks one validated mains design. Throws DesignError only for input it cannot run. */
export function simulateMains(design: MainsDesign, options: MainsSimulateOptions = {}): MainsResult {
  const points = checkedPoints(design, options);
  const tolerance = options.tolerance ?? DEFAULT_TOLERANCE;
  if (!(tolerance > 0 && tolerance < 1e-3)) throw new DesignError('the solver tolerance must be between 0 and 1e-3', 'tolerance');
  const crossCheck = options.crossCheck ?? true;
  const wantWaveform = options.waveform ?? true;
  const model = modelOf(design);
  const times = wantWaveform ? sampleTimes(design.duration, points) : [];
  const warnings = designWarnings(design, model);
  const estimate = estimateMainsOdeCost(model);
  const spectrum = spectrumOf(model);
  const odeBase = { sampleTimes: times, omegaMax: spectrum.omega, rho: spectrum.rho };
  const skipped: MainsSolverReport['skipped'] = [];
  const ran: MainsSolverName[] = [];
  const counters: MainsSolverReport['counters'] = { estimatedOdexEvaluations: Math.round(estimate.evaluations) };
  let disagreement = { vC: 0, i: 0 };
  let raw: MainsRaw;
  let rows: SampleRow[] = [];
  let waveformFrom: MainsSolverName;

  if (model.linear) {
    const exact = runExact(model);
    counters.exact = exact.counters;
    if (!exact.ok || !exact.raw) throw new DesignError(`${exact.failure ?? 'the exact solver failed'}`, 'mains');
    ran.push('exact');
    waveformFrom = 'exact';
    raw = exact.raw;
    if (wantWaveform) {
      const extra = [
        ...raw.events.map((e) => e.time),
        raw.peakCurrent.time,
        raw.peakCapacitorVoltage.time,
        raw.minCapacitorVoltage.time,
        raw.peakBusVoltage.time,
        ...(raw.limiterPeakPower ? [raw.limiterPeakPower.time] : []),
      ].filter((t) => t >= 0 && t <= design.duration);
      const all = [...new Set([...times, ...extra])].sort((a, b) => a - b);
      rows = exact.sample(all);
    }
    if (crossCheck) {
      if (estimate.evaluations <= CROSS_CHECK_BUDGET) {
        const checkTimes = wantWaveform ? times : sampleTimes(design.duration, Math.min(points, 400));
        const ode = runMainsOde(model, {
          ...odeBase,
          sampleTimes: checkTimes,
          relativeTolerance: CROSS_CHECK_TOLERANCE,
          maxSteps: NONLINEAR_STEP_BUDGET,
        });
        counters.odex = ode.counters;
        if (ode.ok && ode.raw) {
          ran.push('odex');
          const scale = scaleOf(raw);
          const reference = wantWaveform ? exact.sample(times) : exact.sample(checkTimes);
          disagreement = maxOf(compareSamples(reference, ode.samples, scale), compareRaw(raw, ode.raw, scale));
        } else {
          skipped.push({ solver: 'odex', reason: ode.failure ?? 'odex did not finish' });
        }
      } else {
        skipped.push({
          solver: 'odex',
          reason: `stiff for an explicit integrator (about ${estimate.evaluations.toPrecision(2)} evaluations); the exact solution needs no steps`,
        });
      }
    }
  } else {
    if (estimate.evaluations > NONLINEAR_EVALUATION_BUDGET) {
      throw new DesignError(
        `too stiff for the nonlinear solver (about ${estimate.evaluations.toPrecision(2)} evaluations): with an NTC thermal model or a constant-power load the line inductance must not be tiny against the loop resistance; raise it, set it to 0, or drop the thermal model`,
        'mains.lineInductance',
      );
    }
    const primary = runMainsOde(model, { ...odeBase, relativeTolerance: tolerance, maxSteps: NONLINEAR_STEP_BUDGET * 5 });
    counters.odex = primary.counters;
    if (!primary.ok || !primary.raw) {
      throw new DesignError(
        `${primary.failure ?? 'the nonlinear solver failed'}: raise the line inductance or set it to 0`,
        'mains.lineInductance',
      );
    }
    ran.push('odex');
    waveformFrom = 'odex';
    raw = primary.raw;
    rows = wantWaveform ? mergeRows(primary.samples, primary.peakRows) : [];
    if (crossCheck && estimate.evaluations <= CROSS_CHECK_BUDGET) {
      const check = runMainsOde(model, {
        ...odeBase,
        relativeTolerance: Math.max(1e-9, tolerance * 100),
        maxSteps: NONLINEAR_STEP_BUDGET,
      });
      counters.odexCheck = check.counters;
      if (check.ok && check.raw) {
        ran.push('odex-check');
        const scale = scaleOf(raw);
        disagreement = maxOf(
          wantWaveform ? compareSamples(primary.samples, check.samples, scale) : { vC: 0, i: 0 },
          compareRaw(raw, check.raw, scale),
        );
      }
    } else if (crossCheck) {
      skipped.push({ solver: 'odex-check', reason: 'a second integration would cost too much on this circuit' });
    }
  }

  if (disagreement.vC > DISAGREEMENT_WARNING || disagreement.i > DISAGREEMENT_WARNING) {
    warnings.push(
      `the solvers disagree by ${disagreement.vC.toExponential(1)} on vC and ${disagreement.i.toExponential(1)} on i (relative to the peaks), more than ${DISAGREEMENT_WARNING}: treat the metrics with care`,
    );
  }
  const metrics = assembleMainsMetrics(design, model, raw);
  const bad = Object.entries(metrics)
    .filter(
      ([, value]) =>
        (typeof value === 'number' && !Number.isFinite(value)) ||
        (value && typeof value === 'object' && 'value' in value && !Number.isFinite((value as { value: number }).value)),
    )
    .map(([key]) => key);
  if (bad.length) warnings.push(`some metrics could not be computed (${bad.join(', ')})`);
  return {
    engineVersion: MAINS_ENGINE_VERSION,
    metrics,
    waveform: wantWaveform ? waveformOf(model, rows) : emptyWaveform(),
    solvers: {
      ran,
      waveformFrom,
      stiff: estimate.stiffness > 1e3 && estimate.evaluations > CROSS_CHECK_BUDGET,
      maxDisagreement: disagreement,
      skipped,
      counters,
    },
    warnings,
    events: raw.events,
  };
}
