/**
 * The DC operating point of a design with a constant-power load, and the load's incremental
 * resistance there.
 *
 * With the bypass closed (if there is one) the inductors are shorts and the capacitors open, so
 * v = Vs − R·(v/Rb + P/v) with R the whole series resistance: (1 + R/Rb)·v² − Vs·v + R·P = 0. The
 * higher root is the operating point a converter runs at (the lower one is the collapsed branch);
 * no real root means the source cannot deliver P through R at all. Derived (REFERENCE §3).
 *
 * A load drawing constant power P = v·i has di/dv = −P/v², so at the operating point it looks like
 * the negative resistance −V²/P. Derived (REFERENCE §3): differentiate i = P/v.
 */
import { finalSeriesResistance, type Design } from '../design';
import { DesignError } from '../errors';
import { formatEng } from '../units';

export interface OperatingPoint {
  /** Bus voltage, V. */
  v: number;
  /** Series (source) current, A: the load's P/V plus the bleeder's V/Rb. */
  i: number;
  /** Load power, W. */
  power: number;
  /** Series resistance of the path at the operating point, Ω. */
  seriesResistance: number;
}

export function constantPowerOf(design: Design): number {
  const load = design.load;
  if (!load || load.kind !== 'power' || !(load.value > 0)) {
    throw new DesignError(
      'stability needs a constant-power load (load.kind "power" with a power above 0 W): a converter behind the filter',
      'load',
    );
  }
  return load.value;
}

export function operatingPoint(design: Design): OperatingPoint {
  const power = constantPowerOf(design);
  const r = finalSeriesResistance(design);
  const vs = design.source.voltage;
  const gBleed = design.bleeder ? 1 / design.bleeder.resistance : 0;
  const a = 1 + r * gBleed;
  const disc = vs * vs - 4 * a * r * power;
  if (!(vs > 0) || disc < 0) {
    const most = vs > 0 ? (vs * vs) / (4 * a * r) : 0;
    throw new DesignError(
      `no DC operating point: the source can deliver at most ${formatEng(most, 'W')} through ${formatEng(r, 'Ω')}, less than the load's ${formatEng(power, 'W')}`,
      'load.value',
    );
  }
  // Higher root, written without cancellation.
  const v = (vs + Math.sqrt(disc)) / (2 * a);
  return { v, i: power / v + v * gBleed, power, seriesResistance: r };
}

/** −V²/P: the small-signal resistance of a constant-power load at voltage V. */
export function incrementalResistance(voltage: number, power: number): number {
  return -(voltage * voltage) / power;
}
