// The margin report: a PDF a reviewer can file. Made from the stored revision only (its canonical
// design, its stored results and policy, the analysis runs and reviews on it), with the dates and
// the file ID taken from the revision, so that the same revision in the same review state always
// gives the same bytes.
import PDFDocument from 'pdfkit';
import { asc, eq } from 'drizzle-orm';
import { analysisRuns, reviews } from '../../db/schema';
import type { AppContext } from '../context';
import {
  formatEng,
  HV_NOTICE_DISCLAIMER,
  runCheck,
  validateDesign,
  type CheckOutcome,
  type EngineCheck,
  type StoredPolicy,
} from '../services/engine';
import { loadUsers, userRef } from '../services/shape';
import { loadRevisionForExport } from './exports';
import { drawPlot, valueAt, type PlotLine } from './plot';
import { colours, fontFiles, fonts } from './theme';

type Doc = InstanceType<typeof PDFDocument>;

export const DESIGN_AID_STATEMENT =
  'This margin report is a design aid. It shows what Ringwell’s model predicts for the parameters listed, judged against the ratings entered; ' +
  'it is not a certification, a test report or a substitute for measurement on the built circuit. Local electrical codes, the applicable ' +
  'standards and qualified, licensed practice take precedence over anything in it.';

export const MODEL_ASSUMPTIONS = [
  'Lumped circuit: a voltage source with series resistance and inductance (optionally a linear rise), an optional precharge resistor with a bypass contactor, an optional filter inductor, the DC-link capacitor with its ESR, and optional damping branch, bleeder and load.',
  'Parts are linear and do not change with voltage, current or temperature. An inductor is not modelled in saturation: its current is compared with the saturation rating instead.',
  'Switches and contactors are ideal: they close in zero time after the stated delay, with no bounce, arcing or contact resistance beyond what was entered.',
  'A constant-power load draws nothing below its undervoltage threshold and constant power above it.',
  'Parasitic elements that were not entered (wiring inductance, capacitor ESL, stray capacitance) are not in the model.',
  'Nominal values only: tolerances, ageing and temperature are not varied unless a spread analysis appears below.',
  'Energy, power and I²t are compared with pulse ratings; no thermal model of any part is simulated.',
  'A margin is only as good as the rating entered. A check without a rating is not checked, and never counts as a pass.',
];

const STATUS_WORD: Record<EngineCheck['status'], string> = {
  pass: 'Pass',
  warn: 'Warn',
  fail: 'Fail',
  'not-checked': 'Not checked',
};
const STATUS_COLOUR: Record<EngineCheck['status'], string> = {
  pass: colours.pass,
  warn: colours.warn,
  fail: colours.fail,
  'not-checked': colours.notChecked,
};

/** "+12.3 %", "−36.0 %", "—" for none: the margin as the report prints it. */
export function formatMargin(marginPercent: number | null | undefined): string {
  if (marginPercent === null || marginPercent === undefined || !Number.isFinite(marginPercent)) return '—';
  const text = Math.abs(marginPercent).toFixed(1);
  return `${marginPercent < 0 ? '−' : '+'}${text} %`;
}

export interface ReportData {
  teamName: string;
  projectName: string;
  designName: string;
  revision: {
    id: string;
    sequence: number;
    sha256: string;
    engineVersion: string;
    createdAt: Date;
    note: string;
    author: string;
    isLatest: boolean;
  };
  review: string;
  designInput: unknown;
  results: CheckOutcome;
  policy: StoredPolicy;
  precharge: { options: unknown; result: unknown; createdAt: Date }[];
  /** Mains designs: the latest stored switch-on angle sweep and cold/hot comparison, if run. */
  mains?: { sweep: unknown; coldHot: unknown };
  /** Tolerance spreads run on this revision (sim/spread results), oldest first. */
  spread?: { options: unknown; result: unknown; createdAt: Date }[];
}

export async function buildMarginReport(ctx: AppContext, teamId: string, revisionId: string) {
  const row = await loadRevisionForExport(ctx, teamId, revisionId);
  const { revision } = row;
  const reviewRows = await ctx.db
    .select()
    .from(reviews)
    .where(eq(reviews.revisionId, revision.id))
    .orderBy(asc(reviews.createdAt), asc(reviews.id));
  const runs = await ctx.db
    .select()
    .from(analysisRuns)
    .where(eq(analysisRuns.revisionId, revision.id))
    .orderBy(asc(analysisRuns.createdAt), asc(analysisRuns.id));
  const people = await loadUsers(ctx.db, [revision.authorId, ...reviewRows.map((r) => r.reviewerId)]);
  const name = (id: string) => userRef(people, id)?.name ?? 'a former member';
  const data: ReportData = {
    teamName: row.teamName,
    projectName: row.projectName,
    designName: row.designName,
    revision: {
      id: revision.id,
      sequence: revision.sequence,
      sha256: revision.sha256,
      engineVersion: revision.engineVersion,
      createdAt: revision.createdAt,
      note: revision.note,
      author: name(revision.authorId),
      isLatest: row.latestRevisionId === revision.id,
    },
    review: describeReviews(reviewRows, name, revision.sha256),
    designInput: JSON.parse(revision.designJson),
    results: revision.results as CheckOutcome,
    policy: revision.policy as StoredPolicy,
    precharge: runs
      .filter((r) => r.kind === 'precharge')
      .map((r) => ({ options: r.options, result: r.result, createdAt: r.createdAt })),
    spread: runs
      .filter((r) => r.kind === 'spread')
      .map((r) => ({ options: r.options, result: r.result, createdAt: r.createdAt })),
    mains: {
      sweep: runs.filter((r) => r.kind === 'mains-sweep').at(-1)?.result ?? null,
      coldHot: runs.filter((r) => r.kind === 'mains-cold-hot').at(-1)?.result ?? null,
    },
  };
  const pdf = await renderMarginReport(data);
  return { pdf, revisionId: revision.id, sha256: revision.sha256, designName: row.designName, sequence: revision.sequence };
}

