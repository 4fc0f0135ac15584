/**
 * Design files: the zod schema of the input form (every quantity an SI number or a string with
 * units), and `parseDesign`, which validates it and returns the normalised `Design` (SI numbers,
 * defaults filled, optional parts null).
 *
 * One object per section, every section strict, so that a typo ("capacitence") is an error that
 * names the field. A new section (tolerances, …) is one more entry in `designShape`.
 */
import { z } from 'zod';

import { DesignError, type DesignIssue } from './errors';
import { tolerancesSchema, type Tolerances } from './spread/tolerances';
import { formatEng, parseQuantity, type Dimension } from './units';

const UNIT_SYMBOL: Record<Dimension, string> = {
  voltage: 'V',
  current: 'A',
  resistance: 'Ω',
  inductance: 'H',
  capacitance: 'F',
  time: 's',
  power: 'W',
  energy: 'J',
  i2t: 'A²s',
  frequency: 'Hz',
  charge: 'C',
  temperature: 'K',
  ratio: '',
};

type Bound = 'any' | 'nonNegative' | 'positive' | 'unitInterval' | 'openUnitInterval';

function boundMessage(bound: Bound, value: number, dimension: Dimension): string | null {
  const shown = UNIT_SYMBOL[dimension] === '' ? String(value) : formatEng(value, UNIT_SYMBOL[dimension]);
  switch (bound) {
    case 'nonNegative':
      return value < 0 ? `must not be negative (got ${shown})` : null;
    case 'positive':
      return value < 0 ? `must not be negative (got ${shown})` : value === 0 ? 'must be greater than 0' : null;
    case 'unitInterval':
      return value > 0 && value <= 1 ? null : `must be greater than 0 and at most 1 (got ${shown})`;
    case 'openUnitInterval':
      return value > 0 && value < 1 ? null : `must be between 0 and 1, exclusive (got ${shown})`;
    default:
      return null;
  }
}

const quantityInput = z.union([z.number(), z.string()], {
  error: (issue) => (issue.input === undefined ? 'is required' : 'must be a number or a string with units'),
});

/** A quantity field: SI number or string with units, checked against a bound, output in SI. */
function quantity(dimension: Dimension, bound: Bound = 'any') {
  return quantityInput.transform((input, ctx) => {
    let value: number;
    try {
      value = parseQuantity(input, dimension);
    } catch (error) {
      ctx.addIssue({ code: 'custom', message: error instanceof DesignError ? error.issues[0].message : String(error) });
      return z.NEVER;
    }
    // Values beyond ±1e100 are typing slips, not circuits; below 1e−100 they count as zero (the
    // engine divides by resistances and capacitances, and subnormal numbers carry no digits).
    if (Math.abs(value) > 1e100) {
      ctx.addIssue({ code: 'custom', message: `is out of range (${String(value)})` });
      return z.NEVER;
    }
    if (Math.abs(value) < 1e-100) value = 0;
    const problem = boundMessage(bound, value, dimension);
    if (problem) {
      ctx.addIssue({ code: 'custom', message: problem });
      return z.NEVER;
    }
    return value;
  });
}

const sectionError = { error: (issue: { input?: unknown }) => (issue.input === undefined ? 'is required' : 'must be an object') };

function section<T extends z.ZodRawShape>(shape: T) {
  return z.strictObject(shape, sectionError);
}

export const RATING_KEYS = [
  'capacitorVoltage',
  'capacitorSurgeVoltage',
  'inductorSaturationCurrent',
  'prechargePulseEnergy',
  'prechargePeakPower',
  'prechargeContinuousPower',
  'contactorMakeCurrent',
  'contactorCarryCurrent',
  'fuseMeltingI2t',
  'diodeSurgeCurrent',
  'diodeI2t',
  'switchVoltage',
  'cableI2t',
] as const;
export type RatingKey = (typeof RATING_KEYS)[number];

export const RATING_DIMENSIONS: Record<RatingKey, Dimension> = {
  capacitorVoltage: 'voltage',
  capacitorSurgeVoltage: 'voltage',
  inductorSaturationCurrent: 'current',
  prechargePulseEnergy: 'energy',
  prechargePeakPower: 'power',
  prechargeContinuousPower: 'power',
  contactorMakeCurrent: 'current',
  contactorCarryCurrent: 'current',
  fuseMeltingI2t: 'i2t',
  diodeSurgeCurrent: 'current',
  diodeI2t: 'i2t',
  switchVoltage: 'voltage',
  cableI2t: 'i2t',
};

const ratingsShape = Object.fromEntries(
  RATING_KEYS.map((key) => [key, quantity(RATING_DIMENSIONS[key], 'positive').optional()]),
) as Record<RatingKey, z.ZodOptional<ReturnType<typeof quantity>>>;
const deratingShape = Object.fromEntries(RATING_KEYS.map((key) => [key, quantity('ratio', 'unitInterval').optional()])) as Record<
  RatingKey,
  z.ZodOptional<ReturnType<typeof quantity>>
