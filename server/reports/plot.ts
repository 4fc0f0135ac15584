// Vector waveform plots for the margin report: axes with engineering-notation ticks, the trace
// (min/max-decimated so that no peak is lost), the peak marked, rating lines dashed in the colour
// of the status they would trip.
import type PDFDocument from 'pdfkit';
import { formatEng } from '../services/engine';
import { colours, fonts } from './theme';

type Doc = InstanceType<typeof PDFDocument>;

export interface PlotLine {
  value: number;
  label: string;
  colour: string;
}

export interface PlotSpec {
  title: string;
  unit: string;
  colour: string;
  t: number[];
  y: number[];
  /** The extreme to mark; its value is looked up on the trace at `time` when `onTrace`. */
  peaks: { time: number; value: number; label: string }[];
  lines: PlotLine[];
}

/** "Nice" tick positions (1, 2, 5 × 10^k) covering [min, max]. */
export function niceTicks(min: number, max: number, count = 5): number[] {
  if (!(max > min)) return [min];
  const raw = (max - min) / count;
  const power = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((m) => m * power).find((s) => s >= raw) ?? 10 * power;
  const ticks: number[] = [];
  for (let v = Math.ceil(min / step) * step; v <= max + step * 1e-9; v += step) ticks.push(Math.abs(v) < step * 1e-9 ? 0 : v);
  return ticks;
}

/** At most two points (min and max, in time order) per bucket. */
export function decimate(t: number[], y: number[], buckets: number): { t: number[]; y: number[] } {
  if (t.length <= buckets * 2) return { t, y };
  const outT: number[] = [];
  const outY: number[] = [];
  const size = t.length / buckets;
  for (let b = 0; b < buckets; b++) {
    const start = Math.floor(b * size);
    const end = Math.min(t.length, Math.floor((b + 1) * size));
    let lo = start;
    let hi = start;
    for (let k = start; k < end; k++) {
      if (y[k] < y[lo]) lo = k;
      if (y[k] > y[hi]) hi = k;
    }
    for (const k of lo <= hi ? [lo, hi] : [hi, lo]) {
      if (outT.length === 0 || outT[outT.length - 1] !== t[k] || outY[outY.length - 1] !== y[k]) {
        outT.push(t[k]);
        outY.push(y[k]);
      }
    }
  }
  return { t: outT, y: outY };
}

const finite = (values: number[]) => values.filter((v) => Number.isFinite(v));