function describeReviews(rows: (typeof reviews.$inferSelect)[], name: (id: string) => string, sha256: string): string {
  if (rows.length === 0) return 'Not reviewed.';
  return rows
    .map((r) => {
      const who = name(r.reviewerId);
      const when = r.decidedAt ? ` on ${utcStamp(r.decidedAt)}` : '';
      switch (r.state) {
        case 'approved':
          return `Approved by ${who}${when}${r.approvedSha256 === sha256 ? ' (hash matches)' : ' (HASH DIFFERS)'}.`;
        case 'changes-requested':
          return `Changes requested by ${who}${when}.`;
        case 'superseded':
          return `Review by ${who} superseded by a newer revision.`;
        default:
          return `Review requested from ${who}, open.`;
      }
    })
    .join(' ');
}

const utcStamp = (date: Date) => `${date.toISOString().slice(0, 16).replace('T', ' ')} UTC`;

// ---------------------------------------------------------------------------------------------

const PAGE = { width: 595.28, height: 841.89, margin: 48 };
const CONTENT_WIDTH = PAGE.width - 2 * PAGE.margin;
const BOTTOM = PAGE.height - PAGE.margin - 18;

class Writer {
  y = PAGE.margin;
  constructor(readonly doc: Doc) {}

  ensure(height: number): void {
    if (this.y + height > BOTTOM) {
      this.doc.addPage();
      this.y = PAGE.margin;
    }
  }

  heading(text: string): void {
    // A heading never ends a page: keep room for a few lines under it.
    this.ensure(80);
    this.y += 10;
    this.doc.font(fonts.semibold).fontSize(12).fillColor(colours.ink).text(text, PAGE.margin, this.y, { width: CONTENT_WIDTH });
    this.y = this.doc.y + 4;
    this.doc
      .lineWidth(0.5)
      .strokeColor(colours.hairline)
      .moveTo(PAGE.margin, this.y)
      .lineTo(PAGE.margin + CONTENT_WIDTH, this.y)
      .stroke();
    this.y += 6;
  }

  paragraph(text: string, options: { size?: number; colour?: string; font?: string; indent?: number } = {}): void {
    const size = options.size ?? 9;
    const indent = options.indent ?? 0;
    const width = CONTENT_WIDTH - indent;
    this.doc.font(options.font ?? fonts.regular).fontSize(size);
    const height = this.doc.heightOfString(text, { width, lineGap: 1.5 });
    this.ensure(height + 4);
    this.doc.fillColor(options.colour ?? colours.ink).text(text, PAGE.margin + indent, this.y, { width, lineGap: 1.5 });
    this.y += height + 4;
  }

  bullet(text: string): void {
    this.doc.font(fonts.regular).fontSize(8.5);
    const height = this.doc.heightOfString(text, { width: CONTENT_WIDTH - 12, lineGap: 1.2 });
    this.ensure(height + 3);
    this.doc
      .fillColor(colours.muted)
      .circle(PAGE.margin + 3, this.y + 4.5, 1.2)
      .fill();
    this.doc.fillColor(colours.ink).text(text, PAGE.margin + 12, this.y, { width: CONTENT_WIDTH - 12, lineGap: 1.2 });
    this.y += height + 3;
  }

  /** Two-column key/value rows. */
  keyValues(rows: [string, string, { mono?: boolean }?][], keyWidth = 130): void {
    for (const [key, value, opts] of rows) {
      const font = opts?.mono ? fonts.mono : fonts.regular;
      this.doc.font(font).fontSize(opts?.mono ? 8 : 9);
      const height = Math.max(12, this.doc.heightOfString(value, { width: CONTENT_WIDTH - keyWidth }) + 3);
      this.ensure(height);
      this.doc
        .font(fonts.regular)
        .fontSize(8.5)
        .fillColor(colours.muted)
        .text(key, PAGE.margin, this.y + 0.5, { width: keyWidth - 8 });
      this.doc
        .font(font)
        .fontSize(opts?.mono ? 8 : 9)
        .fillColor(colours.ink)
        .text(value, PAGE.margin + keyWidth, this.y, { width: CONTENT_WIDTH - keyWidth });
      this.y += height;
    }
  }
}

/** Status as shape + word, never colour alone: check mark, triangle, cross, dash. */
function drawStatus(doc: Doc, status: EngineCheck['status'], x: number, y: number): void {
  const c = STATUS_COLOUR[status];
  const s = 7;
  doc.save().lineWidth(1.3).strokeColor(c).fillColor(c);
  if (status === 'pass')
    doc
      .moveTo(x, y + s * 0.55)
      .lineTo(x + s * 0.38, y + s * 0.95)
      .lineTo(x + s, y + s * 0.1)
      .stroke();
  else if (status === 'warn') doc.polygon([x + s / 2, y], [x + s, y + s], [x, y + s]).fill();
  else if (status === 'fail')
    doc
      .moveTo(x, y)
      .lineTo(x + s, y + s)
      .moveTo(x + s, y)
      .lineTo(x, y + s)
      .stroke();
  else
    doc
      .moveTo(x, y + s / 2)
      .lineTo(x + s, y + s / 2)
      .stroke();
  doc.restore();
  doc
    .font(fonts.semibold)
    .fontSize(8)
    .fillColor(c)
    .text(STATUS_WORD[status], x + s + 4, y - 0.5, { width: 60, lineBreak: false });
}