>;

const shapes = {
  source: {
    voltage: quantity('voltage'),
    resistance: quantity('resistance', 'nonNegative').optional(),
    inductance: quantity('inductance', 'nonNegative').optional(),
    riseTime: quantity('time', 'nonNegative').optional(),
  },
  'precharge.bypass': {
    when: z.enum(['voltage', 'time'], { error: 'must be "voltage" or "time"' }).optional(),
    fraction: quantity('ratio', 'unitInterval').optional(),
    time: quantity('time', 'nonNegative').optional(),
    delay: quantity('time', 'nonNegative').optional(),
  },
  filter: {
    inductance: quantity('inductance', 'nonNegative').optional(),
    resistance: quantity('resistance', 'nonNegative').optional(),
  },
  capacitor: {
    capacitance: quantity('capacitance', 'positive'),
    esr: quantity('resistance', 'nonNegative').optional(),
  },
  damping: {
    resistance: quantity('resistance', 'positive'),
    capacitance: quantity('capacitance', 'positive'),
  },
  bleeder: {
    resistance: quantity('resistance', 'positive'),
  },
  load: {
    kind: z.enum(['none', 'resistance', 'current', 'power'], {
      error: 'must be "none", "resistance", "current" or "power"',
    }),
    // Its dimension depends on `kind`; read in parseDesign.
    value: quantityInput.optional(),
    start: quantity('time', 'nonNegative').optional(),
    undervoltage: quantity('voltage', 'nonNegative').optional(),
  },
  initial: {
    capacitorVoltage: quantity('voltage').optional(),
    inductorCurrent: quantity('current').optional(),
    dampingVoltage: quantity('voltage').optional(),
  },
  ratings: ratingsShape,
  derating: deratingShape,
};

const precharge = section({
  resistance: quantity('resistance', 'positive'),
  bypass: section(shapes['precharge.bypass']).nullish(),
});

const designShape = {
  name: z.string({ error: 'must be a string' }).optional(),
  notes: z.string({ error: 'must be a string' }).optional(),
  source: section(shapes.source),
  precharge: precharge.nullish(),
  filter: section(shapes.filter).nullish(),
  capacitor: section(shapes.capacitor),
  damping: section(shapes.damping).nullish(),
  bleeder: section(shapes.bleeder).nullish(),
  load: section(shapes.load).nullish(),
  initial: section(shapes.initial).nullish(),
  duration: quantity('time', 'positive'),
  points: z
    .number({ error: 'must be a whole number of points' })
    .int({ error: 'must be a whole number of points' })
    .min(2, { error: 'must be at least 2' })
    .max(200_000, { error: 'must be at most 200 000' })
    .optional(),
  settleFraction: quantity('ratio', 'openUnitInterval').optional(),
  ratings: section(shapes.ratings).nullish(),
  derating: section(shapes.derating).nullish(),
  /** Tolerances for the spread (sim/spread/tolerances.ts); ignored by a single check. */
  tolerances: tolerancesSchema.optional(),
};

/** The design file as written: every quantity an SI number or a string with units. */
export const designSchema = z.strictObject(designShape, { error: () => 'a design must be a JSON object' });

export type DesignInput = z.input<typeof designSchema>;

const KNOWN_FIELDS: Record<string, string[]> = {
  '': Object.keys(designShape),
  precharge: ['resistance', 'bypass'],
  ...Object.fromEntries(Object.entries(shapes).map(([key, shape]) => [key, Object.keys(shape)])),
};

export interface Bypass {
  /** "voltage": closes `delay` after vC first reaches fraction·Vs; "time": closes at `time`. */
  when: 'voltage' | 'time';
  fraction: number;
  time: number | null;
  delay: number;
}

export type LoadKind = 'resistance' | 'current' | 'power';

export interface Load {
  kind: LoadKind;
  /** Ω for resistance, A for current, W for power. */
  value: number;
  start: number;
  /** A constant-power load draws nothing below this bus voltage. */
  undervoltage: number;
}

/** A validated design in SI units, defaults filled; absent optional parts are null. */
export interface Design {
  name: string | null;
  notes: string | null;
  source: { voltage: number; resistance: number; inductance: number; riseTime: number };
  precharge: { resistance: number; bypass: Bypass | null } | null;
  filter: { inductance: number; resistance: number } | null;
  capacitor: { capacitance: number; esr: number };
  damping: { resistance: number; capacitance: number } | null;
  bleeder: { resistance: number } | null;
  load: Load | null;
  initial: { capacitorVoltage: number; inductorCurrent: number; dampingVoltage: number };
  duration: number;
  points: number;
  settleFraction: number;
  ratings: Partial<Record<RatingKey, number>>;
  derating: Partial<Record<RatingKey, number>>;
  /** The design file's tolerances for the spread, parsed (SI); absent when it has none. */
  tolerances?: Tolerances;
}

