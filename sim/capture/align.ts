/**
 * Putting a capture beside a simulation: shifting it in time, sampling it at other instants, and
 * the residual between the two where they overlap.
 */
import { channelOf, type Capture, type CaptureQuantity } from './map';

/** The engine's waveform, or anything with the same arrays (seconds, volts, amperes). */
export interface SimulatedWaveform {
  t: ArrayLike<number>;
  /** Capacitor voltage behind the ESR. */
  vC: ArrayLike<number>;
  /** Bus (terminal) voltage. */
  v: ArrayLike<number>;
  /** Series current. */
  i: ArrayLike<number>;
}

/** Which simulated array a measured quantity compares with. */
export function simulatedSeries(simulated: SimulatedWaveform, quantity: CaptureQuantity): ArrayLike<number> {
  switch (quantity) {
    case 'capacitorVoltage':
      return simulated.vC;
    case 'busVoltage':
      return simulated.v;
    case 'current':
      return simulated.i;
  }
}

/** The capture moved later by `offsetSeconds` (earlier when negative). */
export function alignCapture(capture: Capture, offsetSeconds: number): Capture {
  if (!Number.isFinite(offsetSeconds)) throw new RangeError('the alignment offset must be a finite number of seconds');
  return {
    time: capture.time.map((t) => t + offsetSeconds),
    channels: capture.channels,
    alignment: capture.alignment + offsetSeconds,
  };
}

/**
 * Linear interpolation of (t, y) at the increasing instants `at`; NaN outside [t[0], t[n−1]].
 * One merged walk over both axes, so a million samples cost a million steps.
 */
export function interpolate(t: ArrayLike<number>, y: ArrayLike<number>, at: ArrayLike<number>): Float64Array {
  const out = new Float64Array(at.length);
  const n = t.length;
  let k = 0;
  for (let j = 0; j < at.length; j++) {
    const x = at[j];
    if (n === 0 || !(x >= t[0]) || !(x <= t[n - 1])) {
      out[j] = NaN;
      continue;
    }
    if (k > 0 && x < t[k]) k = 0; // `at` went backwards: start the walk again
    while (k < n - 2 && t[k + 1] < x) k++;
    if (n === 1) {
      out[j] = y[0];
      continue;
    }
    const t0 = t[k];
    const t1 = t[k + 1];
    const w = t1 > t0 ? (x - t0) / (t1 - t0) : 0;
    out[j] = y[k] + w * (y[k + 1] - y[k]);
  }
  return out;
}

/** Every channel of the capture at the instants `t` (NaN where the capture has no data). */
export function resampleOnto(capture: Capture, t: ArrayLike<number>): Float64Array[] {
  return capture.channels.map((channel) => interpolate(capture.time, channel.values, t));
}

export interface CaptureResidual {
  /** Root mean square of simulated − measured, in V or A; NaN without overlap. */
  rms: number;
  /** Largest |simulated − measured|, with its time. */
  max: number;
  maxTime: number;
  /** Measured samples compared. */
  count: number;
  /** The compared time range (seconds, on the simulation's axis); null without overlap. */
  overlap: [number, number] | null;
}

/**
 * Simulated minus measured for one quantity, at the capture's own samples (moved by `offset`
 * seconds) that fall inside the simulated time range; the simulation is interpolated there.
 */
export function captureResidual(
  capture: Capture,
  simulated: SimulatedWaveform,
  quantity: CaptureQuantity,
  offset = 0,
): CaptureResidual {
  const channel = channelOf(capture, quantity);
  if (!channel) throw new RangeError(`the capture has no ${quantity} channel`);
  const times = offset === 0 ? capture.time : capture.time.map((t) => t + offset);
  const model = interpolate(simulated.t, simulatedSeries(simulated, quantity), times);
  let sum = 0;
  let count = 0;
  let max = 0;
  let maxTime = NaN;
  let first = NaN;
  let last = NaN;
  for (let k = 0; k < times.length; k++) {
    if (Number.isNaN(model[k])) continue;
    const error = model[k] - channel.values[k];
    sum += error * error;
    count++;
    if (Math.abs(error) > max || count === 1) {
      max = Math.abs(error);
      maxTime = times[k];
    }
    if (count === 1) first = times[k];
    last = times[k];
  }
  if (count === 0) return { rms: NaN, max: NaN, maxTime: NaN, count: 0, overlap: null };
  return { rms: Math.sqrt(sum / count), max, maxTime, count, overlap: [first, last] };
}