function checksTable(w: Writer, checks: EngineCheck[]): void {
  const { doc } = w;
  const cols = [
    { title: 'Status', width: 72 },
    { title: 'Check', width: 135 },
    { title: 'Value', width: 70, mono: true },
    { title: 'Derated limit', width: 76, mono: true },
    { title: 'Rating', width: 74, mono: true },
    { title: 'Margin', width: 72, mono: true },
  ];
  const header = () => {
    w.ensure(18);
    let x = PAGE.margin;
    doc.font(fonts.semibold).fontSize(8).fillColor(colours.muted);
    for (const col of cols) {
      doc.text(col.title, x, w.y, { width: col.width - 4, lineBreak: false, align: col.mono ? 'right' : 'left' });
      x += col.width;
    }
    w.y += 12;
    doc
      .lineWidth(0.5)
      .strokeColor(colours.hairline)
      .moveTo(PAGE.margin, w.y)
      .lineTo(PAGE.margin + CONTENT_WIDTH, w.y)
      .stroke();
    w.y += 4;
  };
  header();
  for (const check of checks) {
    const cells = [
      check.label,
      formatEng(check.value, check.unit),
      formatEng(check.deratedLimit, check.unit),
      formatEng(check.limit, check.unit),
      formatMargin(check.marginPercent),
    ];
    const textWidth = CONTENT_WIDTH - cols[0].width;
    doc.font(fonts.regular).fontSize(7.5);
    const messageHeight = doc.heightOfString(check.message, { width: textWidth });
    const basisHeight = doc.fontSize(6.5).heightOfString(`Basis: ${check.basis}`, { width: textWidth });
    doc.font(fonts.regular).fontSize(8.5);
    const labelHeight = doc.heightOfString(check.label, { width: cols[1].width - 4 });
    const rowHeight = Math.max(12, labelHeight + 2) + messageHeight + basisHeight + 8;
    const before = doc.bufferedPageRange().count;
    w.ensure(rowHeight);
    if (doc.bufferedPageRange().count !== before) header();
    const top = w.y;
    drawStatus(doc, check.status, PAGE.margin, top + 1.5);
    let x = PAGE.margin + cols[0].width;
    doc
      .font(fonts.regular)
      .fontSize(8.5)
      .fillColor(colours.ink)
      .text(cells[0], x, top, { width: cols[1].width - 4 });
    x += cols[1].width;
    for (let k = 1; k < cells.length; k++) {
      const col = cols[k + 1];
      doc
        .font(fonts.mono)
        .fontSize(8)
        .fillColor(k === 4 ? STATUS_COLOUR[check.status] : colours.ink)
        .text(cells[k], x, top + 0.5, { width: col.width - 4, align: 'right', lineBreak: false });
      x += col.width;
    }
    let y = top + Math.max(12, labelHeight + 2);
    doc
      .font(fonts.regular)
      .fontSize(7.5)
      .fillColor(colours.ink)
      .text(check.message, PAGE.margin + cols[0].width, y, { width: textWidth });
    y += messageHeight;
    doc
      .font(fonts.regular)
      .fontSize(6.5)
      .fillColor(colours.muted)
      .text(`Basis: ${check.basis}`, PAGE.margin + cols[0].width, y, { width: textWidth });
    w.y = top + rowHeight;
    doc
      .lineWidth(0.3)
      .strokeColor(colours.hairline)
      .moveTo(PAGE.margin, w.y - 3)
      .lineTo(PAGE.margin + CONTENT_WIDTH, w.y - 3)
      .stroke();
  }
}

// ----- parameters -----
type ParamRow = [label: string, path: string, unit: string | ((design: Record<string, unknown>) => string)];

const LOAD_UNIT: Record<string, string> = { resistance: 'Ω', current: 'A', power: 'W' };

const PARAMETERS: ParamRow[] = [
  ['Source voltage', 'source.voltage', 'V'],
  ['Source resistance', 'source.resistance', 'Ω'],
  ['Source inductance', 'source.inductance', 'H'],
  ['Source rise time', 'source.riseTime', 's'],
  ['Precharge resistance', 'precharge.resistance', 'Ω'],
  ['Bypass closes on', 'precharge.bypass.when', ''],
  ['Bypass threshold', 'precharge.bypass.fraction', '%'],
  ['Bypass time', 'precharge.bypass.time', 's'],
  ['Contactor delay', 'precharge.bypass.delay', 's'],
  ['Filter inductance', 'filter.inductance', 'H'],
  ['Filter resistance', 'filter.resistance', 'Ω'],
  ['DC-link capacitance', 'capacitor.capacitance', 'F'],
  ['Capacitor ESR', 'capacitor.esr', 'Ω'],
  ['Damping resistance', 'damping.resistance', 'Ω'],
  ['Damping capacitance', 'damping.capacitance', 'F'],
  ['Bleeder resistance', 'bleeder.resistance', 'Ω'],
  ['Load', 'load.kind', ''],
  ['Load value', 'load.value', (d) => LOAD_UNIT[String((d.load as { kind?: string } | null)?.kind)] ?? ''],
  ['Load starts at', 'load.start', 's'],
  ['Load undervoltage threshold', 'load.undervoltage', 'V'],
  ['Initial capacitor voltage', 'initial.capacitorVoltage', 'V'],
  ['Initial inductor current', 'initial.inductorCurrent', 'A'],
  ['Initial damping voltage', 'initial.dampingVoltage', 'V'],
  ['Simulated time', 'duration', 's'],
  ['Waveform points', 'points', ''],
  ['Settling fraction', 'settleFraction', '%'],
];

function at(object: unknown, path: string): unknown {
  return path
    .split('.')
    .reduce<unknown>(
      (value, key) => (value && typeof value === 'object' ? (value as Record<string, unknown>)[key] : undefined),
      object,
    );
}

function ratingUnit(key: string): string {
  if (/I2t$/i.test(key)) return 'A²s';
  if (/Voltage$/.test(key)) return 'V';
  if (/Current$/.test(key)) return 'A';
  if (/Energy$/.test(key)) return 'J';
  if (/Power$/.test(key)) return 'W';
  return '';
}

const words = (key: string) =>
  key
    .replace(/I2t/g, ' I²t')
    .replace(/([a-z])([A-Z])/g, '$1 $2')
    .toLowerCase()
    .replace(/ i²t/g, ' I²t')
    .replace(/^./, (c) => c.toUpperCase())
    .trim();

