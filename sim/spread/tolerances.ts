/**
 * Tolerances: which design values spread, and how far.
 *
 *   { "capacitor.capacitance": { "percent": 10, "drift": -20 },
 *     "source.voltage": { "min": "380 V", "max": "420 V" } }
 *
 * A tolerance is ± percent of the nominal value, or an explicit min/max (units read as in the
 * design file). A capacitor's value or ESR may carry an end-of-life drift in percent (−20 for a
 * capacitance that loses a fifth, +100 for an ESR that doubles): the band then covers the part new
 * and aged, from the lower of the two lower ends to the higher of the two upper ends.
 *
 * `tolerancesSchema` checks what it can without the design (known paths, min ≤ max, percent ≥ 0);
 * `resolveTolerances` checks the rest against the design (the part exists, the band stays inside
 * the field's own bounds) and gives the bands in SI.
 */
import { z } from 'zod';

import { DesignError, type DesignIssue } from '../errors';
import { parseTemperature } from '../mains/temperature';
import { formatEng, parseQuantity, type Dimension } from '../units';
import {
  PATH_INFO,
  TOLERANCE_PATHS,
  isMainsSpreadDesign,
  isTolerancePath,
  pathAppliesTo,
  unitOfPath,
  type SpreadDesign,
  type TolerancePath,
} from './paths';

export interface PercentTolerance {
  percent: number;
  /** End-of-life drift, percent (signed); 0 when none. */
  drift: number;
}

export interface RangeTolerance {
  min: number;
  max: number;
  drift: number;
  /** For load.value: the dimension the min/max were written in (null for bare numbers). */
  dimension: Dimension | null;
}

export type ToleranceSpec = PercentTolerance | RangeTolerance;

/** Parsed tolerances: SI numbers, keyed by design path. */
export type Tolerances = Partial<Record<TolerancePath, ToleranceSpec>>;

const PERCENT_TEXT = /^\s*[±+]?\s*(\d+\.?\d*(?:[eE][+-]?\d+)?|\.\d+(?:[eE][+-]?\d+)?)\s*%?\s*$/;
const SIGNED_PERCENT_TEXT = /^\s*([-+\u2212]?)\s*(\d+\.?\d*(?:[eE][+-]?\d+)?|\.\d+(?:[eE][+-]?\d+)?)\s*%?\s*$/;

function readPercent(value: unknown, signed: boolean): number | string {
  if (typeof value === 'number') return Number.isFinite(value) ? value : 'must be a finite number (percent)';
  if (typeof value !== 'string') return 'must be a number of percent, like 10 or "10 %"';
  if (signed) {
    const m = SIGNED_PERCENT_TEXT.exec(value);
    if (!m) return `could not read "${value}" as a percentage, like "-20 %"`;
    return (m[1] === '-' || m[1] === '−' ? -1 : 1) * Number(m[2]);
  }
  const m = PERCENT_TEXT.exec(value);
  if (!m) return value.trim().startsWith('-') ? 'must not be negative' : `could not read "${value}" as a percentage, like "10 %"`;
  return Number(m[1]);
}

const LOAD_DIMENSIONS: Dimension[] = ['power', 'resistance', 'current'];

/** Reads a min/max quantity; for load.value, in whichever of W, Ω, A it was written. */
function readBound(path: TolerancePath, value: unknown): { value: number; dimension: Dimension | null } | string {
  if (typeof value !== 'number' && typeof value !== 'string') return 'must be a number or a string with units';
  const dimension = PATH_INFO[path].dimension;
  const candidates = dimension === 'load' ? LOAD_DIMENSIONS : [dimension];
  let firstError = '';
  for (const candidate of candidates) {
    try {
      // The engine's parseQuantity reads a trailing "K" as kilo; temperatures go through the mains reader.
      const parsed = candidate === 'temperature' ? parseTemperature(value) : parseQuantity(value, candidate);
      const bare = typeof value === 'number' || /^[\s\d.eE+-]*$/.test(value);
      return { value: parsed, dimension: dimension === 'load' && !bare ? candidate : null };
    } catch (error) {
      if (!firstError) firstError = error instanceof DesignError ? error.issues[0].message : String(error);
    }
  }
  return dimension === 'load' ? `could not read "${String(value)}" as a power, resistance or current` : firstError;
}

