// Precharge resistor sizing: the window of resistance that meets the current and time limits at the
// worst-case corners of the tolerances, the standard (E12/E24) values inside it with first-order
// estimates, and every proposed value re-simulated by the engine beside them.
//
//   current limit:  R ≥ Vmax/Imax                       (peak V/R at t = 0+, REFERENCE §2)
//   time limit:     t_k(R) + t_delay ≤ tmax, at Cmax and whichever bus corner is slower;
//                   no load: R ≤ (tmax − t_delay)/(Cmax·ln(1/(1−k)))   (REFERENCE §2)
//                   with a load: t_k from REFERENCE §2 (generalised in firstOrder.ts), solved for R
//                   by bisection
//   a value fits when both ends of its tolerance band do: R(1−tol) ≥ Rmin and R(1+tol) ≤ Rmax.
// The engine runs each value at the stress corner (Vmax, Cmax): the highest current, power and energy.
import { parseDesign, type Design, type DesignInput } from '../design';
import { DesignError, type DesignIssue } from '../errors';
import type { Metrics } from '../metrics';
import { ratingCheck } from '../ratings/checks';
import { formatPercent } from '../ratings/format';
import { resolvePolicy, type DeratingPolicy } from '../ratings/policy';
import { statusFor, marginPercentOf, type Check } from '../ratings/status';
import { simulate as engineSimulate } from '../simulate';
import { formatEng } from '../units';

import { standardValuesBetween, type ESeriesName } from './eSeries';
import {
  largestResistanceForTime,
  largestResistanceReachingThreshold,
  rcCharge,
  stepChargeI2t,
  stepCurrentPeak,
  voltageAfterThreshold,
  type RcLoad,
} from './firstOrder';
import { parseSizingRequest, type PrechargeSizingInput, type SizingRequest } from './schema';

/** What the sizer needs from the engine's `simulate`. */
export interface SimulationLike {
  metrics: Metrics;
  warnings?: readonly unknown[];
}
export type SimulateFn = (design: Design, options?: { points?: number; crossCheck?: boolean }) => SimulationLike;

/** Simulations per request at most (the API calls the sizer interactively). */
export const MAX_SIMULATIONS = 30;
/** Output points per simulation: the metrics come from the solver, the grid only from the plot. */
const SIMULATION_POINTS = 300;

export interface FirstOrderFigures {
  /** Time from connection to k·V, s, at the slower corner; null when k·V is never reached. */
  thresholdTime: number | null;
  /** thresholdTime + contactor delay: when the bypass closes, s. */
  prechargeTime: number | null;
  /** Vmax/R at t = 0+ (the series inductance only lowers it), A. */
  peakCurrent: number;
  /** Vmax²/R, W. */
  peakPower: number;
  /** Cmax·Vmax²·(k′ − k′²/2) with k′ the fraction at which the contactor closes (k without delay), J. */
  energyPerAttempt: number | null;
  /** attempts × energyPerAttempt: back-to-back, no cooling in between, J. */
  energyForAttempts: number | null;
  /** energyPerAttempt / R, A²s. */
  prechargeI2t: number | null;
  /** Vmax − vC when the contactor closes: (1 − k)·V without delay or load, V. */
  residualStep: number | null;
  /** Peak current when the contactor closes across the residual step (series RLC step), A. */
  bypassInrushPeak: number | null;
  /** ½·Cmax·ΔV²/R_loop (REFERENCE §2), A²s; null without a loop resistance. */
  bypassI2t: number | null;
  /** Vmax²/R for the whole time limit: one attempt into a shorted DC link, J. */
  energyIntoShortPerAttempt: number;
}

export interface SimulatedFigures {
  /** When the engine closed the bypass, s; null if it never did within the run. */
  prechargeTime: number | null;
  peakCurrent: number;
  peakPower: number;
  /** Energy in the precharge resistor, bleeder and load currents included, J. */
  energyPerAttempt: number;
  energyForAttempts: number;
  prechargeI2t: number;
  residualStep: number | null;
  bypassInrushPeak: number | null;
  bypassI2t: number | null;
  peakCapacitorVoltage: number;
  warnings: string[];
}

