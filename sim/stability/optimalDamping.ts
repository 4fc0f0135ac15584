/**
 * Optimal parallel damping of an LC input filter: a resistor Rd in series with a blocking
 * capacitor Cd = n·C, across the filter capacitor C, chosen to make the peak of the filter's output
 * impedance as low as possible for that n.
 *
 * R. W. Erickson and D. Maksimović, Fundamentals of Power Electronics, 2nd ed., Kluwer 2001,
 * ch. 10 "Input filter design" (the section on optimal RC parallel damping):
 *   R0 = √(L/C), ω0 = 1/√(LC)
 *   Rd,opt = R0·√[(2 + n)(4 + 3n) / (2n²(4 + n))]
 *   peak |Zout| = R0·√(2(2 + n)) / n,  at ω = ω0·√(2/(2 + n))
 * Worked values (REFERENCE §3, recomputed): L 10 µH, C 10 µF: n = 1 → Rd 1.449 Ω, peak 2.449 Ω;
 * n = 4 → Rd 0.612 Ω, peak 0.866 Ω. The filter here is lossless apart from the damping branch.
 */
import { DesignError } from '../errors';

export interface OptimalDampingInput {
  inductance: number;
  capacitance: number;
  /** Cd/C, > 0. */
  n: number;
}

export interface OptimalDamping {
  /** Damping resistance, Ω. */
  rd: number;
  /** Damping (blocking) capacitance n·C, F. */
  cd: number;
  /** Peak output impedance with that damping, Ω. */
  peakZout: number;
  /** Frequency of the peak, Hz. */
  peakFrequency: number;
  /** √(L/C), Ω, and 1/(2π√(LC)), Hz, of the undamped filter. */
  characteristicImpedance: number;
  resonantFrequency: number;
}

export function optimalDamping({ inductance, capacitance, n }: OptimalDampingInput): OptimalDamping {
  if (!(inductance > 0)) throw new DesignError('must be greater than 0', 'inductance');
  if (!(capacitance > 0)) throw new DesignError('must be greater than 0', 'capacitance');
  if (!(n > 0) || !Number.isFinite(n)) throw new DesignError('the ratio Cd/C must be a number greater than 0', 'n');
  const r0 = Math.sqrt(inductance / capacitance);
  const w0 = 1 / Math.sqrt(inductance * capacitance);
  const rd = r0 * Math.sqrt(((2 + n) * (4 + 3 * n)) / (2 * n * n * (4 + n)));
  const peakZout = (r0 * Math.sqrt(2 * (2 + n))) / n;
  const peakOmega = w0 * Math.sqrt(2 / (2 + n));
  return {
    rd,
    cd: n * capacitance,
    peakZout,
    peakFrequency: peakOmega / (2 * Math.PI),
    characteristicImpedance: r0,
    resonantFrequency: w0 / (2 * Math.PI),
  };
}
