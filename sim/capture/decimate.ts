/**
 * Fewer points for display and for fitting.
 *
 * `decimate` keeps, in each time bucket, the samples where each channel has its minimum and its
 * maximum, so that a narrow spike or the first overshoot is still on the chart after a million
 * samples become two thousand. Every kept point is a real sample (all channels at the same instant).
 *
 * `averageBins` averages each bucket instead: less noise, no spikes kept, for least squares.
 */
import type { Capture } from './map';

/** At most `maxPoints` samples; a capture that already fits is returned as it is. */
export function decimate(capture: Capture, maxPoints = 2000): Capture {
  const n = capture.time.length;
  if (!(maxPoints >= 2)) throw new RangeError('maxPoints must be at least 2');
  if (n <= maxPoints) return capture;
  const channels = Math.max(1, capture.channels.length);
  // Each bucket keeps up to two samples per channel; the first and last sample are kept too.
  const buckets = Math.max(1, Math.floor((maxPoints - 2) / (2 * channels)));
  const keep = new Uint8Array(n);
  keep[0] = 1;
  keep[n - 1] = 1;
  for (let b = 0; b < buckets; b++) {
    const start = Math.floor((b * n) / buckets);
    const end = Math.floor(((b + 1) * n) / buckets);
    if (end <= start) continue;
    if (capture.channels.length === 0) {
      keep[start] = 1;
      continue;
    }
    for (const channel of capture.channels) {
      const values = channel.values;
      let low = start;
      let high = start;
      for (let k = start + 1; k < end; k++) {
        if (values[k] < values[low]) low = k;
        if (values[k] > values[high]) high = k;
      }
      keep[low] = 1;
      keep[high] = 1;
    }
  }
  const indices: number[] = [];
  for (let k = 0; k < n; k++) if (keep[k]) indices.push(k);
  const pick = (source: Float64Array) => Float64Array.from(indices, (k) => source[k]);
  return {
    time: pick(capture.time),
    channels: capture.channels.map((channel) => ({ ...channel, values: pick(channel.values) })),
    alignment: capture.alignment,
  };
}

/** Averages consecutive samples into at most `maxPoints` buckets (time averaged too). */
export function averageBins(capture: Capture, maxPoints: number): Capture {
  const n = capture.time.length;
  if (n <= maxPoints) return capture;
  const buckets = Math.max(1, Math.floor(maxPoints));
  const average = (source: Float64Array) => {
    const out = new Float64Array(buckets);
    for (let b = 0; b < buckets; b++) {
      const start = Math.floor((b * n) / buckets);
      const end = Math.floor(((b + 1) * n) / buckets);
      let sum = 0;
      for (let k = start; k < end; k++) sum += source[k];
      out[b] = sum / (end - start);
    }
    return out;
  };
  return {
    time: average(capture.time),
    channels: capture.channels.map((channel) => ({ ...channel, values: average(channel.values) })),
    alignment: capture.alignment,
  };
}
