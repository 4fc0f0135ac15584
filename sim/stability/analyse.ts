/**
 * Stability of an input filter feeding a constant-power load (a regulated converter), two ways:
 *  - the eigenvalues of the model linearised at the DC operating point (linearised.ts): stable iff
 *    every one has a negative real part; the least-damped mode's ζ = −Re λ/|λ|;
 *  - Middlebrook's impedance criterion (impedance.ts): the peak of the filter's |Zout(jω)| against
 *    the load's |Zin| = V²/P, with the margin 20·log10(|Zin|/max|Zout|) in dB. 6–10 dB is the usual
 *    aim (common practice, REFERENCE §3). The criterion is sufficient, not necessary: a design can
 *    be stable with a negative margin, but then only just, and the converter's own loop decides.
 */
import type { Design } from '../design';
import { DesignError } from '../errors';
import { smallEigenvalues } from '../solvers/roots';
import { formatEng } from '../units';
import { filterBranches, logSweep, magnitude, outputImpedance, refinePeak, type Complex } from './impedance';
import { linearisedModel, type LinearState } from './linearised';
import { incrementalResistance, operatingPoint } from './operatingPoint';

export interface StabilityOptions {
  /** Sweep from fMin to fMax (Hz), default 10 Hz to 1 MHz. */
  fMin?: number;
  fMax?: number;
  /** Default 50. */
  pointsPerDecade?: number;
}

export interface StabilityMode {
  eigenvalue: Complex;
  /** |Im λ|/2π, Hz (0 for a real mode). */
  frequency: number;
  /** −Re λ/|λ|: 1 for a decaying real mode, negative when the mode grows. */
  zeta: number;
}

export interface StabilityResult {
  operatingPoint: { v: number; i: number };
  power: number;
  /** −V²/P at the operating point, Ω. */
  incrementalResistance: number;
  /** Which states the linearised model has, and its state matrix (row-major), for inspection. */
  states: LinearState[];
  stateMatrix: number[];
  eigenvalues: Complex[];
  modes: StabilityMode[];
  stable: boolean;
  leastDampedZeta: number;
  /** Frequency of the least-damped mode, Hz. */
  leastDampedFrequency: number;
  impedance: {
    f: number[];
    /** |Zout|, Ω. */
    zout: number[];
    /** arg Zout, degrees. */
    zoutPhase: number[];
    /** |Zin| = V²/P, Ω (flat for a constant-power load). */
    zin: number;
  };
  /** The refined maximum of |Zout| (at a sweep edge when the maximum is outside the sweep). */
  peak: { f: number; zout: number; atSweepEdge: boolean };
  marginDb: number;
  tightest: { f: number; marginDb: number };
  /** The usual Middlebrook margin, dB (common practice). */
  recommendedMarginDb: number;
  verdict: string;
}

export const DEFAULT_STABILITY_OPTIONS = { fMin: 10, fMax: 1e6, pointsPerDecade: 50 } as const;
export const RECOMMENDED_MARGIN_DB = 6;
/** |Re λ| below this fraction of |λ| counts as on the imaginary axis (not stable). */
const MARGINAL = 1e-12;

function modeOf(e: Complex): StabilityMode {
  const mag = Math.hypot(e.re, e.im);
  return { eigenvalue: e, frequency: Math.abs(e.im) / (2 * Math.PI), zeta: mag > 0 ? -e.re / mag : 0 };
}

function readOptions(options: StabilityOptions) {
  const fMin = options.fMin ?? DEFAULT_STABILITY_OPTIONS.fMin;
  const fMax = options.fMax ?? DEFAULT_STABILITY_OPTIONS.fMax;
  const perDecade = options.pointsPerDecade ?? DEFAULT_STABILITY_OPTIONS.pointsPerDecade;
  if (!(fMin > 0) || !Number.isFinite(fMin)) throw new DesignError('must be a frequency above 0 Hz', 'fMin');
  if (!(fMax > fMin) || !Number.isFinite(fMax)) throw new DesignError('must be a frequency above fMin', 'fMax');
  if (!Number.isInteger(perDecade) || perDecade < 1 || perDecade > 10_000) {
    throw new DesignError('must be a whole number from 1 to 10 000', 'pointsPerDecade');
  }
  return { fMin, fMax, perDecade };
}

