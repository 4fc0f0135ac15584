/**
 * The worst switch-on angle: the peak inrush current over a sweep of switch-on angles, and the
 * worst one refined between its neighbouring sweep points by Brent's minimiser (golden section
 * with parabolic steps, minimize.ts) on −peak current.
 *
 * With the capacitor empty and only resistance in the loop the worst is the mains peak, 90°
 * (REFERENCE §7 [der]); line inductance moves it earlier, and a charged capacitor or a load changes
 * it again, which is why it is searched for rather than assumed. The refinement assumes the peak
 * current is unimodal between the two neighbours of the worst sweep point (a 5° grid resolves the
 * shapes met here: one maximum per half-cycle, or per 60° in three-phase).
 */
import { DesignError } from '../errors';
import { minimize } from './minimize';
import type { MainsDesign } from './schema';
import { simulateMains, type MainsSimulateOptions } from './simulate';

export interface SweepOptions {
  /** Degrees; defaults 0, 180 and 5. */
  from?: number;
  to?: number;
  step?: number;
  /** Refine the worst angle (default true). */
  refine?: boolean;
  /** Angle tolerance of the refinement, degrees (default 0.01°). */
  tolerance?: number;
  /** Passed to each run (the sweep always runs without cross-checks and without a waveform). */
  simulate?: Pick<MainsSimulateOptions, 'tolerance'>;
}

export interface SweepPoint {
  angle: number;
  peakCurrent: number;
  /** When the peak occurs, s after switch-on. */
  peakCurrentTime: number;
  i2t: number;
}

export interface SweepResult {
  points: SweepPoint[];
  /** The worst angle (refined unless `refine: false`) and its peak current and I²t. */
  worst: SweepPoint & { refined: boolean };
  /** Simulations run. */
  runs: number;
}

/** The design with another switch-on angle (degrees). */
export function withAngle(design: MainsDesign, angle: number): MainsDesign {
  return { ...design, mains: { ...design.mains, angle } };
}

/** Most sweep points allowed (0–360° in 0.5° steps). */
export const MAX_SWEEP_POINTS = 721;

export function sweepSwitchOnAngle(design: MainsDesign, options: SweepOptions = {}): SweepResult {
  const from = options.from ?? 0;
  const to = options.to ?? 180;
  const step = options.step ?? 5;
  const tolerance = options.tolerance ?? 0.01;
  if (![from, to, step, tolerance].every(Number.isFinite))
    throw new DesignError('from, to, step and tolerance must be finite numbers of degrees', 'sweep');
  if (!(step > 0)) throw new DesignError('must be greater than 0', 'sweep.step');
  if (!(to >= from)) throw new DesignError('must not be below "from"', 'sweep.to');
  if (!(tolerance > 0)) throw new DesignError('must be greater than 0', 'sweep.tolerance');
  const count = Math.floor((to - from) / step + 1e-9) + 1;
  if (count > MAX_SWEEP_POINTS)
    throw new DesignError(`gives ${count} points, more than ${MAX_SWEEP_POINTS}: use a larger step`, 'sweep.step');
  let runs = 0;
  const run = (angle: number): SweepPoint => {
    runs++;
    const result = simulateMains(withAngle(design, angle), { ...options.simulate, crossCheck: false, waveform: false });
    return {
      angle,
      peakCurrent: result.metrics.peakCurrent.value,
      peakCurrentTime: result.metrics.peakCurrent.time,
      i2t: result.metrics.i2t,
    };
  };
  const angles = Array.from({ length: count }, (_, k) => from + k * step);
  if (angles[angles.length - 1] < to - 1e-9 * Math.max(1, Math.abs(to))) angles.push(to);
  const points = angles.map(run);
  // The first of equal maxima (three-phase repeats every 60°).
  let k = 0;
  for (let j = 1; j < points.length; j++) if (points[j].peakCurrent > points[k].peakCurrent * (1 + 1e-9)) k = j;
  let worst: SweepPoint & { refined: boolean } = { ...points[k], refined: false };
  if ((options.refine ?? true) && points.length > 1) {
    const lo = points[Math.max(0, k - 1)].angle;
    const hi = points[Math.min(points.length - 1, k + 1)].angle;
    const cache = new Map<number, SweepPoint>();
    const at = (angle: number) => {
      let p = cache.get(angle);
      if (!p) {
        p = run(angle);
        cache.set(angle, p);
      }
      return p;
    };
    const found = minimize((angle) => -at(angle).peakCurrent, lo, hi, tolerance);
    const refined = at(found.x);
    worst = refined.peakCurrent >= points[k].peakCurrent ? { ...refined, refined: true } : { ...points[k], refined: true };
  }
  return { points, worst, runs };
}