const RATING_LABELS: Record<string, string> = {
  capacitorVoltage: 'Capacitor rated voltage',
  capacitorSurgeVoltage: 'Capacitor surge voltage',
  inductorSaturationCurrent: 'Inductor saturation current',
  prechargePulseEnergy: 'Precharge resistor pulse energy',
  prechargePeakPower: 'Precharge resistor peak power',
  prechargeContinuousPower: 'Precharge resistor continuous power',
  contactorMakeCurrent: 'Contactor making current',
  contactorCarryCurrent: 'Contactor carry current',
  fuseMeltingI2t: 'Fuse melting I²t',
  diodeSurgeCurrent: 'Diode surge current (IFSM)',
  diodeI2t: 'Diode I²t',
  switchVoltage: 'Switch blocking voltage',
  cableI2t: 'Cable I²t',
};

function formatParam(value: unknown, unit: string): string | null {
  if (value === null || value === undefined) return null;
  if (typeof value === 'number') {
    if (unit === '%') return `${Number((value * 100).toPrecision(4))} %`;
    return unit ? formatEng(value, unit) : String(value);
  }
  return String(value);
}

function parameterRows(design: Record<string, unknown>): [string, string][] {
  const rows: [string, string][] = [];
  for (const [label, path, unit] of PARAMETERS) {
    const text = formatParam(at(design, path), typeof unit === 'function' ? unit(design) : unit);
    if (text !== null) rows.push([label, text]);
  }
  for (const [key, value] of Object.entries((design.ratings as Record<string, number>) ?? {}).sort()) {
    const text = formatParam(value, ratingUnit(key));
    if (text !== null) rows.push([`Rating: ${RATING_LABELS[key] ?? words(key)}`, text]);
  }
  for (const [key, value] of Object.entries((design.derating as Record<string, number>) ?? {}).sort()) {
    if (typeof value === 'number')
      rows.push([`Design derating: ${RATING_LABELS[key] ?? words(key)}`, `× ${Number(value.toPrecision(3))}`]);
  }
  return rows;
}

interface SizingFigures {
  peakCurrent?: number | null;
  prechargeTime?: number | null;
  energyPerAttempt?: number | null;
}
interface SizingCandidate {
  resistance: number;
  series: string;
  estimate?: SizingFigures;
  simulated?: SizingFigures | null;
  simulatedWithinLimits?: boolean | null;
}
interface SizingResult {
  corners?: { busVoltage: { min: number; max: number }; capacitance: { min: number; max: number } };
  window?: { min: number; max: number } | null;
  binding?: string;
  explanation?: string;
  recommended?: number | null;
  reason?: string | null;
  candidates?: SizingCandidate[];
  chosen?: { resistance: number; inWindow: boolean; checks?: EngineCheck[] } | null;
  simulationCorner?: { busVoltage: number; capacitance: number };
  simulations?: number;
  notes?: string[];
}

const BINDING_WORDS: Record<string, string> = {
  current: 'the inrush-current limit',
  time: 'the precharge-time limit',
  both: 'both limits (no standard value fits)',
  threshold: 'the load (the threshold is never reached)',
  delay: 'the contactor delay (it uses the whole time limit)',
};

/** Precharge sizing as the engine returns it (sim/precharge): the window, the pick and the values tried. */
function prechargeSection(w: Writer, run: { options: unknown; result: unknown; createdAt: Date }): void {
  const r = (run.result ?? {}) as SizingResult;
  const { doc } = w;
  w.paragraph(`Run of ${utcStamp(run.createdAt)}; limits ${describeOptions(run.options)}.`, { size: 8, colour: colours.muted });
  const rows: [string, string][] = [
    [
      'Resistance window',
      r.window ? `${formatEng(r.window.min, 'Ω')} to ${formatEng(r.window.max, 'Ω')}` : 'none: the limits leave no room',
    ],
    ['Recommended value', typeof r.recommended === 'number' ? formatEng(r.recommended, 'Ω') : 'none'],
  ];
  if (r.binding) rows.push(['Set by', BINDING_WORDS[r.binding] ?? r.binding]);
  if (r.corners) {
    rows.push([
      'Bus voltage corners',
      `${formatEng(r.corners.busVoltage.min, 'V')} to ${formatEng(r.corners.busVoltage.max, 'V')}`,
    ]);
    rows.push([
      'Capacitance corners',
      `${formatEng(r.corners.capacitance.min, 'F')} to ${formatEng(r.corners.capacitance.max, 'F')}`,
    ]);
  }
  if (r.simulationCorner && typeof r.simulations === 'number') {
    rows.push([
      'Engine runs',
      `${r.simulations} at ${formatEng(r.simulationCorner.busVoltage, 'V')}, ${formatEng(r.simulationCorner.capacitance, 'F')}`,
    ]);
  }
  if (r.chosen)
    rows.push([
      'Resistor in the design',
      `${formatEng(r.chosen.resistance, 'Ω')}, ${r.chosen.inWindow ? 'inside the window' : 'outside the window'}`,
    ]);
  w.keyValues(rows, 150);
  if (r.explanation) w.paragraph(r.explanation, { size: 8.5 });
  if (r.reason) w.paragraph(r.reason, { size: 8.5, font: fonts.semibold });
  for (const note of r.notes ?? []) w.bullet(note);

  const candidates = r.candidates ?? [];
  if (candidates.length > 0) {
    const fig = (c: SizingCandidate) => c.simulated ?? c.estimate ?? {};
    simpleTable(
      w,
      [
        { title: 'Resistor', width: 80 },
        { title: 'Series', width: 50 },
        { title: 'Peak current', width: 90, mono: true },
        { title: 'Precharge time', width: 95, mono: true },
        { title: 'Energy per attempt', width: 105, mono: true },
        { title: 'Within limits', width: 79, center: true },
      ],
      candidates
        .slice(0, 30)
        .map((c) => [
          `${formatEng(c.resistance, 'Ω')}${c.resistance === r.recommended ? ' (pick)' : ''}`,
          c.series,
          formatEng(fig(c).peakCurrent ?? null, 'A'),
          formatEng(fig(c).prechargeTime ?? null, 's'),
          formatEng(fig(c).energyPerAttempt ?? null, 'J'),
          c.simulatedWithinLimits === null || c.simulatedWithinLimits === undefined
            ? 'not run'
            : c.simulatedWithinLimits
              ? 'yes'
              : 'no',
        ]),
    );
    doc.font(fonts.regular).fontSize(7).fillColor(colours.muted);
    w.paragraph(
      'Figures are the engine’s at the stress corner, or the first-order estimate where the engine did not run the value.',
      { size: 7.5, colour: colours.muted },
    );
  }
  if (r.chosen?.checks?.length) {
    w.paragraph('The resistor in the design against its pulse ratings:', { size: 8.5, font: fonts.semibold });
    checksTable(
      w,
      [...r.chosen.checks].sort((a, b) => order(a.status) - order(b.status)),
    );
  }
}

