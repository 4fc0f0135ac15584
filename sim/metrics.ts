/**
 * Metrics: what every solver reports (a RawRun), and the assembly into the public Metrics with
 * the design-level quantities (steady state, overshoot, series-path parameters, stored energy).
 *
 * Conventions (see README): SI units; among equal maxima the earliest counts; null where a metric
 * does not apply; prechargeEnergy and prechargePeakPower are 0 without a precharge resistor.
 */
import type { Design } from './design';
import { circuitOf } from './model/circuit';
import { seriesPath, steadyStateVoltage, type Classification, type SeriesPath } from './model/seriesPath';

export interface Extremum {
  value: number;
  time: number;
}

/** What a solver measured on one run. */
export interface RawRun {
  vCMax: Extremum;
  vCMin: Extremum;
  vMax: Extremum;
  /** Largest |i| (value ≥ 0). */
  iAbsMax: Extremum;
  i2t: number;
  /** ∫i² dt and the largest |i| while the precharge resistor carries the current. */
  prechargeI2t: number;
  prechargeIAbsMax: number;
  /** When vC first reached the bypass threshold (voltage mode), null if never within the run. */
  bypassCrossingTime: number | null;
  /** When the bypass closed, null if it did not close within the run. */
  bypassTime: number | null;
  /** Vs(t) − vC(t) at the closing. */
  residualStep: number | null;
  iAbsMaxAfterBypass: Extremum | null;
  i2tAfterBypass: number | null;
  finalCapacitorVoltage: number;
  /** First time vC completed settleFraction of its move from V0 to the steady state. */
  settleTime: number | null;
}

export interface PhaseParameters {
  alpha: number | null;
  omegaN: number | null;
  zeta: number | null;
  classification: Classification;
}

export interface Metrics {
  peakCapacitorVoltage: Extremum;
  minCapacitorVoltage: Extremum;
  peakBusVoltage: Extremum;
  peakCurrent: Extremum;
  i2t: number;
  prechargeEnergy: number;
  prechargePeakPower: number;
  bypassTime: number | null;
  residualStep: number | null;
  peakCurrentAfterBypass: number | null;
  i2tAfterBypass: number | null;
  finalCapacitorVoltage: number;
  steadyStateVoltage: number;
  overshootPercent: number | null;
  alpha: number | null;
  omegaN: number | null;
  zeta: number | null;
  omegaD: number | null;
  q: number | null;
  classification: Classification;
  prechargePhase: PhaseParameters | null;
  /** ½·C·(peak vC)². */
  storedEnergyAtPeak: number;
  /** Time to complete settleFraction (default 95 %) of the move from V0 to the steady state. */
  timeTo95: number | null;
}

/** The series path with the bypass closed (or the only phase) and, with a precharge, while it is in. */
export function seriesPaths(design: Design): { final: SeriesPath; precharge: SeriesPath | null } {
  const circuit = circuitOf(design);
  const loop = circuit.baseResistance + circuit.esr;
  const pre = circuit.prechargeResistance;
  const final = seriesPath(loop + (pre !== null && !circuit.bypass ? pre : 0), circuit.inductance, circuit.capacitance);
  const precharge = pre !== null ? seriesPath(loop + pre, circuit.inductance, circuit.capacitance) : null;
  return { final, precharge };
}

/** Target of the settle-time watch: V0 + k·(Vss − V0), or null when there is no move (Vss = V0). */
export function settleTarget(design: Design, steady: number): { target: number; direction: 1 | -1 } | null {
  const v0 = design.initial.capacitorVoltage;
  const move = steady - v0;
  if (isEqualVoltage(steady, v0, design)) return null;
  return { target: v0 + design.settleFraction * move, direction: move > 0 ? 1 : -1 };
}

function isEqualVoltage(a: number, b: number, design: Design): boolean {
  const scale = Math.max(Math.abs(a), Math.abs(b), Math.abs(design.source.voltage));
  return Math.abs(a - b) <= 1e-12 * scale;
}

