/**
 * Damping and ring frequency of a measured second-order ring by the logarithmic decrement.
 *
 * Source: the logarithmic decrement as given in standard vibration texts (free vibration with viscous
 * damping). For x(t) = A·e^(−ζωn·t)·cos(ωd·t + φ) about its final value, the extrema are spaced Td/2
 * apart (ωd = 2π/Td), and
 *   one period, same-sign peaks:   δ  = ln(x_n / x_{n+1}),   ζ = δ  / √(4π² + δ²)
 *   half period, alternate signs:  δh = ln(|x_n| / |x_{n+1}|), ζ = δh / √(π² + δh²)
 *   fn = fd / √(1 − ζ²).
 * The capacitor voltage and the series current of a series RLC are both of this form (REFERENCE §1),
 * so either channel gives ζ and fd.
 *
 * Peaks: the ring is cut into lobes where it crosses its final value (with a hysteresis of a few
 * noise widths so that noise near a crossing does not make extra lobes); each lobe's extreme is
 * refined by a least-squares quartic over ±Td/8 around its largest sample, which averages
 * noise; the ratio of consecutive peaks stays unbiased (every lobe has the same shape, scaled).
 * A lobe that is open at the start or at the end of the record is not used, nor any peak after the
 * first one that is lost in the noise. Without a given final value, it is estimated from the tail
 * and then from the peaks themselves (Aitken's Δ² on three consecutive extremes).
 */
import { FitError } from './errors';
import { solveLinear } from './leastSquares';

export type DecrementMode = 'full-period' | 'half-period';

export interface RingingOptions {
  /** The value the ring settles to; when omitted, estimated from the tail and the peaks (see above). */
  finalValue?: number;
  /** 'full-period' (default): same-sign peaks one period apart; 'half-period': alternate-sign peaks. */
  mode?: DecrementMode;
  /** Only samples at or after this time are used (e.g. from the switching instant on). */
  start?: number;
  /** Only samples at or before this time are used. */
  end?: number;
}

export interface RingPeak {
  time: number;
  /** Measured from the final value (signed). */
  value: number;
}

export interface RingingEstimate {
  mode: DecrementMode;
  finalValue: number;
  /** Standard deviation of the noise, estimated from second differences. */
  noise: number;
  peaks: RingPeak[];
  /** Damped ring frequency fd (Hz) from the spacing of all peaks. */
  fd: number;
  /** Logarithmic decrement per period, δ (for half-period mode, 2·δh). */
  logDecrement: number;
  /** The decrements that were averaged (per period, or per half period in half-period mode). */
  decrements: number[];
  zeta: number;
  /** Undamped natural frequency fn (Hz). */
  fn: number;
}

/** ζ from the decrement between same-sign peaks one period apart. */
export function zetaFromLogDecrement(delta: number): number {
  return delta / Math.sqrt(4 * Math.PI * Math.PI + delta * delta);
}

/** ζ from the decrement between alternate-sign peaks half a period apart. */
export function zetaFromHalfPeriodDecrement(deltaHalf: number): number {
  return deltaHalf / Math.sqrt(Math.PI * Math.PI + deltaHalf * deltaHalf);
}

/** δ for a given ζ (the inverse of zetaFromLogDecrement): 2πζ/√(1 − ζ²). */
export function logDecrementFromZeta(zeta: number): number {
  return (2 * Math.PI * zeta) / Math.sqrt(1 - zeta * zeta);
}

/** fn = fd / √(1 − ζ²). */
export function naturalFrequency(fd: number, zeta: number): number {
  return fd / Math.sqrt(1 - zeta * zeta);
}

function median(values: number[]): number {
  if (values.length === 0) return 0;
  const sorted = [...values].sort((a, b) => a - b);
  const mid = sorted.length >> 1;
  return sorted.length % 2 ? sorted[mid] : (sorted[mid - 1] + sorted[mid]) / 2;
}

/** Noise σ from the median absolute second difference (a smooth ring contributes little to it). */
function noiseLevel(y: Float64Array): number {
  const d2: number[] = [];
  for (let k = 1; k < y.length - 1; k++) d2.push(Math.abs(y[k + 1] - 2 * y[k] + y[k - 1]));
  return median(d2) / 0.6745 / Math.sqrt(6);
}

/** Degree of the polynomial fitted to ln|y| around each peak. */
const PEAK_DEGREE = 4;

/**
 * The extreme of a least-squares quartic through samples lo..hi around c (the lobe turned positive
 * by `sign`). Over ±Td/8 a parabola would do for the ratios (every lobe has the same shape, so its
 * bias cancels), but not for the peak itself: a damped lobe rises faster than it falls, which pulls
 * a parabola's vertex later by about (α/ωd)·w²/10 rad over a window of ±w rad (1.2 % of the time for
 * ζ = 0.28). The odd and quartic terms take that asymmetry and the flattening of the cosine.
 * (Fitting ln|y| instead would make the decay a straight line, but the log amplifies the noise on
 * the small late peaks, measured here as up to 10 × worse L and R on noisy synthetic rings.)
 */