function describeOptions(options: unknown): string {
  if (!options || typeof options !== 'object') return 'as saved';
  const o = options as Record<string, unknown>;
  const parts: string[] = [];
  if (typeof o.maxInrushCurrent === 'number') parts.push(`inrush at most ${formatEng(o.maxInrushCurrent, 'A')}`);
  if (typeof o.maxPrechargeTime === 'number') parts.push(`precharge within ${formatEng(o.maxPrechargeTime, 's')}`);
  const rest = Object.keys(o).filter((k) => k !== 'maxInrushCurrent' && k !== 'maxPrechargeTime');
  if (rest.length) parts.push(`also ${rest.join(', ')}`);
  return parts.join('; ') || 'the defaults';
}

interface MainsSweepFigures {
  worst: { angle: number; peakCurrent: number; i2t: number; refined: boolean };
  points: unknown[];
  currentAngle?: number;
}
interface MainsCaseFigures {
  startTemperature: number;
  limiterResistance: number;
  angle: number;
  metrics: Record<string, unknown>;
  checks: EngineCheck[];
}

const num = (v: unknown): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null);
const degreesText = (v: unknown) => (num(v) === null ? '—' : `${(v as number).toFixed(1)}°`);
const celsius = (kelvin: number) => `${(kelvin - 273.15).toFixed(0)} °C`;

interface SpreadFigures {
  status?: string;
  method?: string;
  distribution?: string | null;
  seed?: number | null;
  prng?: string | null;
  samples?: number;
  parameters?: { path: string; min: number; max: number; nominal: number }[];
  checks?: {
    label: string;
    unit: string;
    nominal: { marginPercent: number | null; status: string };
    marginPercent: { min: number } | null;
    worstStatus: string;
    worst: { values: Record<string, number> } | null;
  }[];
  worstCase?: { label: string; marginPercent: number; status: string; values: Record<string, number> } | null;
}

const percentText = (x: number | null | undefined) => (typeof x === 'number' && Number.isFinite(x) ? `${x.toFixed(1)} %` : '—');

/** A tolerance spread (sim/spread): how it was sampled, the worst margin per check and where. */
function spreadSection(w: Writer, run: { options: unknown; result: unknown; createdAt: Date }): void {
  const r = (run.result ?? {}) as SpreadFigures;
  if (r.status !== 'complete') return;
  const how =
    r.method === 'corners'
      ? `all ${r.samples} corners of the tolerance bands`
      : `${r.samples} Monte Carlo samples (${r.distribution ?? 'uniform'}, seed ${r.seed}, ${r.prng ?? 'seeded generator'})`;
  w.paragraph(`Run of ${utcStamp(run.createdAt)}: ${how}; other values held at nominal.`, { size: 8, colour: colours.muted });
  const parameters = r.parameters ?? [];
  if (parameters.length > 0) {
    w.keyValues(
      parameters.map((p) => [
        p.path,
        `${p.min.toPrecision(4)} to ${p.max.toPrecision(4)} (nominal ${p.nominal.toPrecision(4)}), SI units`,
      ]),
      190,
    );
  }
  const checks = (r.checks ?? []).filter((c) => c.worstStatus !== 'not-checked');
  if (checks.length > 0) {
    simpleTable(
      w,
      [
        { title: 'Check', width: 190 },
        { title: 'Nominal margin', width: 90, mono: true },
        { title: 'Worst margin', width: 90, mono: true },
        { title: 'Worst status', width: 100, center: true },
      ],
      checks.map((c) => [
        c.label,
        percentText(c.nominal.marginPercent),
        percentText(c.marginPercent?.min),
        STATUS_WORD[c.worstStatus as EngineCheck['status']] ?? c.worstStatus,
      ]),
    );
  }
  if (r.worstCase) {
    const where = Object.entries(r.worstCase.values)
      .map(([path, value]) => `${path} = ${value.toPrecision(4)}`)
      .join(', ');
    w.paragraph(
      `Worst case: ${r.worstCase.label}, margin ${percentText(r.worstCase.marginPercent)} (${STATUS_WORD[r.worstCase.status as EngineCheck['status']] ?? r.worstCase.status}), at ${where || 'the nominal values'}.`,
      { size: 8.5, font: fonts.semibold },
    );
  }
}

