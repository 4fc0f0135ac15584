/**
 * One check of a design: picks the solver path, runs the independent solvers that apply, compares
 * them, and returns metrics, the waveform and what it did.
 *
 * Paths (README, "Which path runs"):
 *  - linear circuit (no constant-power load): exact propagation (matrix exponential) produces the
 *    waveform and the metrics; the closed form cross-checks wherever it applies; odex cross-checks
 *    when its estimated cost fits the budget (skipped, and said so, on stiff circuits);
 *  - constant-power load: odex produces everything (events located on its dense output), checked
 *    against a second odex run at a looser tolerance when affordable; a circuit that would need
 *    more than the step budget is refused with a clear error instead of crawling.
 */
import { DesignError, type DesignIssue } from './errors';
import { MAX_POINTS, safeParseDesign, type Design } from './design';
import { assembleMetrics, settleTarget, type Metrics, type RawRun } from './metrics';
import { circuitOf, evaluate } from './model/circuit';
import * as layout from './model/layout';
import { seriesPath, steadyStateVoltage, type Classification } from './model/seriesPath';
import { closedFormStateAt, runClosedForm } from './solvers/closedForm';
import {
  linearStateAt,
  runLinearCircuit,
  sampleLinear,
  type LinearCounters,
  type LinearRun,
  type Samples,
} from './solvers/linear';
import { estimateOdeCost, runOde, type OdeCounters } from './solvers/ode';
import type { PeakRow } from './solvers/collector';

// Plain locals: module-namespace getters are slow in the hot loops.
const { VC, VD } = layout;

export const ENGINE_VERSION = '1.0.0';

export type SolverName = 'exact' | 'closed-form' | 'odex' | 'odex-check';

export interface SimulateOptions {
  /** Waveform points (default: the design's `points`, 2000). */
  points?: number;
  /** odex relative tolerance on the nonlinear path (default 1e−12; its self-check runs 100× looser, ≥ 1e−10). */
  tolerance?: number;
  /** Run the cross-checks (default true). The spread analysis may turn them off. */
  crossCheck?: boolean;
}

export interface PhaseSummary {
  start: number;
  end: number;
  /** "in": the precharge resistor carries the current; "bypassed": the contactor has closed. */
  precharge: 'none' | 'in' | 'bypassed';
  load: 'none' | 'off' | 'on' | 'slide';
  ramping: boolean;
  seriesResistance: number;
  classification: Classification;
}

export interface SolverReport {
  ran: SolverName[];
  waveformFrom: SolverName;
  /** Stiff for an explicit integrator (stability-bound cost dominates). */
  stiff: boolean;
  /** Ratio of the fastest to the slowest eigenvalue magnitude. */
  stiffnessRatio: number;
  /** Largest difference between solvers, relative to the peak magnitude of vC and of i. */
  maxDisagreement: { vC: number; i: number };
  skipped: { solver: SolverName; reason: string }[];
  counters: {
    exact?: LinearCounters;
    odex?: OdeCounters;
    odexCheck?: OdeCounters;
    estimatedOdexEvaluations: number;
  };
}

export interface Waveform {
  t: number[];
  vC: number[];
  v: number[];
  i: number[];
  vD: number[] | null;
  prechargePower: number[];
}

export interface SimulationResult {
  engineVersion: string;
  metrics: Metrics;
  solvers: SolverReport;
  waveform: Waveform;
  warnings: string[];
  phases: PhaseSummary[];
}

/** Above this relative disagreement between solvers the result carries a warning. */
export const DISAGREEMENT_WARNING = 1e-6;
/** The odex cross-check runs when its estimated cost is below this many evaluations. */
export const CROSS_CHECK_BUDGET = 60_000;
/** Estimated evaluations beyond which the nonlinear path refuses the circuit up front. */
export const NONLINEAR_EVALUATION_BUDGET = 3_000_000;
/** A cross-check stops (and is reported as skipped) past this many evaluations. */
const CROSS_CHECK_EVALUATION_CAP = 300_000;
/**
 * odex's global error on these circuits is 10–1000× its tolerance (measured: 1e−10 gave up to
 * 1.4e−7 on a fast inrush over a long run, 1e−12 gave 4e−10). The nonlinear path runs at 1e−12,
 * its self-check 100× looser, the linear cross-check at 1e−11.
 */