export function drawPlot(doc: Doc, spec: PlotSpec, x: number, y: number, width: number, height: number): void {
  const left = 52;
  const bottom = 22;
  const top = 16;
  const plotX = x + left;
  const plotY = y + top;
  const plotW = width - left - 8;
  const plotH = height - top - bottom;

  doc.font(fonts.semibold).fontSize(9).fillColor(colours.ink).text(spec.title, x, y, { width, lineBreak: false });

  const ys = finite(spec.y);
  const ts = finite(spec.t);
  if (ys.length === 0 || ts.length < 2) {
    doc
      .font(fonts.regular)
      .fontSize(8)
      .fillColor(colours.muted)
      .text('No waveform data.', plotX, plotY + plotH / 2);
    return;
  }
  const tMin = ts[0];
  const tMax = ts[ts.length - 1];
  const candidates = [...ys, 0, ...spec.lines.map((l) => l.value)];
  let yMin = Math.min(...candidates);
  let yMax = Math.max(...candidates);
  if (yMax === yMin) yMax = yMin + 1;
  const pad = (yMax - yMin) * 0.06;
  yMin -= yMin < 0 ? pad : 0;
  yMax += pad;
  const sx = (t: number) => plotX + ((t - tMin) / (tMax - tMin)) * plotW;
  const sy = (v: number) => plotY + plotH - ((v - yMin) / (yMax - yMin)) * plotH;

  // Grid and ticks.
  doc.save();
  doc.lineWidth(0.4).strokeColor(colours.hairline);
  doc.font(fonts.mono).fontSize(6.5).fillColor(colours.muted);
  for (const v of niceTicks(yMin, yMax, 5)) {
    const py = sy(v);
    doc
      .moveTo(plotX, py)
      .lineTo(plotX + plotW, py)
      .stroke();
    doc.text(formatEng(v, spec.unit), x, py - 3, { width: left - 4, align: 'right', lineBreak: false });
  }
  for (const t of niceTicks(tMin, tMax, 6)) {
    const px = sx(t);
    doc
      .moveTo(px, plotY)
      .lineTo(px, plotY + plotH)
      .stroke();
    doc.text(formatEng(t, 's'), px - 25, plotY + plotH + 4, { width: 50, align: 'center', lineBreak: false });
  }
  doc.lineWidth(0.6).strokeColor(colours.muted).rect(plotX, plotY, plotW, plotH).stroke();
  doc.restore();

  // Rating lines, dashed; labels at the right, kept apart so that close limits stay readable.
  const visible = spec.lines.filter((l) => l.value >= yMin && l.value <= yMax).map((l) => ({ ...l, py: sy(l.value) }));
  for (const line of visible) {
    doc.save();
    doc.lineWidth(0.8).strokeColor(line.colour).dash(4, { space: 3 });
    doc
      .moveTo(plotX, line.py)
      .lineTo(plotX + plotW, line.py)
      .stroke();
    doc.undash();
    doc.restore();
  }
  const labels = [...visible].sort((a, b) => a.py - b.py);
  let lastY = -Infinity;
  for (const line of labels) {
    const labelY = Math.max(line.py - 9, lastY + 8.5, plotY + 1);
    lastY = labelY;
    doc.font(fonts.regular).fontSize(6.5);
    const width = doc.widthOfString(line.label) + 4;
    doc.save();
    doc.rect(plotX + plotW - width - 2, labelY - 0.5, width, 8).fill(colours.paper);
    doc.fillColor(line.colour).text(line.label, plotX + plotW - width, labelY, { width, lineBreak: false });
    doc.restore();
  }

  // The trace.
  const trace = decimate(spec.t, spec.y, Math.max(50, Math.round(plotW)));
  doc.save();
  doc.rect(plotX, plotY, plotW, plotH).clip();
  doc.lineWidth(1).strokeColor(spec.colour).lineJoin('round');
  let started = false;
  for (let k = 0; k < trace.t.length; k++) {
    if (!Number.isFinite(trace.y[k]) || !Number.isFinite(trace.t[k])) {
      started = false;
      continue;
    }
    if (started) doc.lineTo(sx(trace.t[k]), sy(trace.y[k]));
    else doc.moveTo(sx(trace.t[k]), sy(trace.y[k]));
    started = true;
  }
  doc.stroke();
  doc.restore();

  // Peaks: a ring on the trace and the value beside it.
  for (const peak of spec.peaks) {
    if (!Number.isFinite(peak.time) || !Number.isFinite(peak.value)) continue;
    const px = sx(Math.min(tMax, Math.max(tMin, peak.time)));
    const py = sy(peak.value);
    doc.save();
    doc.lineWidth(0.9).strokeColor(colours.ink).circle(px, py, 2.6).stroke();
    const labelY = Math.max(plotY + 1, Math.min(plotY + plotH - 9, py - 10));
    doc.font(fonts.regular).fontSize(6.5);
    const width = doc.widthOfString(peak.label) + 4;
    const boxX = px > plotX + plotW - 140 ? px - 5 - width : px + 5;
    doc.rect(boxX, labelY - 0.5, width, 8).fill(colours.paper);
    doc.fillColor(colours.ink).text(peak.label, boxX + 2, labelY, { width, lineBreak: false });
    doc.restore();
  }
}

/** The sample nearest to `time` (the trace value to mark a peak on). */
export function valueAt(t: number[], y: number[], time: number): number {
  let best = 0;
  for (let k = 1; k < t.length; k++) if (Math.abs(t[k] - time) < Math.abs(t[best] - time)) best = k;
  return y[best];
}