/** The rectifier figures of a mains design: worst angle, inrush, diode surge, limiter, cold vs hot. */
function mainsSection(w: Writer, data: ReportData): void {
  const metrics = data.results.metrics;
  const checks = data.results.checks;
  const input = (data.designInput as { mains?: Record<string, unknown> }).mains ?? {};
  const sweep = (data.mains?.sweep ?? null) as MainsSweepFigures | null;
  const coldHot = (data.mains?.coldHot ?? null) as {
    cold: MainsCaseFigures;
    hot: MainsCaseFigures;
    surgePulseDuration: number;
  } | null;
  const tHalf = num(metrics.surgePulseDuration);
  const surge = checks.find((c) => c.id === 'diode-surge-current');
  const diodeI2t = checks.find((c) => c.id === 'diode-i2t');
  const peak = extreme(metrics, 'peakCurrent');
  const limiterPeak = extreme(metrics, 'limiterPeakPower');
  const limiter = (input.limiter ?? {}) as Record<string, unknown>;

  w.heading('Mains power-up');
  w.paragraph(
    `${String(input.kind ?? 'single-phase') === 'three-phase' ? 'Three-phase' : 'Single-phase'} bridge from ${String(input.voltage ?? '—')} RMS, ${String(input.frequency ?? '50 Hz')}, switched on at ${String(input.angle ?? '90°')}; limiter ${String(limiter.kind ?? 'none')}${limiter.kind === 'ntc' ? ` (R25 ${String(limiter.r25)}, β ${String(limiter.beta)}, starting at ${String(limiter.startTemperature ?? '25 °C')})` : limiter.kind === 'resistor' ? ` (${String(limiter.resistance)})` : ''}.`,
    { size: 8.5, colour: colours.muted },
  );
  w.keyValues(
    [
      [
        'Worst switch-on angle',
        sweep
          ? `${degreesText(sweep.worst.angle)} (peak ${formatEng(sweep.worst.peakCurrent, 'A')}, I²t ${formatEng(sweep.worst.i2t, 'A²s')}; ${sweep.points.length}-point sweep${sweep.worst.refined ? ', refined' : ''})`
          : 'not swept for this revision (run the switch-on angle sweep to find it)',
      ],
      ['Peak inrush at the design angle', peak ? `${formatEng(peak.value, 'A')} at ${formatEng(peak.time, 's')}` : '—'],
      ['Line I²t (what the fuse sees)', formatEng(num(metrics.i2t), 'A²s')],
      [
        'Diode surge, half-sine equivalent',
        `${formatEng(num(metrics.surgeEquivalentCurrent), 'A')} against IFSM ${formatEng(surge?.limit ?? null, 'A')}` +
          (surge?.deratedLimit !== null && surge?.deratedLimit !== undefined && surge.deratedLimit !== surge.limit
            ? ` (derated ${formatEng(surge.deratedLimit, 'A')})`
            : ''),
      ],
      ['Worst diode I²t', `${formatEng(num(metrics.diodeI2t), 'A²s')} against ${formatEng(diodeI2t?.limit ?? null, 'A²s')}`],
      ['Limiter energy', formatEng(num(metrics.limiterEnergy), 'J')],
      ['Limiter peak power', limiterPeak ? `${formatEng(limiterPeak.value, 'W')} at ${formatEng(limiterPeak.time, 's')}` : '—'],
    ],
    190,
  );
  w.paragraph(
    `Surge equivalence: the worst single diode pulse is compared with IFSM as the one half-sine of ${formatEng(tHalf, 's')} (the IFSM test pulse, half a mains period) that has the same I²t; a half-sine of peak I lasting t has I²t = I²·t/2, so I = √(2·I²t/t). It holds for pulses no longer than that half-sine.`,
    { size: 8, colour: colours.muted },
  );
  const diodes = Array.isArray(metrics.diodes) ? (metrics.diodes as Record<string, unknown>[]) : [];
  if (diodes.length > 0)
    simpleTable(
      w,
      [
        { title: 'Diode', width: 90 },
        { title: 'Peak current', width: 100, mono: true },
        { title: 'I²t, whole run', width: 110, mono: true },
        { title: 'I²t, worst pulse', width: 110, mono: true },
        { title: 'Pulses', width: 60, mono: true },
      ],
      diodes.map((d) => [
        String(d.name ?? ''),
        formatEng(num(d.peakCurrent), 'A'),
        formatEng(num(d.i2t), 'A²s'),
        formatEng(num(d.pulseI2t), 'A²s'),
        String(num(d.pulses) ?? '—'),
      ]),
    );
  if (coldHot) {
    w.paragraph('Cold start against hot restart of the NTC, each at its own worst switch-on angle:', {
      size: 8.5,
      font: fonts.semibold,
    });
    const row = (label: string, f: (c: MainsCaseFigures) => string) => [label, f(coldHot.cold), f(coldHot.hot)];
    const status = (c: MainsCaseFigures, id: string) => {
      const check = c.checks.find((x) => x.id === id);
      return check ? ` (${STATUS_WORD[check.status] ?? check.status})` : '';
    };
    simpleTable(
      w,
      [
        { title: '', width: 170 },
        { title: `Cold, ${celsius(coldHot.cold.startTemperature)}`, width: 150, mono: true },
        { title: `Hot, ${celsius(coldHot.hot.startTemperature)}`, width: 150, mono: true },
      ],
      [
        row('NTC resistance at start', (c) => formatEng(c.limiterResistance, 'Ω')),
        row('Worst switch-on angle', (c) => degreesText(c.angle)),
        row('Peak inrush', (c) => formatEng(extreme(c.metrics, 'peakCurrent')?.value ?? null, 'A')),
        row('Line I²t', (c) => formatEng(num(c.metrics.i2t), 'A²s') + status(c, 'fuse-i2t')),
        row('Limiter energy', (c) => formatEng(num(c.metrics.limiterEnergy), 'J')),
        row(
          'Diode surge equivalent',
          (c) => formatEng(num(c.metrics.surgeEquivalentCurrent), 'A') + status(c, 'diode-surge-current'),
        ),
        row('Diode I²t', (c) => formatEng(num(c.metrics.diodeI2t), 'A²s') + status(c, 'diode-i2t')),
      ],
    );
  } else if (limiter.kind === 'ntc') {
    w.paragraph('The cold start / hot restart comparison was not run for this revision.', { size: 8.5, colour: colours.muted });
  }
}

