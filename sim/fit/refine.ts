/**
 * `refineFit`: the chosen design values adjusted until the engine's response matches the capture in
 * the least-squares sense (Levenberg–Marquardt on the logarithms of the values, leastSquares.ts).
 *
 * The comparison points are fixed once: the engine's own output grid over the overlap when the
 * capture is denser than that grid (the capture is interpolated there; the engine's values on its
 * grid are exact), otherwise the capture's samples (the engine's waveform is interpolated there).
 * The run is the design as given, stretched to the end of the capture, with the solvers'
 * cross-checks off (the fit runs the engine dozens of times).
 */
import { channelOf, interpolate, simulatedSeries, type Capture, type CaptureQuantity } from '../capture';
import { parseDesign, type Design, type DesignInput } from '../design';
import { DesignError } from '../errors';
import { simulate } from '../simulate';
import { FitError } from './errors';
import { levenbergMarquardt } from './leastSquares';
import { checkParams, FIT_PARAM_INFO, withValues, type FitParam } from './params';

export interface RefineOptions {
  quantity: CaptureQuantity;
  params: FitParam[];
  /** Starting values (SI); the design's own values for the others. Each must be greater than 0. */
  initial?: Partial<Record<FitParam, number>>;
  /** Seconds added to the capture's time axis before comparing (the alignment). Default 0. */
  offset?: number;
  /** Fit only this window of the (aligned) capture, in seconds on the engine's time axis. */
  start?: number;
  end?: number;
  /**
   * Engine output points inside the fit window. Default 1000. The engine's grid is uniform from
   * t = 0, so a window that starts late gets proportionally more points over the whole run (up to
   * MAX_FIT_RUN_POINTS); for a ring long after t = 0 (a bypass closing after the precharge), a design
   * that starts at the event (initial capacitor voltage, no precharge) fits faster.
   */
  points?: number;
  /** Default 40. */
  maxIterations?: number;
  /** Relative cost reduction below which an accepted step ends the fit. Default 1e−10. */
  tolerance?: number;
}

export interface RefineResult {
  values: Record<FitParam, number>;
  /** RMS of engine − measurement over the comparison points, at the fitted values (V or A). */
  residualRms: number;
  /** The same at the starting values. */
  initialResidualRms: number;
  /** Comparison points used. */
  count: number;
  iterations: number;
  /** Engine runs. */
  evaluations: number;
  converged: boolean;
  reason: 'cost-tolerance' | 'step-tolerance' | 'max-iterations' | 'stalled';
}

/** The comparison set-up shared by refineFit and fitCapture. */
export interface FitProblem {
  design: Design;
  params: FitParam[];
  quantity: CaptureQuantity;
  /** Engine output points over [0, end of the window]. */
  runPoints: number;
  times: Float64Array;
  measured: Float64Array;
}

const DEFAULT_POINTS = 1000;
/** Largest engine grid a fit asks for (each run costs about 20 µs per point here). */
export const MAX_FIT_RUN_POINTS = 50_000;

export function fitProblem(capture: Capture, designInput: DesignInput, options: RefineOptions): FitProblem {
  const channel = channelOf(capture, options.quantity);
  if (!channel) throw new FitError('no-channel', `the capture has no ${options.quantity} channel`, 'quantity');
  const offset = options.offset ?? 0;
  const time = offset === 0 ? capture.time : capture.time.map((t) => t + offset);
  const n = time.length;
  const from = Math.max(0, options.start ?? 0, n ? time[0] : 0);
  const to = Math.min(options.end ?? Infinity, n ? time[n - 1] : 0);
  if (!(to > from)) {
    throw new FitError(
      'no-overlap',
      'the capture does not overlap the run (t ≥ 0) after alignment; check the time offset',
      'offset',
    );
  }
  const points = options.points ?? DEFAULT_POINTS;
  if (!Number.isInteger(points) || points < 10 || points > 20_000) {
    throw new FitError('bad-parameter', 'must be a whole number from 10 to 20 000', 'points');
  }
  const base = parseDesign({ ...designInput, duration: to });
  const params = checkParams(options.params, base);

  const runPoints = Math.min(MAX_FIT_RUN_POINTS, Math.max(points, Math.ceil((points * to) / (to - from))));
  let inside = 0;
  for (let k = 0; k < n; k++) if (time[k] >= from && time[k] <= to) inside++;
  let times: Float64Array;
  let measured: Float64Array;
  if (inside > points) {
    // Dense capture: compare on the engine's grid, where its values are exact.
    const grid: number[] = [];
    for (let k = 0; k < runPoints; k++) {
      const t = (to * k) / (runPoints - 1);
      if (t >= from) grid.push(t);
    }
    times = Float64Array.from(grid);
    measured = interpolate(time, channel.values, times);
  } else {
    const keep: number[] = [];
    for (let k = 0; k < n; k++) if (time[k] >= from && time[k] <= to) keep.push(k);
    times = Float64Array.from(keep, (k) => time[k]);
    measured = Float64Array.from(keep, (k) => channel.values[k]);
  }
  if (times.length < params.length + 2) {
    throw new FitError(
      'too-few-samples',
      `only ${times.length} samples overlap the run; the fit needs more than ${params.length + 1}`,
      'capture',
    );
  }
  return { design: base, params, quantity: options.quantity, runPoints, times, measured };
}

/** Engine − measurement at the comparison points, or null if the engine refuses these values. */
export function fitResiduals(problem: FitProblem, values: Partial<Record<FitParam, number>>): Float64Array | null {
  let waveform;
  try {
    waveform = simulate(withValues(problem.design, values), { points: problem.runPoints, crossCheck: false }).waveform;
  } catch (error) {
    if (error instanceof DesignError) return null;
    throw error;
  }
  const model = interpolate(waveform.t, simulatedSeries(waveform, problem.quantity), problem.times);
  for (let k = 0; k < model.length; k++) model[k] -= problem.measured[k];
  return model;
}

/**
 * Least-squares values of `params` against the capture. Throws FitError for an unusable set-up
 * (no channel, no overlap, a value that cannot be fitted), DesignError for an invalid design.
 */
export function refineFit(capture: Capture, designInput: DesignInput, options: RefineOptions): RefineResult {
  const problem = fitProblem(capture, designInput, options);
  const start = problem.params.map((param) => {
    const value = options.initial?.[param] ?? FIT_PARAM_INFO[param].get(problem.design) ?? NaN;
    if (!(value > 0) || !Number.isFinite(value)) {
      throw new FitError('bad-parameter', `"${param}" needs a starting value greater than 0`, `initial.${param}`);
    }
    return Math.log(value);
  });
  const toValues = (x: number[]) =>
    Object.fromEntries(problem.params.map((param, k) => [param, Math.exp(x[k])])) as Record<FitParam, number>;
  const outcome = levenbergMarquardt((x) => fitResiduals(problem, toValues(x)), start, {
    maxIterations: options.maxIterations ?? 40,
    costTolerance: options.tolerance ?? 1e-10,
    stepTolerance: 1e-9,
    maxStep: 1,
    differenceStep: 1e-6,
  });
  const count = problem.times.length;
  return {
    values: toValues(outcome.x),
    residualRms: Math.sqrt((2 * outcome.cost) / count),
    initialResidualRms: Math.sqrt((2 * outcome.initialCost) / count),
    count,
    iterations: outcome.iterations,
    evaluations: outcome.evaluations,
    converged: outcome.converged,
    reason: outcome.reason,
  };
}