// `dimension` is an output field (see RangeTolerance); accepted so that parsed tolerances parse again.
const SPEC_KEYS = ['percent', 'min', 'max', 'drift', 'dimension'];
const KNOWN_DIMENSIONS: (Dimension | null)[] = [...LOAD_DIMENSIONS, null];

function readSpec(path: TolerancePath, raw: unknown, add: (field: string[], message: string) => void): ToleranceSpec | null {
  if (typeof raw !== 'object' || raw === null || Array.isArray(raw)) {
    add([], 'must be an object: { percent } or { min, max }');
    return null;
  }
  const record = raw as Record<string, unknown>;
  let ok = true;
  for (const key of Object.keys(record)) {
    if (!SPEC_KEYS.includes(key)) {
      add([key], `unknown field "${key}" (a tolerance has percent, or min and max, and for a capacitor drift)`);
      ok = false;
    }
  }
  let drift = 0;
  if (record.drift !== undefined) {
    const d = readPercent(record.drift, true);
    if (typeof d === 'string') {
      add(['drift'], d);
      ok = false;
    } else if (d !== 0 && !PATH_INFO[path].drift) {
      // (A zero drift is no drift, so parsed tolerances of any path parse again.)
      add(['drift'], 'an end-of-life drift applies only to a capacitor (capacitance or ESR)');
      ok = false;
    } else if (d <= -100) {
      add(['drift'], `must be above −100 % (got ${d} %)`);
      ok = false;
    } else drift = d;
  }
  const hasPercent = record.percent !== undefined;
  const hasMin = record.min !== undefined;
  const hasMax = record.max !== undefined;
  if (hasPercent && (hasMin || hasMax)) {
    add(['percent'], 'give either percent or min and max, not both');
    return null;
  }
  if (hasPercent) {
    const p = readPercent(record.percent, false);
    if (typeof p === 'string') add(['percent'], p);
    else if (p < 0) add(['percent'], `must not be negative (got ${p} %)`);
    else if (ok) return { percent: p, drift };
    return null;
  }
  if (!hasMin || !hasMax) {
    add(
      [hasMin ? 'max' : hasMax ? 'min' : 'percent'],
      hasMin || hasMax ? 'is required with ' + (hasMin ? 'min' : 'max') : 'give percent, or min and max',
    );
    return null;
  }
  const min = readBound(path, record.min);
  const max = readBound(path, record.max);
  if (typeof min === 'string') add(['min'], min);
  if (typeof max === 'string') add(['max'], max);
  if (typeof min === 'string' || typeof max === 'string' || !ok) return null;
  if (min.dimension && max.dimension && min.dimension !== max.dimension) {
    add(
      ['max'],
      `is ${max.dimension === 'power' ? 'a power' : `a ${max.dimension}`}, but min is ${min.dimension === 'power' ? 'a power' : `a ${min.dimension}`}`,
    );
    return null;
  }
  if (min.value > max.value) {
    add(['min'], `must not be greater than max (${min.value} > ${max.value} in SI units)`);
    return null;
  }
  const written = KNOWN_DIMENSIONS.includes(record.dimension as Dimension | null) ? (record.dimension as Dimension | null) : null;
  return { min: min.value, max: max.value, drift, dimension: min.dimension ?? max.dimension ?? written };
}

/**
 * The tolerances map. Output: SI numbers by path, in the engine's canonical order. Issues are named
 * by path ("capacitor.capacitance.min"); inside a design they sit under "tolerances.".
 */