export interface PrechargeCandidate {
  resistance: number;
  series: ESeriesName;
  estimate: FirstOrderFigures;
  /** The engine's figures at the stress corner; null only if the engine could not run this value. */
  simulated: SimulatedFigures | null;
  simulationError?: string;
  /** R(1−tol)/Rmin and Rmax/(R(1+tol)): how far each limit is, as a ratio ≥ 1. */
  headroom: { current: number; time: number };
  /** The engine's run stays inside the current and time limits (at the nominal R, stress corner). */
  simulatedWithinLimits: boolean | null;
}

export interface ChosenResistorResult {
  resistance: number;
  inWindow: boolean;
  estimate: FirstOrderFigures;
  simulated: SimulatedFigures | null;
  simulationError?: string;
  checks: Check[];
}

export type Binding = 'current' | 'time' | 'both' | 'threshold' | 'delay';

export interface PrechargeSizingResult {
  corners: {
    busVoltage: { nominal: number; min: number; max: number };
    capacitance: { nominal: number; min: number; max: number };
  };
  /** [Rmin, Rmax] before the resistor's own tolerance; null when the limits leave no room. */
  window: { min: number; max: number } | null;
  limits: {
    current: { minResistance: number; explanation: string };
    time: { maxResistance: number | null; explanation: string };
    /** Above this R a load keeps the capacitor below k·V for good; null without a load. */
    threshold: { maxResistance: number | null };
  };
  /**
   * With a fit: the limit the recommended value is nearer to. Without one: 'both' (the limits conflict
   * or leave no standard value), 'threshold' (the load keeps the threshold out of reach), 'delay' (the
   * contactor delay alone uses the time).
   */
  binding: Binding;
  explanation: string;
  candidates: PrechargeCandidate[];
  /** The value with the most room to both limits; null when none fits. */
  recommended: number | null;
  /** Why no value fits, and what to change; null when some do. */
  reason: string | null;
  chosen: ChosenResistorResult | null;
  /** Where the engine ran every value. */
  simulationCorner: { busVoltage: number; capacitance: number };
  simulations: number;
  notes: string[];
}

// ---------------------------------------------------------------------------------------------
// The circuit around the resistor

interface SizingCircuit {
  inductance: number;
  loopResistance: number | null;
  rcLoad: RcLoad;
  /** Words for the load, for messages: "the 2 A load". Null without one. */
  loadWords: string | null;
}

function stripNulls(value: unknown): unknown {
  if (Array.isArray(value)) return value.map(stripNulls);
  if (value && typeof value === 'object') {
    const out: Record<string, unknown> = {};
    for (const [k, v] of Object.entries(value)) if (v !== null && v !== undefined) out[k] = stripNulls(v);
    return out;
  }
  return value;
}

/** The base design in input form (a parsed `Design` is accepted too: its nulls are dropped). */
function baseInput(req: SizingRequest): DesignInput | null {
  if (req.baseDesign === undefined || req.baseDesign === null) return null;
  const input = stripNulls(req.baseDesign) as DesignInput;
  try {
    parseDesign(input);
  } catch (error) {
    if (error instanceof DesignError) {
      const field = req.baseDesignField;
      throw new DesignError(error.issues.map((i) => ({ path: i.path ? `${field}.${i.path}` : field, message: i.message })));
    }
    throw error;
  }
  return input;
}

function circuitFor(req: SizingRequest, base: Design | null, notes: string[]): SizingCircuit {
  const inductance = req.seriesInductance ?? (base ? base.source.inductance + (base.filter?.inductance ?? 0) : 0);
  const loopResistance =
    req.loopResistance ?? (base ? base.source.resistance + (base.filter?.resistance ?? 0) + base.capacitor.esr : null);
  const bleeder = req.bleederResistance ?? base?.bleeder?.resistance ?? null;
  let load = req.load;
  if (!load && base?.load) {
    if (base.load.start > 0)
      notes.push('The base design starts its load after connection; the first-order figures leave it out, the engine does not.');
    else if (base.load.kind === 'power')
      notes.push('The constant-power load is left to the engine; the first-order figures leave it out.');
    else load = { kind: base.load.kind, value: base.load.value };
  }
  const paths = [bleeder, load?.kind === 'resistance' ? load.value : null].filter((r): r is number => r !== null);
  const parallelResistance = paths.length ? 1 / paths.reduce((s, r) => s + 1 / r, 0) : Infinity;
  const loadWords = load
    ? `the ${formatEng(load.value, load.kind === 'resistance' ? 'Ω' : 'A')} load`
    : bleeder !== null
      ? `the ${formatEng(bleeder, 'Ω')} bleeder`
      : null;
  return {
    inductance,
    loopResistance,
    rcLoad: { parallelResistance, loadCurrent: load?.kind === 'current' ? load.value : 0 },
    loadWords,
  };
}

