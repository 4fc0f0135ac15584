/**
 * The same design at a cold start and at a hot restart of its NTC, each at its own worst switch-on
 * angle: a thermistor still hot from a moment ago has a fraction of its cold resistance
 * (R(T) = R25·exp[β(1/T − 1/298.15 K)], ntc.ts), so it limits far less.
 */
import { DesignError } from '../errors';
import { ntcResistance } from './ntc';
import { NTC_COLD_START, NTC_HOT_RESTART, parseTemperature, type MainsDesign } from './schema';
import { simulateMains, type MainsResult, type MainsSimulateOptions } from './simulate';
import { sweepSwitchOnAngle, withAngle, type SweepOptions, type SweepResult } from './sweep';

export interface ColdHotOptions {
  /** Start temperatures: K as a number, or a string with units ("25 °C"). Defaults 25 °C and 110 °C. */
  cold?: number | string;
  hot?: number | string;
  sweep?: SweepOptions;
  /** Options of the two full runs at the worst angles (cross-checks on by default). */
  simulate?: MainsSimulateOptions;
}

export interface ColdHotCase {
  /** K */
  startTemperature: number;
  /** The NTC's resistance at that temperature, Ω. */
  limiterResistance: number;
  /** The worst switch-on angle found, degrees. */
  angle: number;
  sweep: SweepResult;
  /** The full run at that angle. */
  result: MainsResult;
}

export interface ColdHotComparison {
  cold: ColdHotCase;
  hot: ColdHotCase;
}

/** The design with its NTC starting at temperature T (K). */
export function withStartTemperature(design: MainsDesign, temperature: number): MainsDesign {
  const limiter = design.mains.limiter;
  if (limiter.kind !== 'ntc')
    throw new DesignError('the cold/hot comparison needs an NTC limiter (kind "ntc")', 'mains.limiter.kind');
  return { ...design, mains: { ...design.mains, limiter: { ...limiter, startTemperature: temperature } } };
}

function temperatureOf(value: number | string | undefined, fallback: number, field: string): number {
  if (value === undefined) return fallback;
  const t = parseTemperature(value, field);
  if (!(t >= 150 && t <= 700)) throw new DesignError(`must be between 150 K and 700 K (got ${t} K)`, field);
  return t;
}

export function compareColdHot(design: MainsDesign, options: ColdHotOptions = {}): ColdHotComparison {
  const cold = temperatureOf(options.cold, NTC_COLD_START, 'cold');
  const hot = temperatureOf(options.hot, NTC_HOT_RESTART, 'hot');
  const one = (temperature: number): ColdHotCase => {
    const at = withStartTemperature(design, temperature);
    const sweep = sweepSwitchOnAngle(at, options.sweep);
    const limiter = at.mains.limiter as Extract<MainsDesign['mains']['limiter'], { kind: 'ntc' }>;
    return {
      startTemperature: temperature,
      limiterResistance: ntcResistance(limiter.r25, limiter.beta, temperature),
      angle: sweep.worst.angle,
      sweep,
      result: simulateMains(withAngle(at, sweep.worst.angle), options.simulate),
    };
  };
  return { cold: one(cold), hot: one(hot) };
}
