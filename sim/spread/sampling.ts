/**
 * Which parameter values sample k takes, as a pure function of (plan, k): corners enumerate the
 * 2ⁿ extreme combinations by the bits of k (bit j set: parameter j at its maximum), Monte Carlo
 * draws from the band with the sample's own random stream (see random.ts).
 */
import { DesignError } from '../errors';
import { PATH_INFO, type SpreadDesign } from './paths';
import { sampleStream, truncatedNormal } from './random';
import type { SpreadParameter } from './tolerances';

export type SpreadMethod = 'corners' | 'monte-carlo';
export type SpreadDistribution = 'uniform' | 'normal';

export const MAX_CORNER_PARAMETERS = 10;
export const DEFAULT_SAMPLES = 2000;
export const MAX_SAMPLES = 100_000;
/** A normal band is ±3σ wide, truncated at its ends. */
export const NORMAL_SIGMAS = 3;

/** Everything needed to draw and run any sample: plain data, so it can be posted to a worker. */
export interface SamplePlan {
  /** The nominal design: the engine's `Design`, or a `MainsDesign` (sim/mains). */
  design: SpreadDesign;
  parameters: SpreadParameter[];
  method: SpreadMethod;
  distribution: SpreadDistribution;
  seed: number;
  total: number;
}

export function samplesFor(method: SpreadMethod, parameterCount: number, samples: number | undefined): number {
  if (method === 'corners') return 2 ** parameterCount;
  const n = samples ?? DEFAULT_SAMPLES;
  if (!Number.isInteger(n) || n < 1 || n > MAX_SAMPLES) {
    throw new DesignError(
      `must be a whole number from 1 to ${MAX_SAMPLES.toLocaleString('en-US').replace(/,/g, ' ')}`,
      'samples',
    );
  }
  return n;
}

/** Writes sample k's parameter values into `values` (one per parameter). */
export function drawSample(plan: SamplePlan, k: number, values: Float64Array): void {
  const { parameters } = plan;
  if (plan.method === 'corners') {
    for (let j = 0; j < parameters.length; j++) values[j] = (k >>> j) & 1 ? parameters[j].max : parameters[j].min;
    return;
  }
  const next = sampleStream(plan.seed, k);
  for (let j = 0; j < parameters.length; j++) {
    const { min, max } = parameters[j];
    if (plan.distribution === 'normal') {
      const z = truncatedNormal(next, NORMAL_SIGMAS);
      // Clamp guards the last bit of rounding at the band's ends.
      values[j] = Math.min(max, Math.max(min, 0.5 * (min + max) + (z / NORMAL_SIGMAS) * 0.5 * (max - min)));
    } else {
      values[j] = min + next() * (max - min);
    }
  }
}

/** The design of one sample: the nominal design with the sample's values written in. */
export function applySample<D extends SpreadDesign>(plan: SamplePlan, values: ArrayLike<number>, into: D): D {
  for (let j = 0; j < plan.parameters.length; j++) PATH_INFO[plan.parameters[j].path].set(into, values[j]);
  return into;
}