// ---------------------------------------------------------------------------------------------
// First-order figures for one value

function thresholdTimeAt(req: SizingRequest, circuit: SizingCircuit, r: number): number | null {
  const k = req.bypassThreshold;
  const c = req.capacitance.max;
  let worst = 0;
  for (const v of [req.busVoltage.min, req.busVoltage.max]) {
    const t = rcCharge(r, c, v, k, circuit.rcLoad).timeToThreshold;
    if (t === null) return null;
    worst = Math.max(worst, t);
  }
  return worst;
}

function firstOrder(req: SizingRequest, circuit: SizingCircuit, r: number): FirstOrderFigures {
  const v = req.busVoltage.max;
  const c = req.capacitance.max;
  const k = req.bypassThreshold;
  const thresholdTime = thresholdTimeAt(req, circuit, r);
  const stress = rcCharge(r, c, v, k, circuit.rcLoad);
  const vClose = stress.timeToThreshold === null ? null : voltageAfterThreshold(stress, v, k, req.contactorDelay);
  const kClose = vClose === null ? null : vClose / v;
  const energy = kClose === null ? null : c * v * v * (kClose - (kClose * kClose) / 2);
  const residual = vClose === null ? null : v - vClose;
  const peak = residual === null ? null : stepCurrentPeak(residual, circuit.loopResistance ?? 0, circuit.inductance, c);
  return {
    thresholdTime,
    prechargeTime: thresholdTime === null ? null : thresholdTime + req.contactorDelay,
    peakCurrent: v / r,
    peakPower: (v * v) / r,
    energyPerAttempt: energy,
    energyForAttempts: energy === null ? null : energy * req.attempts,
    prechargeI2t: energy === null ? null : energy / r,
    residualStep: residual,
    bypassInrushPeak: peak !== null && Number.isFinite(peak) ? peak : null,
    bypassI2t: residual !== null && circuit.loopResistance ? stepChargeI2t(residual, c, circuit.loopResistance) : null,
    energyIntoShortPerAttempt: ((v * v) / r) * req.maxPrechargeTime,
  };
}

// ---------------------------------------------------------------------------------------------
// The engine's figures for one value

function simulationInput(
  req: SizingRequest,
  base: DesignInput | null,
  circuit: SizingCircuit,
  r: number,
  estimate: FirstOrderFigures,
): DesignInput {
  const c = req.capacitance.max;
  const k = req.bypassThreshold;
  // Long enough to see the bypass close and the inrush after it ring out: the slower precharge
  // (or 1.5 × the limit when it never closes), plus ten of the slowest time scales of the bypass loop.
  const l = circuit.inductance;
  const rl = circuit.loopResistance ?? 0;
  const loopScale = Math.max(l > 0 ? 2 * Math.PI * Math.sqrt(l * c) : 0, rl > 0 && l > 0 ? l / rl : 0, rl * c);
  const precharge = estimate.prechargeTime ?? 1.5 * req.maxPrechargeTime;
  const needed = 1.2 * precharge + 10 * loopScale;
  const prechargeSection = { resistance: r, bypass: { when: 'voltage' as const, fraction: k, delay: req.contactorDelay } };
  const load = req.load ? { kind: req.load.kind, value: req.load.value } : undefined;

  if (!base) {
    return {
      name: `precharge sizing, ${formatEng(r, 'Ω')}`,
      source: { voltage: req.busVoltage.max, resistance: rl, inductance: l },
      precharge: prechargeSection,
      capacitor: { capacitance: c },
      ...(req.bleederResistance !== null ? { bleeder: { resistance: req.bleederResistance } } : {}),
      ...(load ? { load } : {}),
      duration: needed,
      points: SIMULATION_POINTS,
    };
  }
  const source = { ...(base.source as Record<string, unknown>), voltage: req.busVoltage.max } as DesignInput['source'];
  let filter = base.filter ?? undefined;
  if (req.seriesInductance !== null) {
    // The model has one series inductance (source + filter): put the requested total on the source.
    source.inductance = req.seriesInductance;
    if (filter) filter = { ...filter, inductance: 0 };
  }
  if (req.loopResistance !== null) {
    source.resistance = req.loopResistance;
    if (filter) filter = { ...filter, resistance: 0 };
  }
  const baseDuration = typeof base.duration === 'number' ? base.duration : 0;
  return {
    ...base,
    source,
    ...(filter ? { filter } : {}),
    precharge: prechargeSection,
    capacitor: { ...(base.capacitor as Record<string, unknown>), capacitance: c } as DesignInput['capacitor'],
    ...(req.loopResistance !== null
      ? { capacitor: { ...(base.capacitor as Record<string, unknown>), capacitance: c, esr: 0 } as DesignInput['capacitor'] }
      : {}),
    ...(req.bleederResistance !== null ? { bleeder: { resistance: req.bleederResistance } } : {}),
    ...(load ? { load } : {}),
    duration: Math.max(needed, baseDuration),
    points: SIMULATION_POINTS,
  };
}