function simpleTable(
  w: Writer,
  cols: { title: string; width: number; mono?: boolean; center?: boolean }[],
  rows: string[][],
): void {
  const align = (col: { mono?: boolean; center?: boolean }) => (col.center ? 'center' : col.mono ? 'right' : 'left');
  const { doc } = w;
  const header = () => {
    w.ensure(16);
    let x = PAGE.margin;
    doc.font(fonts.semibold).fontSize(7.5).fillColor(colours.muted);
    for (const col of cols) {
      doc.text(col.title, x, w.y, { width: col.width - 4, lineBreak: false, align: align(col) });
      x += col.width;
    }
    w.y += 11;
    doc
      .lineWidth(0.5)
      .strokeColor(colours.hairline)
      .moveTo(PAGE.margin, w.y)
      .lineTo(PAGE.margin + CONTENT_WIDTH, w.y)
      .stroke();
    w.y += 3;
  };
  header();
  for (const row of rows) {
    const before = doc.bufferedPageRange().count;
    w.ensure(12);
    if (doc.bufferedPageRange().count !== before) header();
    let x = PAGE.margin;
    row.forEach((cell, k) => {
      const col = cols[k];
      doc
        .font(col.mono ? fonts.mono : fonts.regular)
        .fontSize(col.mono ? 7.5 : 8)
        .fillColor(colours.ink)
        .text(cell, x, w.y, { width: col.width - 4, align: align(col), lineBreak: false });
      x += col.width;
    });
    w.y += 11;
  }
  w.y += 4;
}

function extreme(metrics: Record<string, unknown>, key: string): { value: number; time: number } | null {
  const m = metrics[key];
  if (m && typeof m === 'object' && typeof (m as { value?: unknown }).value === 'number') {
    const { value, time } = m as { value: number; time?: number };
    return { value, time: typeof time === 'number' ? time : NaN };
  }
  return null;
}

function ratingLines(checks: EngineCheck[], ids: string[], unit: string): PlotLine[] {
  const lines: PlotLine[] = [];
  for (const check of checks.filter((c) => ids.includes(c.id))) {
    const sign = check.id === 'capacitor-reverse-voltage' ? -1 : 1;
    if (check.limit !== null)
      lines.push({
        value: sign * check.limit,
        label: `${check.label}: ${formatEng(sign * check.limit, unit)} rating`,
        colour: colours.fail,
      });
    if (check.deratedLimit !== null && check.deratedLimit !== check.limit) {
      lines.push({
        value: sign * check.deratedLimit,
        label: `${formatEng(sign * check.deratedLimit, unit)} derated`,
        colour: colours.warn,
      });
    }
  }
  return lines;
}

const PLOT_POINTS = 1500;