export const DEFAULT_POINTS = 2000;
export const MAX_POINTS = 200_000;
export const DEFAULT_SETTLE_FRACTION = 0.95;
export const DEFAULT_BYPASS_FRACTION = 0.95;
/** Default undervoltage threshold of a constant-power load, as a fraction of the source voltage. */
export const DEFAULT_UNDERVOLTAGE_FRACTION = 0.5;

function editDistance(a: string, b: string): number {
  const row = Array.from({ length: b.length + 1 }, (_, j) => j);
  for (let i = 1; i <= a.length; i++) {
    let previous = row[0];
    row[0] = i;
    for (let j = 1; j <= b.length; j++) {
      const current = row[j];
      row[j] = Math.min(row[j] + 1, row[j - 1] + 1, previous + (a[i - 1].toLowerCase() === b[j - 1].toLowerCase() ? 0 : 1));
      previous = current;
    }
  }
  return row[b.length];
}

/** "unknown field", with the nearest known name when one is close. */
function unknownFieldMessage(key: string, known: string[]): string {
  const best = known.map((name) => ({ name, distance: editDistance(key, name) })).sort((x, y) => x.distance - y.distance)[0];
  const hint = best && best.distance <= Math.max(2, Math.floor(key.length / 3)) ? ` (did you mean "${best.name}"?)` : '';
  return `unknown field "${key}"${hint}`;
}

/**
 * A zod error as design issues, each naming its field by path. `knownFields(parent)` lists the
 * fields a section has, for the "did you mean" hint on an unknown one (the mains schema has its own).
 */
export function zodDesignIssues(error: z.ZodError, knownFields: (parent: string) => string[]): DesignIssue[] {
  const issues: DesignIssue[] = [];
  for (const issue of error.issues) {
    // An empty key is written "" so that the path still names it (a bare "" would read as the root).
    const segment = (key: unknown) => (key === '' ? '""' : String(key));
    const path = issue.path.map(segment).join('.');
    if (issue.code === 'unrecognized_keys') {
      for (const key of issue.keys)
        issues.push({ path: path ? `${path}.${segment(key)}` : segment(key), message: unknownFieldMessage(key, knownFields(path)) });
    } else {
      issues.push({ path, message: issue.message });
    }
  }
  return issues;
}

const zodIssues = (error: z.ZodError) => zodDesignIssues(error, (parent) => KNOWN_FIELDS[parent] ?? []);

type Parsed = z.output<typeof designSchema>;

const LOAD_DIMENSION: Record<LoadKind, Dimension> = { resistance: 'resistance', current: 'current', power: 'power' };

function readLoad(parsed: Parsed, sourceVoltage: number, issues: DesignIssue[]): Load | null {
  const load = parsed.load;
  if (!load || load.kind === 'none') return null;
  const kind = load.kind;
  if (load.value === undefined) {
    issues.push({ path: 'load.value', message: 'is required for a load' });
    return null;
  }
  let value: number;
  try {
    value = parseQuantity(load.value, LOAD_DIMENSION[kind], 'load.value');
  } catch (error) {
    if (error instanceof DesignError) issues.push(...error.issues);
    return null;
  }
  if (Math.abs(value) > 1e100) issues.push({ path: 'load.value', message: `is out of range (${String(value)})` });
  if (Math.abs(value) < 1e-100) value = 0;
  if (kind === 'resistance' && !(value > 0))
    issues.push({ path: 'load.value', message: 'a load resistance must be greater than 0' });
  if (kind === 'power' && value < 0) issues.push({ path: 'load.value', message: 'a constant-power load must not be negative' });
  const undervoltage = load.undervoltage ?? DEFAULT_UNDERVOLTAGE_FRACTION * sourceVoltage;
  if (kind === 'power' && !(undervoltage > 0)) {
    issues.push({
      path: 'load.undervoltage',
      message: 'a constant-power load needs an undervoltage threshold above 0 V (the default, half the source voltage, is not)',
    });
  }
  return { kind, value, start: load.start ?? 0, undervoltage };
}

/** Series resistance of the path once the circuit has settled: bypass closed, if there is one. */
export function finalSeriesResistance(design: Design): number {
  const base = design.source.resistance + (design.filter?.resistance ?? 0);
  const pre = design.precharge && !design.precharge.bypass ? design.precharge.resistance : 0;
  return base + pre;
}