export function analyseStability(design: Design, options: StabilityOptions = {}): StabilityResult {
  const { fMin, fMax, perDecade } = readOptions(options);
  const op = operatingPoint(design);
  const rInc = incrementalResistance(op.v, op.power);
  const model = linearisedModel(design, 1 / rInc);
  const eigenvalues = smallEigenvalues(model.matrix, model.n).sort((a, b) => b.re - a.re || b.im - a.im);
  const modes = eigenvalues.map(modeOf);
  const stable = eigenvalues.every((e) => e.re < -MARGINAL * Math.hypot(e.re, e.im));
  const least = modes.reduce((worst, m) => (m.zeta < worst.zeta ? m : worst), modes[0]);

  const branches = filterBranches(design);
  const f = logSweep(fMin, fMax, perDecade);
  const zout: number[] = [];
  const zoutPhase: number[] = [];
  let top = 0;
  for (let k = 0; k < f.length; k++) {
    const z = outputImpedance(branches, f[k]);
    zout.push(magnitude(z));
    zoutPhase.push((Math.atan2(z.im, z.re) * 180) / Math.PI);
    if (zout[k] > zout[top]) top = k;
  }
  const atSweepEdge = top === 0 || top === f.length - 1;
  const peak = atSweepEdge ? { f: f[top], zout: zout[top] } : refinePeak(branches, f[top - 1], f[top + 1]);
  const zin = -rInc;
  const marginDb = 20 * Math.log10(zin / peak.zout);
  const result: StabilityResult = {
    operatingPoint: { v: op.v, i: op.i },
    power: op.power,
    incrementalResistance: rInc,
    states: model.states,
    stateMatrix: Array.from(model.matrix),
    eigenvalues,
    modes,
    stable,
    leastDampedZeta: least ? least.zeta : 1,
    leastDampedFrequency: least ? least.frequency : 0,
    impedance: { f, zout, zoutPhase, zin },
    peak: { ...peak, atSweepEdge },
    marginDb,
    tightest: { f: peak.f, marginDb },
    recommendedMarginDb: RECOMMENDED_MARGIN_DB,
    verdict: '',
  };
  result.verdict = verdictOf(design, result);
  return result;
}

function zetaText(z: number): string {
  return `ζ = ${Number(z.toPrecision(2))}`;
}

function verdictOf(design: Design, r: StabilityResult): string {
  const power = formatEng(r.power, 'W');
  const zin = formatEng(r.impedance.zin, 'Ω');
  const peak = `${formatEng(r.peak.zout, 'Ω')} at ${formatEng(r.peak.f, 'Hz')}`;
  const margin = `${Math.abs(r.marginDb).toFixed(1)} dB`;
  const underLoad =
    design.load && r.operatingPoint.v < design.load.undervoltage
      ? ` The operating point (${formatEng(r.operatingPoint.v, 'V')}) is below the load's ${formatEng(design.load.undervoltage, 'V')} undervoltage threshold, so the converter would not run there.`
      : '';
  if (!r.stable) {
    const ring =
      r.leastDampedFrequency > 0
        ? `oscillate at ${formatEng(r.leastDampedFrequency, 'Hz')}`
        : 'drift away from the operating point';
    return (
      `Unstable: the filter and the ${power} load ${ring}, growing (${zetaText(r.leastDampedZeta)}). ` +
      `The filter's output impedance peaks at ${peak}, ${r.marginDb < 0 ? `${margin} above` : `only ${margin} below`} the load's ${zin}. ` +
      `Add damping (Rd in series with Cd across the capacitor) or series resistance so the peak stays well below ${zin}.${underLoad}`
    );
  }
  const mode =
    r.leastDampedFrequency > 0
      ? `the least-damped mode rings at ${formatEng(r.leastDampedFrequency, 'Hz')} with ${zetaText(r.leastDampedZeta)}`
      : 'every mode decays without ringing';
  if (r.marginDb < 0) {
    return (
      `Stable at this operating point (${mode}), but the filter's output impedance peaks at ${peak}, ${margin} above the load's ${zin}: ` +
      `Middlebrook's criterion is not met, so the converter's control loop decides. Add damping.${underLoad}`
    );
  }
  if (r.marginDb < RECOMMENDED_MARGIN_DB) {
    return (
      `Stable (${mode}), with little margin: the filter's output impedance peaks at ${peak}, only ${margin} below the load's ${zin}; ` +
      `${RECOMMENDED_MARGIN_DB}–10 dB is usual. Add damping or lower the filter's characteristic impedance.${underLoad}`
    );
  }
  return `Stable: ${mode}. The filter's output impedance peaks at ${peak}, ${margin} below the load's ${zin} (Middlebrook).${underLoad}`;
}