const DEFAULT_TOLERANCE = 1e-12;
const CROSS_CHECK_TOLERANCE = 1e-11;
const SELF_CHECK_TOLERANCE = 1e-10;

function sampleTimes(duration: number, points: number): number[] {
  const times: number[] = [];
  for (let k = 0; k < points - 1; k++) times.push((duration * k) / (points - 1));
  times.push(duration);
  return times;
}

/** Cross-checks compare on at most this many of the waveform's grid points. */
const CHECK_POINTS = 2001;

/** Every m-th grid index (and the last), so that the check grid is a subset of the waveform grid. */
function checkIndices(points: number): number[] {
  const stride = Math.max(1, Math.ceil((points - 1) / (CHECK_POINTS - 1)));
  const indices: number[] = [];
  for (let k = 0; k < points; k += stride) indices.push(k);
  if (indices[indices.length - 1] !== points - 1) indices.push(points - 1);
  return indices;
}

function pick(samples: Samples, indices: number[]): Samples {
  const at = (values: number[]) => indices.map((k) => values[k]);
  return {
    t: at(samples.t),
    vC: at(samples.vC),
    v: at(samples.v),
    i: at(samples.i),
    vD: at(samples.vD),
    prechargePower: at(samples.prechargePower),
  };
}

function compare(
  a: Samples,
  b: { t: number[]; vC: number[]; i: number[] },
  scale: { vC: number; i: number },
): { vC: number; i: number } {
  let vC = 0;
  let i = 0;
  const n = Math.min(a.t.length, b.t.length);
  for (let k = 0; k < n; k++) {
    vC = Math.max(vC, Math.abs(a.vC[k] - b.vC[k]) / scale.vC);
    i = Math.max(i, Math.abs(a.i[k] - b.i[k]) / scale.i);
  }
  return { vC, i };
}

function comparePeaks(a: RawRun, b: RawRun, scale: { vC: number; i: number }): { vC: number; i: number } {
  return {
    vC:
      Math.max(
        Math.abs(a.vCMax.value - b.vCMax.value),
        Math.abs(a.vCMin.value - b.vCMin.value),
        Math.abs(a.finalCapacitorVoltage - b.finalCapacitorVoltage),
      ) / scale.vC,
    i: Math.abs(a.iAbsMax.value - b.iAbsMax.value) / scale.i,
  };
}

function scaleOf(raw: RawRun): { vC: number; i: number } {
  return {
    vC: Math.max(Math.abs(raw.vCMax.value), Math.abs(raw.vCMin.value)) || 1,
    i: raw.iAbsMax.value || 1,
  };
}

function maxOf(a: { vC: number; i: number }, b: { vC: number; i: number }) {
  return { vC: Math.max(a.vC, b.vC), i: Math.max(a.i, b.i) };
}

type Row = PeakRow;

/** Inserts rows into time-sorted samples (a row at a grid time is already there and is skipped). */
function insertRows(samples: Samples, rows: Row[]): Samples {
  const sorted = [...rows].sort((x, y) => x.t - y.t);
  const keys = ['t', 'vC', 'v', 'i', 'vD', 'prechargePower'] as const;
  const out: Samples = { t: [], vC: [], v: [], i: [], vD: [], prechargePower: [] };
  let from = 0;
  for (const row of sorted) {
    // First index whose time is ≥ row.t.
    let lo = from;
    let hi = samples.t.length;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (samples.t[mid] < row.t) lo = mid + 1;
      else hi = mid;
    }
    for (const key of keys) for (let k = from; k < lo; k++) out[key].push(samples[key][k]);
    from = lo;
    if (lo < samples.t.length && samples.t[lo] === row.t) continue;
    for (const key of keys) out[key].push(row[key]);
  }
  if (from === 0) return samples;
  for (const key of keys) for (let k = from; k < samples.t.length; k++) out[key].push(samples[key][k]);
  return out;
}