export const tolerancesSchema = z
  .record(z.string(), z.unknown(), { error: 'must be an object mapping design paths to tolerances' })
  .transform((record, ctx): Tolerances => {
    const out: Tolerances = {};
    for (const [path, raw] of Object.entries(record)) {
      if (!isTolerancePath(path)) {
        ctx.addIssue({ code: 'custom', path: [path], message: unknownPathMessage(path) });
        continue;
      }
      const spec = readSpec(path, raw, (field, message) => ctx.addIssue({ code: 'custom', path: [path, ...field], message }));
      if (spec) out[path] = spec;
    }
    // Canonical order, so that the same tolerances written in another order sample identically.
    const ordered: Tolerances = {};
    for (const path of TOLERANCE_PATHS) if (out[path]) ordered[path] = out[path];
    return ordered;
  });

export type TolerancesInput = z.input<typeof tolerancesSchema>;

function unknownPathMessage(path: string): string {
  const leaf = path.split('.').pop() ?? path;
  const near = TOLERANCE_PATHS.filter((p) => p.endsWith(`.${leaf}`) || p.startsWith(`${path.split('.')[0]}.`));
  const hint = near.length ? ` (known here: ${near.join(', ')})` : '';
  return `unknown design path "${path}": a tolerance goes on a component value, the source voltage or a mains value${hint}`;
}

/**
 * Validates a tolerances map (or re-validates a parsed one: parsing is idempotent); throws a DesignError whose issues are named "tolerances.<path>…". */
export function parseTolerances(input: unknown, prefix = 'tolerances'): Tolerances {
  const result = tolerancesSchema.safeParse(input);
  if (result.success) return result.data;
  throw new DesignError(
    result.error.issues.map((issue) => ({
      path: [prefix, ...issue.path.map(String)].filter(Boolean).join('.'),
      message: issue.message,
    })),
  );
}

/** One toleranced value with its band in SI. */
export interface SpreadParameter {
  path: TolerancePath;
  label: string;
  unit: string;
  nominal: number;
  min: number;
  max: number;
  /** End-of-life drift included in the band, percent (0 when none). */
  drift: number;
  /** How the band was given, for display: "±10 %, drift −20 %" or "380 V … 420 V". */
  basis: string;
}

const LOAD_KIND_DIMENSION = { resistance: 'resistance', current: 'current', power: 'power' } as const;

/**
 * The bands for a design. Throws a DesignError (paths "tolerances.<path>") when a toleranced part is
 * not in the design, a band leaves the field's bounds (a capacitance at or below 0), a percent
 * tolerance sits on a nominal 0 (it would not spread), or a load band is in the wrong unit.
 */