function warningText(w: unknown): string {
  if (typeof w === 'string') return w;
  if (w && typeof w === 'object' && 'message' in w) return String((w as { message: unknown }).message);
  return JSON.stringify(w);
}

function simulateValue(
  req: SizingRequest,
  base: DesignInput | null,
  circuit: SizingCircuit,
  r: number,
  estimate: FirstOrderFigures,
  simulate: SimulateFn,
): { simulated: SimulatedFigures | null; error?: string } {
  try {
    const design = parseDesign(simulationInput(req, base, circuit, r, estimate));
    // The cross-checking solvers are left out: they would double the cost of an interactive request,
    // and `check` runs them on the design the engineer settles on.
    const { metrics: m, warnings = [] } = simulate(design, { points: SIMULATION_POINTS, crossCheck: false });
    return {
      simulated: {
        prechargeTime: m.bypassTime,
        peakCurrent: Math.sqrt(m.prechargePeakPower / r),
        peakPower: m.prechargePeakPower,
        energyPerAttempt: m.prechargeEnergy,
        energyForAttempts: m.prechargeEnergy * req.attempts,
        prechargeI2t: m.prechargeEnergy / r,
        residualStep: m.residualStep,
        bypassInrushPeak: m.peakCurrentAfterBypass,
        bypassI2t: m.i2tAfterBypass,
        peakCapacitorVoltage: m.peakCapacitorVoltage.value,
        warnings: warnings.map(warningText),
      },
    };
  } catch (error) {
    return { simulated: null, error: error instanceof Error ? error.message : String(error) };
  }
}

// ---------------------------------------------------------------------------------------------
// The chosen resistor