function metricTimes(raw: RawRun): number[] {
  const times = [raw.vCMax.time, raw.vCMin.time, raw.vMax.time, raw.iAbsMax.time];
  if (raw.iAbsMaxAfterBypass) times.push(raw.iAbsMaxAfterBypass.time);
  if (raw.bypassTime !== null) times.push(raw.bypassTime);
  return [...new Set(times.filter((t) => Number.isFinite(t)))];
}

function linearRow(design: Design, run: LinearRun, t: number): Row {
  const circuit = circuitOf(design);
  let phase = run.phases[0];
  for (const p of run.phases) if (t >= p.t0 && p.t1 > p.t0) phase = p;
  const z = linearStateAt(run, t);
  const ev = evaluate(phase.ps.net, t, z, 'off');
  const power = phase.group === 'open' && circuit.prechargeResistance !== null ? circuit.prechargeResistance * ev.i * ev.i : 0;
  return { t, vC: z[VC], v: ev.v, i: ev.i, vD: z[VD], prechargePower: power };
}

function checkedPoints(design: Design, options: SimulateOptions): number {
  const points = options.points ?? design.points;
  if (!Number.isInteger(points) || points < 2 || points > MAX_POINTS) {
    throw new DesignError(`must be a whole number from 2 to ${MAX_POINTS}, got ${String(points)}`, 'points');
  }
  return points;
}

function designWarnings(design: Design): string[] {
  const warnings: string[] = [];
  const inductance = design.source.inductance + (design.filter?.inductance ?? 0);
  if (inductance === 0 && design.initial.inductorCurrent !== 0) {
    warnings.push(
      'there is no series inductance, so the initial inductor current is ignored (the current is set by the resistance)',
    );
  }
  if (design.precharge?.bypass?.when === 'time' && design.precharge.bypass.delay > 0) {
    warnings.push(
      'the bypass closes at its given time; the closing delay applies only to a voltage-triggered bypass and is ignored',
    );
  }
  return warnings;
}

function runWarnings(design: Design, raw: RawRun, steady: number): string[] {
  const warnings: string[] = [];
  const bypass = design.precharge?.bypass;
  if (design.precharge && bypass?.when === 'voltage' && raw.bypassCrossingTime === null) {
    warnings.push(
      `bypass threshold never reached: vC peaks at ${raw.vCMax.value.toPrecision(4)} V, below ${(bypass.fraction * 100).toPrecision(3)} % of the source voltage` +
        (design.load || design.bleeder ? ' (the load or bleeder holds the bus below it)' : ' within the run'),
    );
  } else if (design.precharge && bypass && raw.bypassTime === null) {
    warnings.push('the bypass closes after the end of the run');
  }
  const load = design.load;
  if (load?.kind === 'power' && steady < load.undervoltage) {
    warnings.push("the constant-power load's DC operating point is below its undervoltage threshold");
  }
  return warnings;
}

function phasesOf(
  design: Design,
  segments: {
    start: number;
    end: number;
    bypassClosed: boolean;
    loadConnected: boolean;
    ramping: boolean;
    mode: string | null;
  }[],
): PhaseSummary[] {
  const circuit = circuitOf(design);
  return segments
    .filter((s) => s.end > s.start)
    .map((s) => {
      const r =
        circuit.baseResistance + (!s.bypassClosed && circuit.prechargeResistance !== null ? circuit.prechargeResistance : 0);
      return {
        start: s.start,
        end: s.end,
        precharge: circuit.prechargeResistance === null ? 'none' : s.bypassClosed ? 'bypassed' : 'in',
        load: !design.load
          ? 'none'
          : !s.loadConnected
            ? 'off'
            : design.load.kind === 'power'
              ? ((s.mode ?? 'on') as PhaseSummary['load'])
              : 'on',
        ramping: s.ramping,
        seriesResistance: r,
        classification: seriesPath(r + circuit.esr, circuit.inductance, circuit.capacitance).classification,
      };
    });
}

function finite(metrics: Metrics): string[] {
  const bad: string[] = [];
  for (const [key, value] of Object.entries(metrics)) {
    if (typeof value === 'number' && !Number.isFinite(value)) bad.push(key);
    if (value && typeof value === 'object' && 'value' in value && !Number.isFinite((value as { value: number }).value))
      bad.push(key);
  }
  return bad;
}