export function resolveTolerances(
  design: SpreadDesign,
  tolerances: Tolerances | TolerancesInput,
  prefix = 'tolerances',
): SpreadParameter[] {
  const parsed = parseTolerances(tolerances, prefix);
  const issues: DesignIssue[] = [];
  const parameters: SpreadParameter[] = [];
  for (const path of TOLERANCE_PATHS) {
    const spec = parsed[path];
    if (!spec) continue;
    const info = PATH_INFO[path];
    const field = `${prefix}.${path}`;
    if (!pathAppliesTo(path, design)) {
      issues.push({ path: field, message: notApplicableMessage(path, design) });
      continue;
    }
    const nominal = info.get(design);
    if (nominal === null) {
      issues.push({
        path: field,
        message: `the design has no ${SECTION_NAMES[info.section]}, so ${path} cannot carry a tolerance`,
      });
      continue;
    }
    const unit = unitOfPath(path, design);
    const show = (v: number) => (unit ? formatEng(v, unit) : String(Number(v.toPrecision(4))));
    let lo: number;
    let hi: number;
    let basis: string;
    if ('percent' in spec) {
      if (nominal === 0 && spec.percent > 0) {
        issues.push({
          path: `${field}.percent`,
          message: 'the nominal value is 0, so a percent tolerance gives no spread; give min and max',
        });
        continue;
      }
      const a = nominal * (1 - spec.percent / 100);
      const b = nominal * (1 + spec.percent / 100);
      lo = Math.min(a, b);
      hi = Math.max(a, b);
      basis = `±${spec.percent} %`;
    } else {
      if (path === 'load.value' && spec.dimension && design.load && spec.dimension !== LOAD_KIND_DIMENSION[design.load.kind]) {
        issues.push({
          path: `${field}.min`,
          message: `the load is a ${design.load.kind} load, but the band is given as a ${spec.dimension}`,
        });
        continue;
      }
      lo = spec.min;
      hi = spec.max;
      basis = `${show(lo)} … ${show(hi)}`;
    }
    if (spec.drift !== 0) {
      const k = 1 + spec.drift / 100;
      const aged = [lo * k, hi * k];
      lo = Math.min(lo, ...aged);
      hi = Math.max(hi, ...aged);
      basis += `, end-of-life drift ${spec.drift > 0 ? '+' : '−'}${Math.abs(spec.drift)} %`;
    }
    const boundProblem = checkBound(info.bound, lo, hi, show);
    if (boundProblem) {
      issues.push({ path: 'percent' in spec ? `${field}.percent` : `${field}.min`, message: boundProblem });
      continue;
    }
    parameters.push({ path, label: info.label, unit, nominal, min: lo, max: hi, drift: spec.drift, basis });
  }
  if (issues.length) throw new DesignError(issues);
  if (parameters.length === 0)
    throw new DesignError([{ path: prefix, message: 'no value carries a tolerance, so there is nothing to spread' }]);
  return parameters;
}

/** Why a path does not apply to this kind of design, and what to use instead. */
function notApplicableMessage(path: TolerancePath, design: SpreadDesign): string {
  if (!isMainsSpreadDesign(design)) return `applies to mains designs only (a design with a mains section); this design has a DC source`;
  const instead: Record<string, string> = {
    'source.voltage': 'mains.voltage',
    'source.resistance': 'mains.lineResistance',
    'source.inductance': 'mains.lineInductance',
    'precharge.resistance': 'mains.limiter.resistance (or mains.limiter.r25 for an NTC)',
    'precharge.bypass.delay': 'mains.limiter.bypass.delay',
  };
  if (path === 'initial.inductorCurrent') return 'does not apply to a mains design: the line carries no current before the switch closes';
  return `does not apply to a mains design (it has no DC ${path.split('.')[0]} section)${instead[path] ? `: use ${instead[path]}` : ''}`;
}

const SECTION_NAMES: Record<string, string> = {
  source: 'source',
  precharge: 'precharge resistor',
  'precharge.bypass': 'bypass contactor',
  filter: 'input filter',
  capacitor: 'capacitor',
  damping: 'damping branch',
  bleeder: 'bleeder resistor',
  load: 'load',
  initial: 'initial state',
  mains: 'mains section',
  'mains.limiter.resistor': 'resistor limiter (mains.limiter.kind "resistor")',
  'mains.limiter.ntc': 'NTC limiter (mains.limiter.kind "ntc")',
  'mains.limiter.bypass': 'bypass relay on the limiter',
};

function checkBound(bound: string, lo: number, hi: number, show: (v: number) => string): string | null {
  switch (bound) {
    case 'positive':
      return lo > 0 ? null : `the band reaches ${show(lo)}; this value must stay above 0`;
    case 'nonNegative':
      return lo >= 0 ? null : `the band reaches ${show(lo)}; this value must not be negative`;
    case 'unitInterval':
      return lo > 0 && hi <= 1 ? null : `the band ${show(lo)} … ${show(hi)} must stay above 0 and at most 1`;
    case 'temperature':
      // The mains schema's own range for temperatures (150–700 K).
      return lo >= 150 && hi <= 700 ? null : `the band ${show(lo)} … ${show(hi)} must stay within 150 K … 700 K`;
    default:
      return null;
  }
}
