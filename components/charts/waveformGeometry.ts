// The arithmetic behind WaveformChart, kept apart from the drawing so that it can be tested: which
// panels there are, their scales, the peaks and where their markers sit, and the zoom windows.
import { scaleLinear, type ScaleLinear } from 'd3-scale';

export type SeriesKey = 'vC' | 'v' | 'i' | 'prechargePower';
export type PanelKey = 'voltage' | 'current' | 'power';

export interface WaveformData {
  t: number[];
  vC: number[];
  v: number[];
  i: number[];
  prechargePower?: number[];
}

export interface Peak {
  value: number;
  time: number;
}

export interface RatingLine {
  panel: PanelKey;
  value: number;
  label: string;
  /** The status a trace above this line would get: derated limit → warn, rating → fail. */
  status: 'warn' | 'fail';
}

export const SERIES: Record<SeriesKey, { label: string; unit: string; panel: PanelKey; short: string }> = {
  vC: { label: 'Capacitor voltage', short: 'vC', unit: 'V', panel: 'voltage' },
  v: { label: 'Bus voltage', short: 'bus', unit: 'V', panel: 'voltage' },
  i: { label: 'Current', short: 'i', unit: 'A', panel: 'current' },
  prechargePower: { label: 'Precharge resistor power', short: 'P(Rpre)', unit: 'W', panel: 'power' },
};

export const PANELS: Record<PanelKey, { title: string; unit: string; series: SeriesKey[] }> = {
  voltage: { title: 'Voltage', unit: 'V', series: ['vC', 'v'] },
  current: { title: 'Current', unit: 'A', series: ['i'] },
  power: { title: 'Precharge resistor power', unit: 'W', series: ['prechargePower'] },
};

export const MARGIN = { left: 56, right: 14, top: 10, bottom: 6, axis: 22 } as const;

/** The largest |y| of a series and when it happens (the first time, if it repeats). */
export function findPeak(t: readonly number[], y: readonly number[] | undefined): Peak | null {
  if (!y || y.length === 0 || t.length === 0) return null;
  let best = 0;
  for (let k = 1; k < y.length; k++) if (Math.abs(y[k]) > Math.abs(y[best])) best = k;
  return { value: y[best], time: t[best] };
}

/** True when a series has something to show (resistor power is zero when there is no precharge). */
export function hasSignal(y: readonly number[] | undefined): boolean {
  return !!y && y.length > 0 && y.some((v) => Math.abs(v) > 0);
}

/** The first index with t ≥ time (binary search on the sorted time axis). */
export function indexAtTime(t: readonly number[], time: number): number {
  let lo = 0;
  let hi = t.length - 1;
  if (hi < 0) return 0;
  if (time <= t[0]) return 0;
  if (time >= t[hi]) return hi;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (t[mid] < time) lo = mid;
    else hi = mid;
  }
  return time - t[lo] <= t[hi] - time ? lo : hi;
}

/** A 1-2-5 round number at or below x. */
export function niceBelow(x: number): number {
  if (!(x > 0)) return x;
  const e = Math.floor(Math.log10(x));
  const f = x / 10 ** e;
  const m = f >= 5 ? 5 : f >= 2 ? 2 : 1;
  return m * 10 ** e;
}

/** Zoom windows: the whole run and two round spans near its start ("first milliseconds"). */
export function zoomWindows(duration: number): number[] {
  const out = [duration];
  for (const fraction of [0.1, 0.01]) {
    const w = niceBelow(duration * fraction);
    if (w > 0 && w < duration && !out.includes(w)) out.push(w);
  }
  return out;
}

export interface PanelGeometry {
  key: PanelKey;
  series: SeriesKey[];
  top: number;
  height: number;
  /** Height of the plotting area inside the panel. */
  plotHeight: number;
  x: ScaleLinear<number, number>;
  y: ScaleLinear<number, number>;
  lines: RatingLine[];
  /** Rating lines far above the traces: named in words, not drawn. */
  offscale: RatingLine[];
  showAxis: boolean;
}

export interface ChartGeometry {
  width: number;
  height: number;
  window: number;
  panels: PanelGeometry[];
  x: ScaleLinear<number, number>;
}

function seriesValues(data: WaveformData, key: SeriesKey): number[] | undefined {
  return data[key];
}