/** Checks one validated design. Throws DesignError only for input it cannot run. */
export function simulate(design: Design, options: SimulateOptions = {}): SimulationResult {
  const points = checkedPoints(design, options);
  const tolerance = options.tolerance ?? DEFAULT_TOLERANCE;
  if (!(tolerance > 0 && tolerance < 1e-3)) throw new DesignError('the solver tolerance must be between 0 and 1e-3', 'tolerance');
  const crossCheck = options.crossCheck ?? true;
  const steady = steadyStateVoltage(design);
  const settle = settleTarget(design, steady);
  const watch = settle ? { threshold: settle.target, direction: settle.direction } : null;
  const times = sampleTimes(design.duration, points);
  const indices = checkIndices(points);
  const checkTimes = indices.map((k) => times[k]);
  const warnings = designWarnings(design);
  const estimate = estimateOdeCost(design);
  const stiff = estimate.stiffness > 1e3 && estimate.evaluations > CROSS_CHECK_BUDGET;
  const skipped: SolverReport['skipped'] = [];
  const ran: SolverName[] = [];
  let disagreement = { vC: 0, i: 0 };
  let raw: RawRun;
  let samples: Samples;
  let waveformFrom: SolverName;
  let extraRows: Row[] = [];
  let phases: PhaseSummary[];
  const counters: SolverReport['counters'] = { estimatedOdexEvaluations: Math.round(estimate.evaluations) };
  const isPower = design.load?.kind === 'power' && design.load.value > 0;
  const crossCheckCap = Math.min(CROSS_CHECK_EVALUATION_CAP, Math.max(20_000, 8 * estimate.evaluations));

  if (isPower) {
    if (estimate.evaluations > NONLINEAR_EVALUATION_BUDGET) {
      throw new DesignError(
        `too stiff for the nonlinear solver within the step budget (about ${estimate.evaluations.toPrecision(2)} evaluations): shorten the run, or add series inductance or damping`,
        'load',
      );
    }
    const primary = runOde(design, {
      relativeTolerance: tolerance,
      maxEvaluations: NONLINEAR_EVALUATION_BUDGET,
      settle: watch,
      sampleTimes: times,
    });
    counters.odex = primary.counters;
    if (!primary.ok || !primary.raw) {
      throw new DesignError(
        `${primary.failure ?? 'the nonlinear solver failed'}: shorten the run, or add series inductance or damping`,
        'load',
      );
    }
    ran.push('odex');
    waveformFrom = 'odex';
    raw = primary.raw;
    samples = primary.samples;
    warnings.push(...primary.warnings);
    phases = phasesOf(
      design,
      primary.segments.map((s) => ({ ...s, bypassClosed: s.group !== 'open' })),
    );
    if (crossCheck && estimate.evaluations <= CROSS_CHECK_BUDGET) {
      const check = runOde(design, {
        relativeTolerance: Math.max(SELF_CHECK_TOLERANCE, tolerance * 100),
        maxEvaluations: crossCheckCap,
        settle: watch,
        sampleTimes: checkTimes,
      });
      counters.odexCheck = check.counters;
      if (check.ok && check.raw) {
        ran.push('odex-check');
        const scale = scaleOf(raw);
        disagreement = maxOf(compare(pick(samples, indices), check.samples, scale), comparePeaks(raw, check.raw, scale));
      } else {
        skipped.push({ solver: 'odex-check', reason: check.failure ?? 'the second integration did not finish' });
      }
    } else if (crossCheck) {
      skipped.push({ solver: 'odex-check', reason: 'a second integration would cost too much on this circuit' });
    }
    extraRows = primary.peakRows;
  } else {
    const circuit = circuitOf(design);
    const exact = runLinearCircuit(circuit, { settle: watch });
    counters.exact = exact.counters;
    ran.push('exact');
    waveformFrom = 'exact';
    raw = exact.raw;
    warnings.push(...exact.warnings);
    samples = sampleLinear(exact, times, circuit.prechargeResistance);
    extraRows = metricTimes(raw).map((t) => linearRow(design, exact, t));
    phases = phasesOf(
      design,
      exact.phases.map((p) => ({
        start: p.t0,
        end: p.t1,
        bypassClosed: p.ps.net.config.bypassClosed,
        loadConnected: p.ps.net.config.loadConnected,
        ramping: p.ps.net.config.ramping,
        mode: null,
      })),
    );
    const scale = scaleOf(raw);
    if (crossCheck) {
      const closed = runClosedForm(design, settle);
      if (closed) {
        ran.push('closed-form');
        const states = checkTimes.map((t) => closedFormStateAt(closed, t));
        const cf = { t: checkTimes, vC: states.map((s) => s[1]), i: states.map((s) => s[0]) };
        disagreement = maxOf(
          disagreement,
          maxOf(compare(pick(samples, indices), cf, scale), comparePeaks(raw, closed.raw, scale)),
        );
      } else {
        skipped.push({ solver: 'closed-form', reason: 'no closed form with a damping branch, bleeder, load or source ramp' });
      }
      if (estimate.evaluations <= CROSS_CHECK_BUDGET) {
        const ode = runOde(design, {
          relativeTolerance: Math.max(CROSS_CHECK_TOLERANCE, tolerance),
          maxEvaluations: crossCheckCap,
          settle: watch,
          sampleTimes: checkTimes,
        });
        counters.odex = ode.counters;
        if (ode.ok && ode.raw) {
          ran.push('odex');
          disagreement = maxOf(
            disagreement,
            maxOf(compare(pick(samples, indices), ode.samples, scale), comparePeaks(raw, ode.raw, scale)),
          );
        } else {
          skipped.push({ solver: 'odex', reason: ode.failure ?? 'odex did not finish' });
        }
      } else {
        skipped.push({
          solver: 'odex',
          reason:
            estimate.stiffness > 1e3
              ? `stiff for an explicit integrator (about ${estimate.evaluations.toPrecision(2)} evaluations); the exact solution needs no steps`
              : `too many oscillations in the run for the cross-check budget (about ${estimate.evaluations.toPrecision(2)} evaluations)`,
        });
      }
    }
  }

  if (disagreement.vC > DISAGREEMENT_WARNING || disagreement.i > DISAGREEMENT_WARNING) {
    warnings.push(
      `the solvers disagree by ${disagreement.vC.toExponential(1)} on vC and ${disagreement.i.toExponential(1)} on i (relative to the peaks), more than ${DISAGREEMENT_WARNING}: treat the metrics with care`,
    );
  }
  warnings.push(...runWarnings(design, raw, steady));
  const metrics = assembleMetrics(design, raw);
  const bad = finite(metrics);
  if (bad.length) {
    // Never hand out NaN: this only happens for values far outside any circuit (subnormal or
    // astronomically large parts), so it is reported as input the engine cannot run.
    throw new DesignError(`the engine could not compute ${bad.join(', ')} for these values; check for extreme part values`, '');
  }
  const merged = insertRows(samples, extraRows);
  return {
    engineVersion: ENGINE_VERSION,
    metrics,
    solvers: {
      ran,
      waveformFrom,
      stiff,
      stiffnessRatio: estimate.stiffness,
      maxDisagreement: disagreement,
      skipped,
      counters,
    },
    waveform: {
      t: merged.t,
      vC: merged.vC,
      v: merged.v,
      i: merged.i,
      vD: design.damping ? merged.vD : null,
      prechargePower: merged.prechargePower,
    },
    warnings,
    phases,
  };
}

export type CheckOutcome = { ok: true; design: Design; result: SimulationResult } | { ok: false; issues: DesignIssue[] };

/**
 * The in-browser live check: validate the raw design (as typed in the editor, with units) and run
 * it. Never throws for bad input; the issues name their fields for inline display.
 */
export function checkDesign(input: unknown, options: SimulateOptions = {}): CheckOutcome {
  const parsed = safeParseDesign(input);
  if (!parsed.ok) return parsed;
  try {
    return { ok: true, design: parsed.design, result: simulate(parsed.design, options) };
  } catch (error) {
    if (error instanceof DesignError) return { ok: false, issues: error.issues };
    throw error;
  }
}