function lobeExtreme(t: Float64Array, y: Float64Array, lo: number, hi: number, c: number, sign: 1 | -1): RingPeak | null {
  const terms = PEAK_DEGREE + 1;
  if (hi - lo + 1 < terms + 2) return null;
  const t0 = t[c];
  const span = Math.max(Math.abs(t[hi] - t0), Math.abs(t[lo] - t0)) || 1;
  // Normal equations of sign·y ≈ Σ a_j·u^j, u = (t − t0)/span (scaled for conditioning).
  const moments = new Array<number>(2 * terms - 1).fill(0);
  const rhs = new Array<number>(terms).fill(0);
  for (let k = lo; k <= hi; k++) {
    const u = (t[k] - t0) / span;
    const w = sign * y[k];
    let power = 1;
    for (let j = 0; j < moments.length; j++) {
      moments[j] += power;
      if (j < terms) rhs[j] += power * w;
      power *= u;
    }
  }
  const a = solveLinear(
    Array.from({ length: terms }, (_, i) => Array.from({ length: terms }, (_, j) => moments[i + j])),
    rhs,
  );
  if (!a || !(a[2] < 0)) return null; // not a maximum of sign·y
  const poly = (u: number, d: number) => {
    // d-th derivative of Σ a_j u^j at u.
    let sum = 0;
    for (let j = d; j < terms; j++) {
      let factor = 1;
      for (let m = 0; m < d; m++) factor *= j - m;
      sum += factor * a[j] * u ** (j - d);
    }
    return sum;
  };
  // Newton on the slope, from the parabola's vertex.
  let u = -a[1] / (2 * a[2]);
  for (let iteration = 0; iteration < 20; iteration++) {
    const curvature = poly(u, 2);
    if (!(curvature < 0)) return null;
    const du = poly(u, 1) / curvature;
    u -= du;
    if (Math.abs(du) < 1e-12) break;
  }
  if (!(Math.abs(u) <= 1)) return null;
  return { time: t0 + u * span, value: sign * poly(u, 0) };
}

interface Lobe {
  sign: 1 | -1;
  start: number;
  /** Index of the largest |y| in the lobe. */
  extreme: number;
  /** The lobe was already under way at the first sample. */
  openAtStart: boolean;
  /** No crossing to the other side followed before the record ended. */
  openAtEnd: boolean;
}

function findLobes(y: Float64Array, hysteresis: number): Lobe[] {
  const lobes: Lobe[] = [];
  let current: Lobe | null = null;
  for (let k = 0; k < y.length; k++) {
    const sign = y[k] > hysteresis ? 1 : y[k] < -hysteresis ? -1 : 0;
    if (sign !== 0 && (!current || current.sign !== sign)) {
      if (current) current.openAtEnd = false;
      current = {
        sign,
        start: k,
        extreme: k,
        // Beyond the band at the first sample: it may have begun before the record.
        openAtStart: k === 0,
        openAtEnd: true,
      };
      lobes.push(current);
    }
    if (current && current.sign * y[k] > current.sign * y[current.extreme]) current.extreme = k;
  }
  return lobes;
}

/** The clear peaks of the ring about `finalValue`, measured from it, and the noise level. */
function findPeaks(time: Float64Array, raw: Float64Array, finalValue: number): { peaks: RingPeak[]; noise: number } {
  const n = raw.length;
  const y = raw.map((v) => v - finalValue);
  const noise = noiseLevel(y);
  let largest = 0;
  for (const v of y) largest = Math.max(largest, Math.abs(v));
  const hysteresis = Math.max(4 * noise, 0.005 * largest);
  const lobes = findLobes(y, hysteresis);

  // Half a period in samples, from the lobe starts, sets the fitting window (±Td/8 = ±half/4).
  const spacings: number[] = [];
  for (let k = 1; k < lobes.length; k++) spacings.push(lobes[k].start - lobes[k - 1].start);
  const halfPeriodSamples = median(spacings.slice(0, 8));
  const halfWindow = Math.max(4, Math.round(halfPeriodSamples / 4));

  // A peak must stand clear of the noise: 8 σ, and 0.5 % of the largest excursion.
  const floor = Math.max(8 * noise, 0.005 * largest);
  const peaks: RingPeak[] = [];
  for (const lobe of lobes) {
    if (lobe.openAtStart) continue;
    const c = lobe.extreme;
    if (lobe.openAtEnd && c >= n - 1 - halfWindow) break;
    if (Math.abs(y[c]) < floor) break;
    const lo = Math.max(0, c - halfWindow);
    const hi = Math.min(n - 1, c + halfWindow);
    const refined = lobeExtreme(time, y, lo, hi, c, lobe.sign);
    peaks.push(refined ?? { time: time[c], value: y[c] });
    if (lobe.openAtEnd) break;
  }
  return { peaks, noise };
}

/**
 * Ring frequency, log decrement, ζ and fn of a ringing record (t increasing, x in any unit).
 * Throws FitError 'too-few-samples' or 'too-few-peaks' when the record does not show enough ring.
 */