function finiteOrNull(value: number | null): number | null {
  return value === null || !Number.isFinite(value) ? null : value;
}

export function assembleMetrics(design: Design, raw: RawRun): Metrics {
  const steady = steadyStateVoltage(design);
  const paths = seriesPaths(design);
  const v0 = design.initial.capacitorVoltage;
  const rPre = design.precharge?.resistance ?? 0;
  const overshoot = isEqualVoltage(steady, v0, design) ? null : ((raw.vCMax.value - steady) / (steady - v0)) * 100;
  return {
    peakCapacitorVoltage: raw.vCMax,
    minCapacitorVoltage: raw.vCMin,
    peakBusVoltage: raw.vMax,
    peakCurrent: raw.iAbsMax,
    i2t: raw.i2t,
    prechargeEnergy: design.precharge ? rPre * raw.prechargeI2t : 0,
    prechargePeakPower: design.precharge ? rPre * raw.prechargeIAbsMax ** 2 : 0,
    bypassTime: raw.bypassTime,
    residualStep: raw.residualStep,
    peakCurrentAfterBypass: raw.iAbsMaxAfterBypass ? raw.iAbsMaxAfterBypass.value : null,
    i2tAfterBypass: raw.i2tAfterBypass,
    finalCapacitorVoltage: raw.finalCapacitorVoltage,
    steadyStateVoltage: steady,
    overshootPercent: finiteOrNull(overshoot),
    alpha: paths.final.alpha,
    omegaN: paths.final.omegaN,
    zeta: paths.final.zeta,
    omegaD: paths.final.omegaD,
    q: paths.final.q,
    classification: paths.final.classification,
    prechargePhase: paths.precharge
      ? {
          alpha: paths.precharge.alpha,
          omegaN: paths.precharge.omegaN,
          zeta: paths.precharge.zeta,
          classification: paths.precharge.classification,
        }
      : null,
    storedEnergyAtPeak: 0.5 * design.capacitor.capacitance * raw.vCMax.value ** 2,
    timeTo95: raw.settleTime,
  };
}

/** Relative tolerance under which two maxima count as equal (the earliest then wins). */
export const EQUAL_PEAK_TOLERANCE = 1e-9;

/**
 * Picks the largest of a stream of (value, time) candidates (the smallest with sign −1). Values
 * within EQUAL_PEAK_TOLERANCE of the largest count as equal and the earliest of them wins, with its
 * own value; the result does not depend on the order candidates arrive in.
 */
export class PeakPicker<P = unknown> {
  private best = -Infinity;
  private near: { value: number; time: number; payload?: P }[] = [];

  constructor(private readonly sign: 1 | -1 = 1) {}

  /** Offers a candidate, with an optional payload returned alongside the pick. */
  offer(value: number, time: number, payload?: P): void {
    const v = this.sign * value;
    if (!Number.isFinite(v) || !Number.isFinite(time)) return;
    if (v > this.best) {
      this.best = v;
      const floor = v - EQUAL_PEAK_TOLERANCE * Math.abs(v);
      this.near = this.near.filter((c) => c.value >= floor);
      this.near.push({ value: v, time, payload });
    } else if (v >= this.best - EQUAL_PEAK_TOLERANCE * Math.abs(this.best)) {
      this.near.push({ value: v, time, payload });
    }
  }

  get has(): boolean {
    return this.near.length > 0;
  }

  /** The largest value seen so far (in the picker's sign), for pruning candidates. */
  get bestValue(): number {
    return this.sign * this.best;
  }

  private pick() {
    let pick = this.near[0];
    for (const c of this.near) if (c.time < pick.time) pick = c;
    return pick;
  }

  /** The pick; NaN when no finite candidate was offered (the caller reports it). */
  result(): Extremum {
    if (!this.has) return { value: NaN, time: NaN };
    const pick = this.pick();
    return { value: this.sign * pick.value, time: pick.time };
  }

  payload(): P | undefined {
    return this.has ? this.pick().payload : undefined;
  }
}
