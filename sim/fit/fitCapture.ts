/**
 * `fitCapture`: the whole fit of a ringing bench capture in one call.
 *   1. the log-decrement estimate of ζ and fd from the chosen channel (logDecrement.ts);
 *   2. with the design's capacitance, the total series L and R of the ring loop;
 *   3. those totals shared out to the values being fitted: the fitted inductance (or resistance)
 *      takes the total minus the series values the design already has elsewhere in the loop;
 *   4. optionally, the least-squares refinement against the engine from there (refine.ts);
 *   5. `apply`: the fitted values as design sections, ready to merge into the design.
 *
 * The ring is taken as the series loop's (source, filter, ESR) around the main capacitor; a damping
 * branch or a load changes the ring, and then only the refinement (which runs the whole circuit)
 * gives the right values — the estimate is its starting point.
 */
import { captureResidual, channelOf, type Capture, type CaptureQuantity } from '../capture';
import { parseDesign, type Design, type DesignInput } from '../design';
import { simulate } from '../simulate';
import { FitError } from './errors';
import { estimateRinging, inferSeriesRL, type DecrementMode, type RingingEstimate, type SeriesRL } from './logDecrement';
import { checkParams, FIT_PARAM_INFO, withValues, type FitParam } from './params';
import { MAX_FIT_RUN_POINTS, refineFit, type RefineResult } from './refine';

export interface FitCaptureOptions {
  quantity: CaptureQuantity;
  /** Values to fit. Default: source.inductance and source.resistance. */
  params?: FitParam[];
  /** Run the least-squares refinement after the estimate. Default true. */
  refine?: boolean;
  mode?: DecrementMode;
  /** The value the ring settles to (V or A); estimated from the tail when omitted. */
  finalValue?: number;
  offset?: number;
  start?: number;
  end?: number;
  points?: number;
  maxIterations?: number;
}

export interface CaptureFit {
  ringing: RingingEstimate;
  /** Total series L and R of the ring loop from the log decrement and the design's capacitance. */
  series: SeriesRL;
  /** The estimate shared out to the fitted values. */
  estimate: Record<FitParam, number>;
  refined: RefineResult | null;
  /** The refined values when the refinement ran, else the estimate. */
  values: Record<FitParam, number>;
  /** RMS and largest |engine − measurement| at the capture's samples with `values` (V or A). */
  residualRms: number;
  residualMax: number;
  /** The fitted values as whole design sections (the design's other fields kept), to merge in. */
  apply: Partial<DesignInput>;
}

const DEFAULT_PARAMS: FitParam[] = ['source.inductance', 'source.resistance'];

/** Series inductance and resistance of the loop apart from the fitted values. */
function othersInLoop(design: Design, params: FitParam[]): { inductance: number; resistance: number } {
  const loop: [FitParam, 'inductance' | 'resistance'][] = [
    ['source.inductance', 'inductance'],
    ['filter.inductance', 'inductance'],
    ['source.resistance', 'resistance'],
    ['filter.resistance', 'resistance'],
    ['capacitor.esr', 'resistance'],
  ];
  const others = { inductance: 0, resistance: 0 };
  for (const [param, kind] of loop) if (!params.includes(param)) others[kind] += FIT_PARAM_INFO[param].get(design) ?? 0;
  return others;
}

/** Shares the loop totals out: the first fitted inductance (resistance) takes what is not elsewhere. */
function shareOut(design: Design, params: FitParam[], series: SeriesRL): Record<FitParam, number> {
  const others = othersInLoop(design, params);
  const estimate = {} as Record<FitParam, number>;
  const used = { inductance: false, resistance: false };
  for (const param of params) {
    const current = FIT_PARAM_INFO[param].get(design) ?? 0;
    const kind = FIT_PARAM_INFO[param].series;
    let value = current;
    if (kind && !used[kind]) {
      used[kind] = true;
      const rest = series[kind] - others[kind];
      // When the design's other values already exceed the measured total, keep a tenth of the total
      // as the start rather than a non-positive value.
      value = rest > 0 ? rest : 0.1 * series[kind];
    }
    if (!(value > 0)) value = kind ? 0.1 * series[kind] : value;
    estimate[param] = value;
  }
  return estimate;
}

function applyOf(designInput: DesignInput, values: Partial<Record<FitParam, number>>): Partial<DesignInput> {
  const apply: Record<string, Record<string, unknown>> = {};
  const sections = designInput as unknown as Record<string, Record<string, unknown> | null | undefined>;
  for (const [param, value] of Object.entries(values)) {
    const [section, field] = param.split('.');
    apply[section] = { ...(apply[section] ?? sections[section] ?? {}), [field]: value };
  }
  return apply as Partial<DesignInput>;
}

export function fitCapture(capture: Capture, designInput: DesignInput, options: FitCaptureOptions): CaptureFit {
  const channel = channelOf(capture, options.quantity);
  if (!channel) throw new FitError('no-channel', `the capture has no ${options.quantity} channel`, 'quantity');
  const offset = options.offset ?? 0;
  const design = parseDesign(designInput);
  const params = checkParams(options.params ?? DEFAULT_PARAMS, design);
  const time = offset === 0 ? capture.time : capture.time.map((t) => t + offset);

  const ringing = estimateRinging(time, channel.values, {
    mode: options.mode,
    finalValue: options.finalValue,
    start: Math.max(0, options.start ?? 0),
    end: options.end,
  });
  const series = inferSeriesRL({ zeta: ringing.zeta, fn: ringing.fn, capacitance: design.capacitor.capacitance });
  const estimate = shareOut(design, params, series);

  const refined =
    options.refine === false
      ? null
      : refineFit(capture, designInput, {
          quantity: options.quantity,
          params,
          initial: estimate,
          offset,
          start: options.start,
          end: options.end,
          points: options.points,
          maxIterations: options.maxIterations,
        });
  const values = refined ? refined.values : estimate;

  // The residual at the capture's own samples, with an engine grid fine enough over the capture.
  const end = Math.min(time[time.length - 1], options.end ?? Infinity);
  const from = Math.max(0, time[0], options.start ?? 0);
  const duration = end > 0 ? end : design.duration;
  const perWindow = Math.max(options.points ?? 1000, 4000);
  const points = end > from ? Math.min(MAX_FIT_RUN_POINTS, Math.ceil((perWindow * end) / (end - from))) : perWindow;
  const run = parseDesign({ ...designInput, duration });
  const waveform = simulate(withValues(run, values), { points, crossCheck: false }).waveform;
  const residual = captureResidual(capture, waveform, options.quantity, offset);
  return {
    ringing,
    series,
    estimate,
    refined,
    values,
    residualRms: residual.rms,
    residualMax: residual.max,
    apply: applyOf(designInput, values),
  };
}