export function estimateRinging(t: ArrayLike<number>, x: ArrayLike<number>, options: RingingOptions = {}): RingingEstimate {
  const mode = options.mode ?? 'full-period';
  if (t.length !== x.length) throw new FitError('too-few-samples', 'time and values must have the same length');
  let first = 0;
  let last = t.length - 1;
  if (options.start !== undefined) while (first <= last && t[first] < options.start) first++;
  if (options.end !== undefined) while (last >= first && t[last] > options.end) last--;
  const n = last - first + 1;
  if (n < 16) throw new FitError('too-few-samples', `the ring needs at least 16 samples; the window has ${Math.max(0, n)}`);
  const time = Float64Array.from({ length: n }, (_, k) => t[first + k]);
  const raw = Float64Array.from({ length: n }, (_, k) => x[first + k]);

  let finalValue = options.finalValue;
  let found: { peaks: RingPeak[]; noise: number };
  if (finalValue !== undefined) {
    found = findPeaks(time, raw, finalValue);
  } else {
    // First guess from the tail, then the value three consecutive extremes x0, x1, x2 of a
    // geometric ring agree on: (x1 − F)² = (x0 − F)(x2 − F), F = x2 − (x2 − x1)²/((x2 − x1) − (x1 − x0))
    // (Aitken's Δ² formula), taken on the largest three, and the peaks found again about it.
    const tail = Math.max(5, Math.floor(n / 10));
    let sum = 0;
    for (let k = n - tail; k < n; k++) sum += raw[k];
    finalValue = sum / tail;
    found = findPeaks(time, raw, finalValue);
    for (let pass = 0; pass < 2 && found.peaks.length >= 3; pass++) {
      const [x0, x1, x2] = found.peaks.slice(0, 3).map((p) => p.value + (finalValue as number));
      const denominator = x2 - x1 - (x1 - x0);
      if (!(Math.abs(denominator) > 0)) break;
      const better = x2 - ((x2 - x1) * (x2 - x1)) / denominator;
      if (!Number.isFinite(better)) break;
      finalValue = better;
      found = findPeaks(time, raw, finalValue);
    }
  }
  const { peaks, noise } = found;
  const needed = mode === 'full-period' ? 3 : 2;
  if (peaks.length < needed) {
    throw new FitError(
      'too-few-peaks',
      `found ${peaks.length} clear ${peaks.length === 1 ? 'peak' : 'peaks'} of the ring; the ${mode} decrement needs ${needed}` +
        (mode === 'full-period' ? ' (two of the same sign, one period apart)' : ''),
    );
  }

  // fd from a least-squares line through the peak times: consecutive peaks are Td/2 apart.
  const m = peaks.length;
  const meanIndex = (m - 1) / 2;
  const meanTime = peaks.reduce((s, p) => s + p.time, 0) / m;
  let sxy = 0;
  let sxx = 0;
  peaks.forEach((p, k) => {
    sxy += (k - meanIndex) * (p.time - meanTime);
    sxx += (k - meanIndex) ** 2;
  });
  const halfPeriod = sxy / sxx;
  const fd = 1 / (2 * halfPeriod);

  const step = mode === 'full-period' ? 2 : 1;
  const decrements: number[] = [];
  for (let k = 0; k + step < m; k++) decrements.push(Math.log(Math.abs(peaks[k].value) / Math.abs(peaks[k + step].value)));
  const mean = decrements.reduce((s, d) => s + d, 0) / decrements.length;
  const zeta = mode === 'full-period' ? zetaFromLogDecrement(mean) : zetaFromHalfPeriodDecrement(mean);
  return {
    mode,
    finalValue,
    noise,
    peaks,
    fd,
    logDecrement: mode === 'full-period' ? mean : 2 * mean,
    decrements,
    zeta,
    fn: naturalFrequency(fd, zeta),
  };
}

export interface SeriesRL {
  /** Total series inductance of the ring loop (H). */
  inductance: number;
  /** Total series resistance of the ring loop (Ω): source, filter, ESR, wiring. */
  resistance: number;
}

/**
 * The series L and R that ring a known capacitance at fn with damping ζ (series RLC, REFERENCE §1):
 * ωn = 1/√(LC) → L = 1/((2πfn)²·C); ζ = (R/2)·√(C/L) → R = 2ζ·√(L/C).
 */
export function inferSeriesRL({ zeta, fn, capacitance }: { zeta: number; fn: number; capacitance: number }): SeriesRL {
  if (!(capacitance > 0)) throw new FitError('bad-parameter', 'the capacitance must be greater than 0', 'capacitance');
  if (!(fn > 0) || !Number.isFinite(fn))
    throw new FitError('bad-parameter', 'the natural frequency must be greater than 0', 'fn');
  if (!(zeta >= 0 && zeta < 1)) throw new FitError('bad-parameter', 'ζ must be at least 0 and below 1 for a ring', 'zeta');
  const omega = 2 * Math.PI * fn;
  const inductance = 1 / (omega * omega * capacitance);
  return { inductance, resistance: 2 * zeta * Math.sqrt(inductance / capacitance) };
}