export async function renderMarginReport(data: ReportData): Promise<Buffer> {
  const { revision, results } = data;
  const doc = new PDFDocument({
    size: 'A4',
    margins: { top: PAGE.margin, bottom: 0, left: PAGE.margin, right: PAGE.margin },
    bufferPages: true,
    autoFirstPage: true,
    info: {
      Title: `Margin report: ${data.designName}, revision ${revision.sequence}`,
      Author: revision.author,
      Subject: `Revision ${revision.sha256}`,
      Creator: 'Ringwell',
      Producer: 'Ringwell',
      Keywords: `ringwell margin report ${revision.sha256}`,
      // Fixed from the revision: with these, pdfkit's file ID is fixed too (it hashes the info).
      CreationDate: revision.createdAt,
      ModDate: revision.createdAt,
    },
  });
  for (const [name, file] of Object.entries(fontFiles)) doc.registerFont(name, file);
  const chunks: Buffer[] = [];
  doc.on('data', (chunk: Buffer) => chunks.push(chunk));
  const finished = new Promise<Buffer>((resolve, reject) => {
    doc.on('end', () => resolve(Buffer.concat(chunks)));
    doc.on('error', reject);
  });

  const w = new Writer(doc);
  const validation = validateDesign(data.designInput);
  const design = (validation.valid ? validation.design : data.designInput) as unknown as Record<string, unknown>;

  // ----- title block -----
  doc
    .font(fonts.semibold)
    .fontSize(8)
    .fillColor(colours.accent)
    .text('RINGWELL · MARGIN REPORT', PAGE.margin, w.y, { characterSpacing: 1 });
  w.y = doc.y + 6;
  doc.font(fonts.semibold).fontSize(20).fillColor(colours.ink).text(data.designName, PAGE.margin, w.y, { width: CONTENT_WIDTH });
  w.y = doc.y + 2;
  doc
    .font(fonts.regular)
    .fontSize(10)
    .fillColor(colours.muted)
    .text(`${data.projectName} · ${data.teamName}`, PAGE.margin, w.y, { width: CONTENT_WIDTH });
  w.y = doc.y + 10;
  w.keyValues([
    ['Project', data.projectName],
    ['Design', data.designName],
    ['Revision', `${revision.sequence}${revision.isLatest ? ' (latest)' : ' (a newer revision exists)'}`],
    ['Revision hash (SHA-256)', revision.sha256, { mono: true }],
    ['Engine version', revision.engineVersion, { mono: true }],
    ['Saved', utcStamp(revision.createdAt)],
    ['Author', revision.author],
    ['Review', data.review],
    ...(revision.note.trim() ? ([['Note', revision.note.trim()]] as [string, string][]) : []),
  ]);

  // ----- result -----
  const summary = results.summary;
  w.heading('Margins');
  w.paragraph(
    `Worst status: ${STATUS_WORD[results.worstStatus] ?? results.worstStatus}. ${summary.fail} fail, ${summary.warn} warn, ${summary.notChecked} not checked, ${summary.pass} pass. ` +
      'Margin is the headroom below the derated limit, as a percentage of it; a negative margin is past the derated limit.',
    { size: 8.5, colour: colours.muted },
  );
  checksTable(
    w,
    [...results.checks].sort((a, b) => order(a.status) - order(b.status)),
  );

  // ----- waveforms -----
  const check = runCheck(data.designInput, data.policy.team, { points: PLOT_POINTS });
  const wave = check.waveform;
  const metrics = results.metrics;
  w.heading('Waveforms');
  const plotHeight = 150;
  const vCPeak = extreme(metrics, 'peakCapacitorVoltage');
  const vCMin = extreme(metrics, 'minCapacitorVoltage');
  const iPeak = extreme(metrics, 'peakCurrent');
  const vPeak = extreme(metrics, 'peakBusVoltage');
  const plots = [
    {
      title: 'Capacitor voltage vC',
      unit: 'V',
      colour: colours.capacitorVoltage,
      t: wave.t,
      y: wave.vC,
      peaks: [
        ...(vCPeak
          ? [
              {
                time: vCPeak.time,
                value: vCPeak.value,
                label: `peak ${formatEng(vCPeak.value, 'V')} at ${formatEng(vCPeak.time, 's')}`,
              },
            ]
          : []),
        ...(vCMin && vCMin.value < 0
          ? [
              {
                time: vCMin.time,
                value: vCMin.value,
                label: `minimum ${formatEng(vCMin.value, 'V')} at ${formatEng(vCMin.time, 's')}`,
              },
            ]
          : []),
      ],
      lines: ratingLines(results.checks, ['capacitor-voltage', 'capacitor-surge-voltage', 'capacitor-reverse-voltage'], 'V'),
    },
    {
      title: 'Current i',
      unit: 'A',
      colour: colours.current,
      t: wave.t,
      y: wave.i,
      peaks: iPeak
        ? [
            {
              time: iPeak.time,
              value: valueAt(wave.t, wave.i, iPeak.time),
              label: `peak |i| ${formatEng(iPeak.value, 'A')} at ${formatEng(iPeak.time, 's')}`,
            },
          ]
        : [],
      lines: ratingLines(results.checks, ['inductor-saturation', 'contactor-make-current', 'diode-surge-current'], 'A'),
    },
    {
      title: 'Bus voltage v',
      unit: 'V',
      colour: colours.busVoltage,
      t: wave.t,
      y: wave.v,
      peaks: vPeak
        ? [
            {
              time: vPeak.time,
              value: vPeak.value,
              label: `peak ${formatEng(vPeak.value, 'V')} at ${formatEng(vPeak.time, 's')}`,
            },
          ]
        : [],
      lines: ratingLines(results.checks, ['switch-voltage'], 'V'),
    },
  ];
  for (const plot of plots) {
    w.ensure(plotHeight + 8);
    drawPlot(doc, plot, PAGE.margin, w.y, CONTENT_WIDTH, plotHeight);
    w.y += plotHeight + 8;
  }
  w.paragraph('Dashed lines: ratings in the fail colour, derated limits in the warn colour. Rings mark the peaks.', {
    size: 7.5,
    colour: colours.muted,
  });

  // ----- mains power-up -----
  const designRecord = data.designInput as Record<string, unknown> | null;
  if (designRecord && typeof designRecord === 'object' && 'mains' in designRecord) mainsSection(w, data);

  // ----- parameters -----
  w.heading('Circuit parameters');
  if (designRecord && typeof designRecord === 'object' && 'mains' in designRecord)
    w.paragraph(
      'A mains design: the rows below are its DC side as the engine sees it. The source is the rectified mains peak (√2·V less two diode drops), the source resistance and inductance are the line loop with the two conducting diodes, and the precharge resistance is the limiter at switch-on.',
      { size: 8.5, colour: colours.muted },
    );
  w.keyValues(parameterRows(design), 190);

  // ----- precharge sizing -----
  if (data.precharge.length > 0) {
    w.heading('Precharge sizing');
    for (const run of data.precharge) prechargeSection(w, run);
  }

  // ----- tolerance spread -----
  if (data.spread && data.spread.length > 0) {
    w.heading('Tolerance spread');
    for (const run of data.spread) spreadSection(w, run);
  }

  // ----- assumptions -----
  w.heading('Assumptions and model limits');
  for (const item of MODEL_ASSUMPTIONS) w.bullet(item);
  const warnings = results.warnings.map((x) =>
    typeof x === 'string' ? x : ((x as { message?: string })?.message ?? JSON.stringify(x)),
  );
  if (warnings.length > 0) {
    w.paragraph('Engine warnings for this run:', { size: 8.5, font: fonts.semibold });
    for (const text of warnings) w.bullet(text);
  }

  // ----- notices -----
  w.heading('High-voltage notice');
  if (results.notices.length === 0)
    w.paragraph('The engine raised no notice for this design.', { size: 8.5, colour: colours.muted });
  for (const notice of results.notices) {
    w.paragraph(notice.title, { size: 9, font: fonts.semibold });
    w.paragraph(notice.text, { size: 8.5 });
  }
  // The engine's notices end with the disclaimer; say it once when they do not.
  if (!results.notices.some((n) => n.text.includes(HV_NOTICE_DISCLAIMER))) w.paragraph(HV_NOTICE_DISCLAIMER, { size: 8.5 });

  w.heading('About this report');
  w.paragraph(DESIGN_AID_STATEMENT, { size: 8.5 });

  // ----- footers -----
  const range = doc.bufferedPageRange();
  for (let i = range.start; i < range.start + range.count; i++) {
    doc.switchToPage(i);
    const footer = `${data.designName} · revision ${revision.sequence} · ${revision.sha256.slice(0, 16)} · page ${i + 1} of ${range.count}`;
    doc
      .font(fonts.regular)
      .fontSize(7)
      .fillColor(colours.muted)
      .text(footer, PAGE.margin, PAGE.height - PAGE.margin + 6, { width: CONTENT_WIDTH, align: 'center', lineBreak: false });
  }
  doc.end();
  return finished;
}

const ORDER: Record<EngineCheck['status'], number> = { fail: 0, warn: 1, 'not-checked': 2, pass: 3 };
const order = (status: EngineCheck['status']) => ORDER[status] ?? 4;
