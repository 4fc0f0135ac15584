/**
 * The circuit model linearised at its DC operating point: small deviations from the operating
 * point obey x' = A·x, with the source a short (its voltage is constant) and the constant-power
 * load replaced by its incremental conductance g = −P/V² (operatingPoint.ts).
 *
 * States (only those the circuit has): i, the series current (when L > 0); vC, the main
 * capacitor behind its ESR; vD, the damping capacitor behind Rd. The bus voltage v is algebraic:
 *   ESR > 0:  (1/ESR + 1/Rd + 1/Rb + g [+ 1/R when L = 0])·v = [i] + vC/ESR + vD/Rd
 *   ESR = 0:  v = vC
 * and
 *   L·i'   = −R·i − v
 *   C·vC'  = (v − vC)/ESR                       (ESR > 0)
 *   C·vC'  = [i or −v/R] − (v − vD)/Rd − (1/Rb + g)·v   (ESR = 0, KCL at the bus)
 *   Cd·vD' = (v − vD)/Rd
 * This is written from the circuit, independently of the engine's state-space builder, so that the
 * time-domain agreement test compares two encodings of the same physics.
 */
import { finalSeriesResistance, type Design } from '../design';
import { DesignError } from '../errors';

export type LinearState = 'i' | 'vC' | 'vD';

export interface LinearisedModel {
  /** The states present, in row order of `matrix`. */
  states: LinearState[];
  /** Row-major n × n state matrix, s⁻¹. */
  matrix: Float64Array;
  n: number;
}

/**
 * @param conductance the load's incremental conductance at the operating point (−P/V² for a
 *   constant-power load; 0 for the bare filter)
 */
export function linearisedModel(design: Design, conductance: number): LinearisedModel {
  const L = design.source.inductance + (design.filter?.inductance ?? 0);
  const R = finalSeriesResistance(design);
  const C = design.capacitor.capacitance;
  const esr = design.capacitor.esr;
  const gd = design.damping ? 1 / design.damping.resistance : 0;
  const cd = design.damping?.capacitance ?? 0;
  const gShunt = (design.bleeder ? 1 / design.bleeder.resistance : 0) + conductance;
  const hasL = L > 0;
  // With L = 0 and R = 0 the source holds the bus (v ≡ 0 in deviations); with ESR = 0 as well the
  // main capacitor is pinned to it and has no dynamics of its own.
  const stiffSource = !hasL && R === 0;
  const states: LinearState[] = [
    ...(hasL ? (['i'] as const) : []),
    ...(stiffSource && esr === 0 ? [] : (['vC'] as const)),
    ...(design.damping ? (['vD'] as const) : []),
  ];
  const n = states.length;
  const at = (s: LinearState) => states.indexOf(s);
  const iI = at('i');
  const iC = at('vC');
  const iD = at('vD');

  // v = Σ vRow[k]·x[k] (all zero when the source holds the bus).
  const vRow = new Float64Array(n);
  // The series current as a row: i itself, or −v/R when L = 0.
  const iRow = new Float64Array(n);
  if (esr > 0) {
    const g = 1 / esr + gd + gShunt + (hasL || stiffSource ? 0 : 1 / R);
    if (!stiffSource) {
      if (!(g > 0)) {
        throw new DesignError(
          "the load's negative incremental conductance outweighs every other path at the bus, so the bus voltage has no small-signal solution",
          'load.value',
        );
      }
      if (hasL) vRow[iI] = 1 / g;
      vRow[iC] = 1 / esr / g;
      if (iD >= 0) vRow[iD] = gd / g;
    }
  } else if (!stiffSource) {
    vRow[iC] = 1;
  }
  if (hasL) iRow[iI] = 1;
  else if (!stiffSource) for (let k = 0; k < n; k++) iRow[k] = -vRow[k] / R;

  const A = new Float64Array(n * n);
  if (hasL) for (let k = 0; k < n; k++) A[iI * n + k] = (-R * iRow[k] - vRow[k]) / L;
  for (let k = 0; k < n; k++) {
    const unitC = k === iC ? 1 : 0;
    const unitD = k === iD ? 1 : 0;
    if (iC >= 0) {
      A[iC * n + k] = esr > 0 ? (vRow[k] - unitC) / (esr * C) : (iRow[k] - gd * (vRow[k] - unitD) - gShunt * vRow[k]) / C;
    }
    if (iD >= 0) A[iD * n + k] = (gd * (vRow[k] - unitD)) / cd;
  }
  return { states, matrix: A, n };
}