function chosenChecks(
  req: SizingRequest,
  circuit: SizingCircuit,
  r: number,
  estimate: FirstOrderFigures,
  simulated: SimulatedFigures | null,
  pulseEnergy: number | null,
  peakPower: number | null,
  policy: DeratingPolicy,
): Check[] {
  const tol = req.resistorTolerance;
  const checks: Check[] = [];
  // Inrush at the low end of the resistor's tolerance, against the allowed peak (no derating: the
  // limit is the engineer's own requirement).
  const current = req.busVoltage.max / (r * (1 - tol));
  const imax = req.maxInrushCurrent;
  const currentStatus = statusFor(current, imax, imax);
  checks.push({
    id: 'chosen-inrush-current',
    label: 'Precharge inrush current',
    value: current,
    limit: imax,
    deratedLimit: imax,
    marginPercent: marginPercentOf(current, imax),
    status: currentStatus,
    basis: `Vmax/(R·(1 − ${formatPercent(tol * 100)})) vs the allowed peak inrush, no derating`,
    unit: 'A',
    part: 'precharge resistor',
    message:
      currentStatus === 'pass'
        ? `At ${formatEng(req.busVoltage.max, 'V')} the inrush peaks at ${formatEng(current, 'A')}, inside the ${formatEng(imax, 'A')} allowed.`
        : `At ${formatEng(req.busVoltage.max, 'V')} the inrush peaks at ${formatEng(current, 'A')}, over the ${formatEng(imax, 'A')} allowed. Choose a larger resistance.`,
  });
  // Precharge time at the high end of the tolerance and the slow corner.
  const slow = thresholdTimeAt(req, circuit, r * (1 + tol));
  const tmax = req.maxPrechargeTime;
  const time = slow === null ? null : slow + req.contactorDelay;
  const timeStatus = time === null ? 'fail' : statusFor(time, tmax, tmax);
  checks.push({
    id: 'chosen-precharge-time',
    label: 'Precharge time',
    value: time,
    limit: tmax,
    deratedLimit: tmax,
    marginPercent: time === null ? null : marginPercentOf(time, tmax),
    status: timeStatus,
    basis: `time to ${formatPercent(req.bypassThreshold * 100)} of the bus at Cmax and R·(1 + ${formatPercent(tol * 100)}), plus the contactor delay, vs the time limit`,
    unit: 's',
    part: 'precharge resistor',
    message:
      time === null
        ? `With this resistor the capacitor never reaches ${formatPercent(req.bypassThreshold * 100)} of the bus, so the bypass never closes. Choose a smaller resistance or disconnect the load during precharge.`
        : timeStatus === 'pass'
          ? `The bypass closes after ${formatEng(time, 's')} at the slowest corner, inside the ${formatEng(tmax, 's')} allowed.`
          : `The bypass closes only after ${formatEng(time, 's')} at the slowest corner, over the ${formatEng(tmax, 's')} allowed. Choose a smaller resistance.`,
  });
  // Pulse ratings: the larger of the first-order and the engine's energy, per attempt and for the
  // attempts back to back (no cooling in between: REFERENCE §2, repeated attempts add heat).
  const energies = [estimate.energyPerAttempt, simulated?.energyPerAttempt ?? null].filter((e): e is number => e !== null);
  const energy = energies.length ? Math.max(...energies) : null;
  const rule = policy.factors.prechargePulseEnergy;
  const ratings = { prechargePulseEnergy: pulseEnergy ?? undefined, prechargePeakPower: peakPower ?? undefined };
  checks.push(
    ratingCheck(
      {
        id: 'precharge-pulse-energy',
        label: 'Precharge resistor pulse energy',
        key: 'prechargePulseEnergy',
        unit: 'J',
        part: 'precharge resistor',
        value: energy,
        metricName: 'energy per attempt at the stress corner (the larger of the estimate and the engine)',
        ratingName: 'single-pulse energy rating',
        subject: (e) => `The resistor absorbs ${e} per attempt`,
        limitPhrase: (l) => `its ${l} pulse rating`,
        advice: 'Choose a resistor with a higher single-pulse energy rating.',
        missing: "the resistor's pulse-energy rating",
      },
      ratings,
      rule,
    ),
  );
  if (req.attempts > 1) {
    checks.push(
      ratingCheck(
        {
          id: 'precharge-pulse-energy-attempts',
          label: `Pulse energy for ${req.attempts} attempts`,
          key: 'prechargePulseEnergy',
          unit: 'J',
          part: 'precharge resistor',
          value: energy === null ? null : energy * req.attempts,
          metricName: `energy for ${req.attempts} back-to-back attempts, no cooling between them`,
          ratingName: 'single-pulse energy rating',
          subject: (e) => `${req.attempts} back-to-back attempts put ${e} into the resistor`,
          limitPhrase: (l) => `its ${l} pulse rating`,
          advice: 'Choose a resistor with a higher pulse rating, allow fewer attempts, or wait for it to cool between them.',
          missing: "the resistor's pulse-energy rating",
        },
        ratings,
        rule,
      ),
    );
  }
  const peaks = [estimate.peakPower, simulated?.peakPower ?? null].filter((p): p is number => p !== null);
  checks.push(
    ratingCheck(
      {
        id: 'precharge-peak-power',
        label: 'Precharge resistor peak power',
        key: 'prechargePeakPower',
        unit: 'W',
        part: 'precharge resistor',
        value: Math.max(...peaks),
        metricName: 'peak power V²/R at the stress corner',
        ratingName: 'peak pulse power rating',
        subject: (p) => `The resistor peaks at ${p}`,
        limitPhrase: (l) => `its ${l} peak-power rating`,
        advice: 'Choose a larger resistance or a resistor with a higher peak-power rating.',
        missing: "the resistor's peak-power rating",
      },
      ratings,
      policy.factors.prechargePeakPower,
    ),
  );
  return checks;
}

// ---------------------------------------------------------------------------------------------

function pct(k: number): string {
  return formatPercent(k * 100);
}