/** Lays out the panels for a width and a zoom window (0 … window seconds). */
export function layoutChart(
  data: WaveformData,
  width: number,
  window: number,
  ratingLines: RatingLine[] = [],
  panelHeight = 150,
): ChartGeometry {
  const x = scaleLinear()
    .domain([0, window])
    .range([MARGIN.left, width - MARGIN.right]);
  const keys = (Object.keys(PANELS) as PanelKey[]).filter((k) => PANELS[k].series.some((s) => hasSignal(seriesValues(data, s))));
  const end = indexAtTime(data.t, window);
  let top = 0;
  const panels = keys.map((key, index) => {
    const series = PANELS[key].series.filter((s) => hasSignal(seriesValues(data, s)));
    let lo = 0;
    let hi = 0;
    for (const s of series) {
      const y = seriesValues(data, s)!;
      for (let k = 0; k <= end && k < y.length; k++) {
        if (y[k] < lo) lo = y[k];
        if (y[k] > hi) hi = y[k];
      }
    }
    if (hi === lo) hi = lo + 1;
    const mine = ratingLines.filter((l) => l.panel === key);
    // A rating line within reach of the traces stretches the axis to show it; one far above would
    // squash the waveform, so it is named under the chart instead.
    const lines = mine.filter((l) => l.value <= Math.max(hi, 0) * 1.6 && l.value >= lo);
    const offscale = mine.filter((l) => !lines.includes(l));
    for (const l of lines) hi = Math.max(hi, l.value);
    const showAxis = index === keys.length - 1;
    const height = panelHeight + (showAxis ? MARGIN.axis : 0);
    const plotHeight = panelHeight - MARGIN.top - MARGIN.bottom;
    const y = scaleLinear()
      .domain([lo, hi + (hi - lo) * 0.08])
      .nice(5)
      .range([MARGIN.top + plotHeight, MARGIN.top]);
    const geometry: PanelGeometry = { key, series, top, height, plotHeight, x, y, lines, offscale, showAxis };
    top += height;
    return geometry;
  });
  return { width, height: top, window, panels, x };
}

/**
 * The points to draw in the window, at most about two per pixel column: each column keeps its
 * first, lowest, highest and last sample so that narrow spikes survive the thinning.
 */
export function thin(
  t: readonly number[],
  y: readonly number[],
  window: number,
  x: ScaleLinear<number, number>,
): [number, number][] {
  const end = Math.min(indexAtTime(t, window) + 1, t.length - 1);
  const out: [number, number][] = [];
  const count = end + 1;
  const columns = Math.max(1, Math.round(x.range()[1] - x.range()[0]));
  if (count <= columns * 2) {
    for (let k = 0; k <= end; k++) out.push([t[k], y[k]]);
    return out;
  }
  let column = -1;
  let first = 0;
  let min = 0;
  let max = 0;
  let last = 0;
  const flush = () => {
    const picks = [first, min, max, last].filter((v, i, a) => a.indexOf(v) === i).sort((a, b) => a - b);
    for (const k of picks) out.push([t[k], y[k]]);
  };
  for (let k = 0; k <= end; k++) {
    const c = Math.floor(x(t[k]));
    if (c !== column) {
      if (column !== -1) flush();
      column = c;
      first = min = max = last = k;
    } else {
      if (y[k] < y[min]) min = k;
      if (y[k] > y[max]) max = k;
      last = k;
    }
  }
  flush();
  return out;
}

/**
 * Where each rating line's label goes so that none overlap: above its line at the right end, at the
 * left end when the right is taken, or nowhere (the line is still named in the summary text).
 */
export function placeLabels(ys: number[], gap = 13): ('right' | 'left' | null)[] {
  const order = ys.map((y, k) => ({ y, k })).sort((a, b) => a.y - b.y);
  const out: ('right' | 'left' | null)[] = ys.map(() => null);
  let lastRight = -Infinity;
  let lastLeft = -Infinity;
  for (const { y, k } of order) {
    if (y - lastRight >= gap) {
      out[k] = 'right';
      lastRight = y;
    } else if (y - lastLeft >= gap) {
      out[k] = 'left';
      lastLeft = y;
    }
  }
  return out;
}