function crossChecks(design: Design, issues: DesignIssue[]) {
  const inductance = design.source.inductance + (design.filter?.inductance ?? 0);
  const base = design.source.resistance + (design.filter?.resistance ?? 0);
  const smallest = design.precharge && !design.precharge.bypass ? base + design.precharge.resistance : base;
  if (inductance === 0 && smallest === 0) {
    issues.push({
      path: 'source.resistance',
      message:
        'zero series impedance with no inductance: give the source or filter some resistance or inductance' +
        (design.precharge ? ' (the bypass contactor shorts the precharge resistor)' : ''),
    });
  }
  const load = design.load;
  if (load?.kind === 'power' && load.value > 0) {
    // DC operating point with the bypass closed: (1 + R/Rb)·v² − Vs·v + R·P = 0 must have a real root.
    const r = finalSeriesResistance(design);
    const leak = design.bleeder ? r / design.bleeder.resistance : 0;
    const discriminant = design.source.voltage ** 2 - 4 * (1 + leak) * r * load.value;
    if (discriminant < 0 || design.source.voltage <= 0) {
      const most = design.source.voltage > 0 ? design.source.voltage ** 2 / (4 * r * (1 + leak)) : 0;
      issues.push({
        path: 'load.value',
        message: `no DC operating point: the source can deliver at most ${formatEng(most, 'W')} through ${formatEng(r, 'Ω')} of series resistance, less than ${formatEng(load.value, 'W')}`,
      });
    }
  }
  const bypass = design.precharge?.bypass;
  if (bypass?.when === 'time' && bypass.time === null) {
    issues.push({ path: 'precharge.bypass.time', message: 'is required when the bypass closes at a time' });
  }
}

type SafeParse = { ok: true; design: Design } | { ok: false; issues: DesignIssue[] };

/** Validates a design file's content. Never throws. */
export function safeParseDesign(input: unknown): SafeParse {
  const result = designSchema.safeParse(input);
  if (!result.success) return { ok: false, issues: zodIssues(result.error) };
  const parsed = result.data;
  const issues: DesignIssue[] = [];
  const voltage = parsed.source.voltage;
  const bypassInput = parsed.precharge?.bypass;
  let bypass: Bypass | null = null;
  if (parsed.precharge && bypassInput) {
    const when = bypassInput.when ?? (bypassInput.time !== undefined && bypassInput.fraction === undefined ? 'time' : 'voltage');
    bypass = {
      when,
      fraction: bypassInput.fraction ?? DEFAULT_BYPASS_FRACTION,
      time: bypassInput.time ?? null,
      delay: bypassInput.delay ?? 0,
    };
  }
  const capacitorVoltage = parsed.initial?.capacitorVoltage ?? 0;
  const design: Design = {
    name: parsed.name ?? null,
    notes: parsed.notes ?? null,
    source: {
      voltage,
      resistance: parsed.source.resistance ?? 0,
      inductance: parsed.source.inductance ?? 0,
      riseTime: parsed.source.riseTime ?? 0,
    },
    precharge: parsed.precharge ? { resistance: parsed.precharge.resistance, bypass } : null,
    filter: parsed.filter ? { inductance: parsed.filter.inductance ?? 0, resistance: parsed.filter.resistance ?? 0 } : null,
    capacitor: { capacitance: parsed.capacitor.capacitance, esr: parsed.capacitor.esr ?? 0 },
    damping: parsed.damping ? { resistance: parsed.damping.resistance, capacitance: parsed.damping.capacitance } : null,
    bleeder: parsed.bleeder ? { resistance: parsed.bleeder.resistance } : null,
    load: readLoad(parsed, voltage, issues),
    initial: {
      capacitorVoltage,
      inductorCurrent: parsed.initial?.inductorCurrent ?? 0,
      dampingVoltage: parsed.initial?.dampingVoltage ?? capacitorVoltage,
    },
    duration: parsed.duration,
    points: parsed.points ?? DEFAULT_POINTS,
    settleFraction: parsed.settleFraction ?? DEFAULT_SETTLE_FRACTION,
    ratings: stripUndefined(parsed.ratings ?? {}),
    derating: stripUndefined(parsed.derating ?? {}),
    ...(parsed.tolerances ? { tolerances: parsed.tolerances } : {}),
  };
  if (issues.length === 0) crossChecks(design, issues);
  return issues.length ? { ok: false, issues } : { ok: true, design };
}

function stripUndefined<T extends Record<string, number | undefined>>(record: T): Partial<Record<RatingKey, number>> {
  const out: Partial<Record<RatingKey, number>> = {};
  for (const [key, value] of Object.entries(record)) if (value !== undefined) out[key as RatingKey] = value;
  return out;
}

/** Validates a design file's content; throws DesignError naming each bad field. */
export function parseDesign(input: unknown): Design {
  const result = safeParseDesign(input);
  if (!result.ok) throw new DesignError(result.issues);
  return result.design;
}