/**
 * Sizes a precharge resistor. `simulateFn` defaults to the engine's `simulate` (tests pass a stand-in);
 * `policy` is the resolved derating policy for the chosen resistor's checks.
 * Invalid input throws DesignError naming the field.
 */
export function sizePrecharge(
  input: PrechargeSizingInput,
  simulateFn: SimulateFn = engineSimulate,
  policy: DeratingPolicy = resolvePolicy(),
): PrechargeSizingResult {
  const req = parseSizingRequest(input);
  const notes: string[] = [];
  const baseIn = baseInput(req);
  const base = baseIn ? parseDesign(baseIn) : null;
  const circuit = circuitFor(req, base, notes);
  if (circuit.inductance === 0 && !circuit.loopResistance) {
    const issue: DesignIssue = {
      path: 'loopResistance',
      message:
        'give the loop resistance or the series inductance: with neither, nothing limits the current when the bypass closes',
    };
    throw new DesignError([issue]);
  }

  const { busVoltage: v, capacitance: c, bypassThreshold: k, contactorDelay: delay, maxPrechargeTime: tmax } = req;
  const imax = req.maxInrushCurrent;
  const tol = req.resistorTolerance;

  const rMin = v.max / imax;
  const timeBudget = tmax - delay;
  // The slower bus corner sets the time limit (with a constant-current load, the low one).
  const rTime =
    timeBudget > 0
      ? Math.min(...[v.min, v.max].map((vv) => largestResistanceForTime(timeBudget, c.max, vv, k, circuit.rcLoad)))
      : null;
  const rReachRaw = Math.min(...[v.min, v.max].map((vv) => largestResistanceReachingThreshold(vv, k, circuit.rcLoad)));
  const rReach = Number.isFinite(rReachRaw) ? rReachRaw : null;

  const currentExplanation = `The current limit sets the lower end: at least ${formatEng(rMin, 'Ω')} (${formatEng(v.max, 'V')} at the top of the bus tolerance / ${formatEng(imax, 'A')}).`;
  const timeExplanation =
    rTime === null
      ? `The ${formatEng(delay, 's')} contactor delay alone uses the ${formatEng(tmax, 's')} time limit.`
      : `The time limit sets the upper end: at most ${formatEng(rTime, 'Ω')} (${pct(k)} of the bus within ${formatEng(timeBudget, 's')}${delay > 0 ? ` plus the ${formatEng(delay, 's')} contactor delay` : ''}, with ${formatEng(c.max, 'F')} at the top of the capacitance tolerance${circuit.loadWords ? ` and ${circuit.loadWords} drawing` : ''}).`;

  const result: PrechargeSizingResult = {
    corners: { busVoltage: v, capacitance: c },
    window: null,
    limits: {
      current: { minResistance: rMin, explanation: currentExplanation },
      time: { maxResistance: rTime, explanation: timeExplanation },
      threshold: { maxResistance: rReach },
    },
    binding: 'both',
    explanation: '',
    candidates: [],
    recommended: null,
    reason: null,
    chosen: null,
    simulationCorner: { busVoltage: v.max, capacitance: c.max },
    simulations: 0,
    notes,
  };

  let simulations = 0;
  const run = (r: number, estimate: FirstOrderFigures) => {
    simulations += 1;
    return simulateValue(req, baseIn, circuit, r, estimate, simulateFn);
  };

  // Degenerate cases first, each with its own reason.
  if (rTime === null) {
    result.binding = 'delay';
    result.reason = `The ${formatEng(delay, 's')} contactor delay alone uses up the ${formatEng(tmax, 's')} time limit: shorten the delay or raise the time limit.`;
  } else if (rReach !== null && rReach <= rMin) {
    result.binding = 'threshold';
    result.reason = `With ${circuit.loadWords ?? 'the load'} drawing during precharge, the capacitor reaches ${pct(k)} of the bus only below ${formatEng(rReach, 'Ω')}, but the current limit needs ≥ ${formatEng(rMin, 'Ω')}: disconnect the load until the bypass closes, lower the threshold, or use an active precharge.`;
  } else if (rTime < rMin) {
    result.binding = 'both';
    result.reason = `The time limit needs ≤ ${formatEng(rTime, 'Ω')} but the current limit needs ≥ ${formatEng(rMin, 'Ω')}: raise the time limit, lower C, allow more inrush, or use an active precharge.`;
  } else {
    result.window = { min: rMin, max: rTime };
    let values = standardValuesBetween(rMin / (1 - tol), rTime / (1 + tol), req.series);
    if (values.length > MAX_SIMULATIONS - 1 && req.series.includes('E24') && req.series.includes('E12')) {
      values = values.filter((s) => s.series === 'E12');
      notes.push(`The window is wide: only the E12 values are proposed, to keep to ${MAX_SIMULATIONS} simulations.`);
    }
    if (values.length > MAX_SIMULATIONS - 1) {
      // Keep the values nearest the middle of the window (on a log scale).
      const centre = Math.sqrt(rMin * rTime);
      values = [...values]
        .sort((a, b) => Math.abs(Math.log(a.resistance / centre)) - Math.abs(Math.log(b.resistance / centre)))
        .slice(0, MAX_SIMULATIONS - 1)
        .sort((a, b) => a.resistance - b.resistance);
      notes.push(`Only the ${MAX_SIMULATIONS - 1} values nearest the middle of the window are proposed.`);
    }
    for (const { resistance, series } of values) {
      const estimate = firstOrder(req, circuit, resistance);
      const { simulated, error } = run(resistance, estimate);
      const within =
        simulated === null
          ? null
          : simulated.peakCurrent <= imax * (1 + 1e-9) &&
            simulated.prechargeTime !== null &&
            simulated.prechargeTime <= tmax * (1 + 1e-9);
      result.candidates.push({
        resistance,
        series,
        estimate,
        simulated,
        ...(error ? { simulationError: error } : {}),
        headroom: { current: (resistance * (1 - tol)) / rMin, time: rTime / (resistance * (1 + tol)) },
        simulatedWithinLimits: within,
      });
    }
    if (result.candidates.length === 0) {
      result.binding = 'both';
      result.reason = `No ${req.series.join(' or ')} value fits between ${formatEng(rMin, 'Ω')} and ${formatEng(rTime, 'Ω')} with a ${pct(tol)} resistor: use a series or parallel combination, a tighter tolerance, or widen a limit.`;
    } else {
      const best = result.candidates.reduce((a, b) =>
        Math.min(b.headroom.current, b.headroom.time) > Math.min(a.headroom.current, a.headroom.time) ? b : a,
      );
      result.recommended = best.resistance;
      result.binding = best.headroom.current <= best.headroom.time ? 'current' : 'time';
    }
  }

  const fits = result.candidates.length;
  const threshold =
    rReach !== null && result.window
      ? ` With ${circuit.loadWords} drawing, the capacitor reaches ${pct(k)} only below ${formatEng(rReach, 'Ω')}.`
      : '';
  result.explanation = [
    currentExplanation,
    timeExplanation + threshold,
    result.reason ??
      `${fits} standard value${fits === 1 ? ' fits' : 's fit'}${tol > 0 ? ` with a ${pct(tol)} resistor` : ''}; ${formatEng(result.recommended ?? 0, 'Ω')} leaves the most room to both (${(result.candidates.find((x) => x.resistance === result.recommended)?.headroom.current ?? 0).toFixed(2)}× above the current limit, ${(result.candidates.find((x) => x.resistance === result.recommended)?.headroom.time ?? 0).toFixed(2)}× below the time limit), so the ${result.binding} limit is the nearer one. Larger values lower the peak current and power and take longer.`,
  ].join(' ');

  if (req.chosenResistor) {
    const r = req.chosenResistor.resistance;
    const estimate = firstOrder(req, circuit, r);
    const { simulated, error } = run(r, estimate);
    const inWindow =
      result.window !== null && r * (1 - tol) >= rMin * (1 - 1e-9) && r * (1 + tol) <= result.window.max * (1 + 1e-9);
    result.chosen = {
      resistance: r,
      inWindow,
      estimate,
      simulated,
      ...(error ? { simulationError: error } : {}),
      checks: chosenChecks(
        req,
        circuit,
        r,
        estimate,
        simulated,
        req.chosenResistor.pulseEnergy,
        req.chosenResistor.peakPower,
        policy,
      ),
    };
  }
  result.simulations = simulations;
  if (circuit.loopResistance === null) {
    notes.push(
      'No loop resistance is given: the inrush when the contactor closes is limited by the inductance alone, and its I²t is not estimated.',
    );
  }
  return result;
}
