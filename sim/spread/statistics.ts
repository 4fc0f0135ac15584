/**
 * Order statistics and histograms over a column of sample values (NaN = not applicable, skipped).
 * Percentiles use selection (Hoare's FIND, Comm. ACM 4 (1961) 321), not a full sort: a spread
 * summarises some seventy columns of up to 100 000 values.
 */

export interface ColumnSummary {
  /** Samples where the value applies. */
  count: number;
  min: number | null;
  max: number | null;
  /** Indices (into the column) of the first sample at the minimum and at the maximum. */
  minIndex: number | null;
  maxIndex: number | null;
  mean: number | null;
  /** 1st and 99th percentiles, linear interpolation between order statistics (Hyndman & Fan type 7). */
  p1: number | null;
  p99: number | null;
  /** The applicable values (in no particular order); kept for the histogram. */
  values: Float64Array;
}

export function summariseColumn(column: Float64Array): ColumnSummary {
  let count = 0;
  let min = Infinity;
  let max = -Infinity;
  let minIndex = -1;
  let maxIndex = -1;
  let sum = 0;
  const values = new Float64Array(column.length);
  for (let k = 0; k < column.length; k++) {
    const x = column[k];
    if (x !== x) continue; // NaN: not applicable
    values[count++] = x;
    sum += x;
    if (x < min) {
      min = x;
      minIndex = k;
    }
    if (x > max) {
      max = x;
      maxIndex = k;
    }
  }
  const applicable = values.subarray(0, count);
  if (count === 0) {
    return { count, min: null, max: null, minIndex: null, maxIndex: null, mean: null, p1: null, p99: null, values: applicable };
  }
  const work = new Float64Array(applicable);
  return {
    count,
    min,
    max,
    minIndex,
    maxIndex,
    mean: sum / count,
    p1: quantileInPlace(work, 0.01),
    p99: quantileInPlace(work, 0.99),
    values: applicable,
  };
}

/** Quantile of sorted values, type 7: h = (n − 1)·p, interpolate between floor(h) and floor(h) + 1. */
export function quantile(sorted: ArrayLike<number>, p: number): number {
  const n = sorted.length;
  if (n === 1) return sorted[0];
  const h = (n - 1) * p;
  const lo = Math.floor(h);
  const hi = Math.min(n - 1, lo + 1);
  return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
}

/** The type-7 quantile of unsorted values, by selection; reorders `a`. */
export function quantileInPlace(a: Float64Array, p: number): number {
  const n = a.length;
  if (n === 1) return a[0];
  const h = (n - 1) * p;
  const lo = Math.floor(h);
  const below = select(a, lo);
  if (lo + 1 >= n || h === lo) return below;
  // After selection everything past lo is ≥ a[lo]: the next order statistic is their minimum.
  let above = Infinity;
  for (let k = lo + 1; k < n; k++) if (a[k] < above) above = a[k];
  return below + (h - lo) * (above - below);
}

/** Puts the k-th smallest value at a[k] (smaller before it, larger after it) and returns it. */
function select(a: Float64Array, k: number): number {
  let left = 0;
  let right = a.length - 1;
  while (right > left) {
    // Median of three as the pivot keeps sorted or constant runs from going quadratic.
    const mid = (left + right) >>> 1;
    const pivot = median3(a[left], a[mid], a[right]);
    let i = left;
    let j = right;
    while (i <= j) {
      while (a[i] < pivot) i++;
      while (a[j] > pivot) j--;
      if (i <= j) {
        const t = a[i];
        a[i] = a[j];
        a[j] = t;
        i++;
        j--;
      }
    }
    if (k <= j) right = j;
    else if (k >= i) left = i;
    else return a[k];
  }
  return a[k];
}

function median3(x: number, y: number, z: number): number {
  return x < y ? (y < z ? y : x < z ? z : x) : x < z ? x : y < z ? z : y;
}

export interface HistogramBin {
  /** from ≤ x < to (the last bin includes its top). */
  from: number;
  to: number;
  count: number;
}

/** Equal-width bins over [min, max] of the values; a single value gets one bin holding it all. */
export function histogramBins(values: Float64Array, min: number | null, max: number | null, bins: number): HistogramBin[] {
  if (values.length === 0 || min === null || max === null) return [];
  if (!(max > min)) return [{ from: min, to: max, count: values.length }];
  const width = (max - min) / bins;
  const out: HistogramBin[] = Array.from({ length: bins }, (_, k) => ({
    from: min + k * width,
    to: k === bins - 1 ? max : min + (k + 1) * width,
    count: 0,
  }));
  for (let k = 0; k < values.length; k++) out[Math.min(bins - 1, Math.floor((values[k] - min) / width))].count++;
  return out;
}
