/**
 * The series path's second-order parameters and the DC operating point.
 *
 * Series RLC: α = R/2L, ωn = 1/√(LC), ζ = α/ωn = (R/2)·√(C/L), ωd = ωn·√(1 − ζ²), Q = 1/(2ζ) —
 * any standard circuit-analysis text, chapter on second-order circuits (e.g. Nilsson & Riedel,
 * Electric Circuits, ch. 8). R is the whole loop: source, filter, precharge (when in) and ESR.
 */
import { DesignError } from '../errors';
import { finalSeriesResistance, type Design } from '../design';

export type Classification = 'underdamped' | 'critically-damped' | 'overdamped' | 'undamped' | 'first-order';

export interface SeriesPath {
  alpha: number | null;
  omegaN: number | null;
  zeta: number | null;
  omegaD: number | null;
  q: number | null;
  classification: Classification;
}

/** ζ within this of 1 is reported as critically damped (the solvers need no such tolerance). */
export const CRITICAL_TOLERANCE = 1e-12;

export function seriesPath(resistance: number, inductance: number, capacitance: number): SeriesPath {
  if (inductance === 0) {
    return { alpha: null, omegaN: null, zeta: null, omegaD: null, q: null, classification: 'first-order' };
  }
  const alpha = resistance / (2 * inductance);
  const omegaN = 1 / Math.sqrt(inductance * capacitance);
  const zeta = (resistance / 2) * Math.sqrt(capacitance / inductance);
  if (resistance === 0) return { alpha: 0, omegaN, zeta: 0, omegaD: omegaN, q: null, classification: 'undamped' };
  const q = 1 / (2 * zeta);
  if (Math.abs(zeta - 1) <= CRITICAL_TOLERANCE) return { alpha, omegaN, zeta, omegaD: 0, q, classification: 'critically-damped' };
  if (zeta < 1)
    return { alpha, omegaN, zeta, omegaD: omegaN * Math.sqrt((1 - zeta) * (1 + zeta)), q, classification: 'underdamped' };
  return { alpha, omegaN, zeta, omegaD: null, q, classification: 'overdamped' };
}

/**
 * DC operating point with the bypass closed (if there is one) and the load on: the inductor is a
 * short, the capacitors are open, so v = Vs − R·(v/Rb + iload(v)).
 *   resistive or current load: linear in v;
 *   constant power P: (1 + R/Rb)·v² − Vs·v + R·P = 0, the higher root (the stable operating point);
 *   no real root: no operating point exists (an error; parseDesign reports it first).
 */
export function steadyStateVoltage(design: Design): number {
  const r = finalSeriesResistance(design);
  const vs = design.source.voltage;
  const gBleed = design.bleeder ? 1 / design.bleeder.resistance : 0;
  const load = design.load;
  if (load?.kind === 'power' && load.value > 0) {
    const a = 1 + r * gBleed;
    const disc = vs * vs - 4 * a * r * load.value;
    if (disc < 0 || vs <= 0) throw new DesignError('no DC operating point for the constant-power load', 'load.value');
    // Higher root without cancellation: (Vs + √disc)/(2a).
    return (vs + Math.sqrt(disc)) / (2 * a);
  }
  const gLoad = load?.kind === 'resistance' ? 1 / load.value : 0;
  const iLoad = load?.kind === 'current' ? load.value : 0;
  return (vs - r * iLoad) / (1 + r * (gBleed + gLoad));
}
