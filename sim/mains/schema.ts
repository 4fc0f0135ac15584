/**
 * Mains design files: the DC engine's downstream sections (capacitor, damping, bleeder, load,
 * initial, ratings, derating, duration, points) plus a `mains` section for the AC source, the bridge
 * and the inrush limiter. `parseMainsDesign` validates and returns SI numbers with defaults filled.
 *
 * The downstream sections are the engine's own schemas (`designSchema.shape.*`, sim/design.ts), so
 * a field means and is checked the same in both kinds of design. The `mains` section is written
 * here in the same style: strict objects, every quantity an SI number or a string with units, and
 * errors that name the field ("mains.limiter.r25: must be greater than 0").
 *
 * Two units need their own readers here:
 *  - angles are degrees ("90", "90°", "90 deg", or "1.571 rad");
 *  - temperatures ending in a bare "K" ("298.15 K", "3435 K") are read here, because the engine's
 *    parseQuantity reads the trailing K as the kilo prefix (298.15 K → 298 150); "25 °C" goes to it.
 */
import { z } from 'zod';

import { designSchema, safeParseDesign, zodDesignIssues, type Design, type DesignInput, type RatingKey } from '../design';
import { DesignError, type DesignIssue } from '../errors';
import { formatEng, parseQuantity, type Dimension } from '../units';
import { ntcResistance } from './ntc';
import { NUMBER, parseTemperature } from './temperature';

export { parseTemperature };

export type MainsKind = 'single-phase' | 'three-phase';

/** Cold start and hot restart of an NTC limiter (K): 25 °C, and a thermistor still at 110 °C. */
export const NTC_COLD_START = 298.15;
export const NTC_HOT_RESTART = 383.15;
export const DEFAULT_FREQUENCY = 50;
/** The mains peak of v_s = √2·V·sin(ωt + θ): the usual worst switch-on angle with C empty. */
export const DEFAULT_ANGLE = 90;
/** Without a duration a run covers ten mains cycles (200 ms at 50 Hz). */
export const DEFAULT_CYCLES = 10;
export const DEFAULT_AMBIENT = 298.15;
/** Accepted temperatures, K: a thermistor model outside this range is certainly a unit slip. */
const TEMPERATURE_RANGE: [number, number] = [150, 700];

type Bound = 'any' | 'nonNegative' | 'positive';

const UNIT_SYMBOL: Partial<Record<Dimension, string>> = {
  voltage: 'V',
  resistance: 'Ω',
  inductance: 'H',
  time: 's',
  frequency: 'Hz',
  temperature: 'K',
};

function boundMessage(bound: Bound, value: number, dimension: Dimension): string | null {
  const shown = formatEng(value, UNIT_SYMBOL[dimension] ?? '');
  if (bound === 'nonNegative') return value < 0 ? `must not be negative (got ${shown})` : null;
  if (bound === 'positive')
    return value < 0 ? `must not be negative (got ${shown})` : value === 0 ? 'must be greater than 0' : null;
  return null;
}

const quantityInput = z.union([z.number(), z.string()], {
  error: (issue) => (issue.input === undefined ? 'is required' : 'must be a number or a string with units'),
});

/** A quantity through one reader, checked against a bound, output in SI (as sim/design.ts does). */
function read(reader: (input: number | string) => number, check: (value: number) => string | null) {
  return quantityInput.transform((input, ctx) => {
    let value: number;
    try {
      value = reader(input);
    } catch (error) {
      ctx.addIssue({ code: 'custom', message: error instanceof DesignError ? error.issues[0].message : String(error) });
      return z.NEVER;
    }
    const problem = check(value);
    if (problem) {
      ctx.addIssue({ code: 'custom', message: problem });
      return z.NEVER;
    }
    return value;
  });
}

function quantity(dimension: Dimension, bound: Bound = 'any') {
  return read(
    (input) => parseQuantity(input, dimension),
    (value) => boundMessage(bound, value, dimension),
  );
}

// The temperature reader lives in its own module so that sim/spread/tolerances.ts (which sim/design.ts
// imports) can use it without importing this schema, which imports sim/design.ts.
function temperature() {
  return read(parseTemperature, (value) =>
    value >= TEMPERATURE_RANGE[0] && value <= TEMPERATURE_RANGE[1]
      ? null
      : `must be between ${TEMPERATURE_RANGE[0]} K and ${TEMPERATURE_RANGE[1]} K (got ${value} K; a bare number is in kelvin, write "25 °C" for Celsius)`,
  );
}

/** β of the thermistor law, K: a number or "3435 K". */
function betaQuantity() {
  return read(parseTemperature, (value) => (value > 0 ? null : 'must be greater than 0'));
}

const ANGLE = new RegExp(`^\\s*(${NUMBER})\\s*(°|deg|degrees?|rad)?\\s*$`, 'i');

/** A phase angle in degrees: 90, "90", "90°", "90 deg", "1.5708 rad". */
export function parseAngle(input: number | string, field?: string): number {
  if (typeof input === 'number') {
    if (!Number.isFinite(input)) throw new DesignError(`must be a finite number, got ${String(input)}`, field);
    return input;
  }
  const match = ANGLE.exec(input);
  if (!match) throw new DesignError(`could not read "${input}" as an angle; give degrees, like "90°"`, field);
  const value = Number(match[1]);
  return match[2]?.toLowerCase() === 'rad' ? (value * 180) / Math.PI : value;
}

const PER_KELVIN = new RegExp(`^\\s*(${NUMBER})\\s*([pnuµμmkM]?)(J|W)\\s*/\\s*(K|°C|degC|℃)\\s*$`);
const PREFIX: Record<string, number> = { '': 1, p: 1e-12, n: 1e-9, u: 1e-6, µ: 1e-6, μ: 1e-6, m: 1e-3, k: 1e3, M: 1e6 };

/** Heat capacity (J/K) or dissipation constant (W/K): a number in SI or "1.2 J/K", "15 mW/K". */
function perKelvin(unit: 'J' | 'W') {
  const example = unit === 'J' ? '1.2 J/K' : '15 mW/K';
  return read(
    (input) => {
      if (typeof input === 'number') {
        if (!Number.isFinite(input)) throw new DesignError(`must be a finite number, got ${String(input)}`);
        return input;
      }
      const match = PER_KELVIN.exec(input);
      if (!match) throw new DesignError(`could not read "${input}"; give ${unit}/K, like "${example}"`);
      if (match[3] !== unit) throw new DesignError(`expected ${unit}/K (like "${example}"), got "${input}"`);
      return Number(match[1]) * PREFIX[match[2]];
    },
    (value) => (value > 0 ? null : value < 0 ? 'must not be negative' : 'must be greater than 0'),
  );
}

const sectionError = { error: (issue: { input?: unknown }) => (issue.input === undefined ? 'is required' : 'must be an object') };

function section<T extends z.ZodRawShape>(shape: T) {
  return z.strictObject(shape, sectionError);
}

const shapes = {
  mains: {
    kind: z.enum(['single-phase', 'three-phase'], { error: 'must be "single-phase" or "three-phase"' }).optional(),
    voltage: quantity('voltage', 'positive'),
    frequency: quantity('frequency', 'positive').optional(),
    angle: read(parseAngle, () => null).optional(),
    lineResistance: quantity('resistance', 'nonNegative').optional(),
    lineInductance: quantity('inductance', 'nonNegative').optional(),
  },
  'mains.diode': {
    forwardVoltage: quantity('voltage', 'nonNegative').optional(),
    slopeResistance: quantity('resistance', 'nonNegative').optional(),
    surgePulseDuration: quantity('time', 'positive').optional(),
  },
  'mains.limiter': {
    kind: z.enum(['none', 'resistor', 'ntc'], { error: 'must be "none", "resistor" or "ntc"' }),
    resistance: quantity('resistance', 'positive').optional(),
    r25: quantity('resistance', 'positive').optional(),
    beta: betaQuantity().optional(),
    startTemperature: temperature().optional(),
  },
  'mains.limiter.thermal': {
    heatCapacity: perKelvin('J'),
    dissipationConstant: perKelvin('W'),
    ambientTemperature: temperature().optional(),
  },
  'mains.limiter.bypass': {
    delay: quantity('time', 'nonNegative'),
  },
};

const limiterSection = section({
  ...shapes['mains.limiter'],
  thermal: section(shapes['mains.limiter.thermal']).nullish(),
  bypass: section(shapes['mains.limiter.bypass']).nullish(),
});

const mainsSection = section({
  ...shapes.mains,
  diode: section(shapes['mains.diode']).nullish(),
  limiter: limiterSection.nullish(),
});

const dc = designSchema.shape;

const mainsDesignShape = {
  name: dc.name,
  notes: dc.notes,
  mains: mainsSection,
  capacitor: dc.capacitor,
  damping: dc.damping,
  bleeder: dc.bleeder,
  load: dc.load,
  initial: dc.initial,
  duration: quantity('time', 'positive').optional(),
  points: dc.points,
  ratings: dc.ratings,
  derating: dc.derating,
  /** Tolerances for the spread, as in a DC design file (mains paths such as mains.voltage). */
  tolerances: dc.tolerances,
};

/** The mains design file as written. */
export const mainsDesignSchema = z.strictObject(mainsDesignShape, { error: () => 'a mains design must be a JSON object' });

export type MainsDesignInput = z.input<typeof mainsDesignSchema>;

const KNOWN_FIELDS: Record<string, string[]> = {
  '': Object.keys(mainsDesignShape),
  mains: [...Object.keys(shapes.mains), 'diode', 'limiter'],
  'mains.diode': Object.keys(shapes['mains.diode']),
  'mains.limiter': [...Object.keys(shapes['mains.limiter']), 'thermal', 'bypass'],
  'mains.limiter.thermal': Object.keys(shapes['mains.limiter.thermal']),
  'mains.limiter.bypass': Object.keys(shapes['mains.limiter.bypass']),
};

export interface LimiterBypass {
  /** The relay shorts the limiter this long after switch-on, s. */
  delay: number;
}

export interface ThermalModel {
  /** J/K */
  heatCapacity: number;
  /** W/K */
  dissipationConstant: number;
  /** K */
  ambientTemperature: number;
}

export type Limiter =
  | { kind: 'none' }
  | { kind: 'resistor'; resistance: number; bypass: LimiterBypass | null }
  | {
      kind: 'ntc';
      r25: number;
      /** K */
      beta: number;
      /** K */
      startTemperature: number;
      thermal: ThermalModel | null;
      bypass: LimiterBypass | null;
    };

export interface MainsSource {
  kind: MainsKind;
  /** RMS; line-to-line for three-phase, V. */
  voltage: number;
  frequency: number;
  /** Switch-on phase angle of v_s (single-phase) or v_ab (three-phase), degrees; 0 = zero crossing rising. */
  angle: number;
  /** Single-phase: the whole loop (line and neutral). Three-phase: per line (two lines in the loop). */
  lineResistance: number;
  lineInductance: number;
  diode: { forwardVoltage: number; slopeResistance: number; surgePulseDuration: number };
  limiter: Limiter;
}

/** A validated mains design in SI units (angle in degrees), defaults filled. */
export interface MainsDesign {
  name: string | null;
  notes: string | null;
  mains: MainsSource;
  capacitor: Design['capacitor'];
  damping: Design['damping'];
  bleeder: Design['bleeder'];
  load: Design['load'];
  initial: Design['initial'];
  duration: number;
  points: number;
  ratings: Partial<Record<RatingKey, number>>;
  derating: Partial<Record<RatingKey, number>>;
  /** The design file's tolerances for the spread, parsed (SI); absent when it has none. */
  tolerances?: Design['tolerances'];
}

/** The field names of an (optional, nullable) zod object schema. */
function fieldsOf(schema: unknown): string[] {
  let current = schema as { shape?: Record<string, unknown>; unwrap?: () => unknown } | undefined;
  for (let k = 0; k < 4 && current && !current.shape && current.unwrap; k++) current = current.unwrap() as typeof current;
  return current?.shape ? Object.keys(current.shape) : [];
}

// Downstream sections are the engine's: their field lists come from its schema.
const zodIssues = (error: z.ZodError) =>
  zodDesignIssues(error, (parent) => KNOWN_FIELDS[parent] ?? fieldsOf((dc as Record<string, unknown>)[parent]));

type Parsed = z.output<typeof mainsDesignSchema>;
type ParsedLimiter = NonNullable<Parsed['mains']['limiter']>;

function readLimiter(input: ParsedLimiter | null | undefined, issues: DesignIssue[]): Limiter {
  if (!input || input.kind === 'none') {
    if (input) {
      for (const key of ['resistance', 'r25', 'beta', 'startTemperature', 'thermal', 'bypass'] as const) {
        if (input[key] !== undefined && input[key] !== null)
          issues.push({ path: `mains.limiter.${key}`, message: 'does not apply: the limiter kind is "none"' });
      }
    }
    return { kind: 'none' };
  }
  const bypass = input.bypass ? { delay: input.bypass.delay } : null;
  if (input.kind === 'resistor') {
    for (const key of ['r25', 'beta', 'startTemperature', 'thermal'] as const) {
      if (input[key] !== undefined && input[key] !== null)
        issues.push({ path: `mains.limiter.${key}`, message: 'applies to an NTC limiter only (kind "ntc")' });
    }
    if (input.resistance === undefined) {
      issues.push({ path: 'mains.limiter.resistance', message: 'is required for a resistor limiter' });
      return { kind: 'none' };
    }
    return { kind: 'resistor', resistance: input.resistance, bypass };
  }
  if (input.resistance !== undefined) {
    issues.push({ path: 'mains.limiter.resistance', message: 'does not apply to an NTC: give its resistance at 25 °C as "r25"' });
  }
  if (input.r25 === undefined)
    issues.push({ path: 'mains.limiter.r25', message: 'is required for an NTC limiter (its resistance at 25 °C)' });
  if (input.beta === undefined)
    issues.push({ path: 'mains.limiter.beta', message: 'is required for an NTC limiter (β in K, like "3500 K")' });
  if (input.r25 === undefined || input.beta === undefined) return { kind: 'none' };
  const thermal = input.thermal
    ? {
        heatCapacity: input.thermal.heatCapacity,
        dissipationConstant: input.thermal.dissipationConstant,
        ambientTemperature: input.thermal.ambientTemperature ?? DEFAULT_AMBIENT,
      }
    : null;
  return {
    kind: 'ntc',
    r25: input.r25,
    beta: input.beta,
    startTemperature: input.startTemperature ?? NTC_COLD_START,
    thermal,
    bypass,
  };
}

/**
 * The loop resistance and inductance the bridge current sees, with the limiter in or bypassed.
 * Single-phase: line R and L are the whole loop; three-phase: two lines in series. Two diodes
 * conduct in either case, and the limiter sits in the current path (in the line for single-phase,
 * in the DC link for three-phase: one part, the same current).
 */
export function loopImpedance(mains: MainsSource, limiterResistance: number): { resistance: number; inductance: number } {
  const lines = mains.kind === 'three-phase' ? 2 : 1;
  return {
    resistance: lines * mains.lineResistance + 2 * mains.diode.slopeResistance + limiterResistance,
    inductance: lines * mains.lineInductance,
  };
}

/** Peak of the source that drives the bridge: √2·V (line-to-line for three-phase). */
export function sourcePeak(mains: MainsSource): number {
  return Math.SQRT2 * mains.voltage;
}

/** The DC design input standing for the downstream part, for the engine's own checks of it. */
function downstreamInput(input: Record<string, unknown>, mains: MainsSource, resistance: number): DesignInput {
  const out: Record<string, unknown> = {
    source: {
      voltage: sourcePeak(mains) - 2 * mains.diode.forwardVoltage,
      resistance,
      inductance: loopImpedance(mains, 0).inductance,
    },
    duration: 1,
  };
  for (const key of ['name', 'notes', 'capacitor', 'damping', 'bleeder', 'load', 'initial', 'points', 'ratings', 'derating']) {
    if (input[key] !== undefined) out[key] = input[key];
  }
  return out as DesignInput;
}

type SafeParse = { ok: true; design: MainsDesign } | { ok: false; issues: DesignIssue[] };

/** Validates a mains design file's content. Never throws. */
export function safeParseMainsDesign(input: unknown): SafeParse {
  const result = mainsDesignSchema.safeParse(input);
  if (!result.success) return { ok: false, issues: zodIssues(result.error) };
  const parsed = result.data;
  const issues: DesignIssue[] = [];
  const m = parsed.mains;
  const frequency = m.frequency ?? DEFAULT_FREQUENCY;
  if (frequency > 1000)
    issues.push({
      path: 'mains.frequency',
      message: `must be at most 1 kHz (got ${formatEng(frequency, 'Hz')}); mains is 50 Hz or 60 Hz`,
    });
  const mains: MainsSource = {
    kind: m.kind ?? 'single-phase',
    voltage: m.voltage,
    frequency,
    angle: m.angle ?? DEFAULT_ANGLE,
    lineResistance: m.lineResistance ?? 0,
    lineInductance: m.lineInductance ?? 0,
    diode: {
      forwardVoltage: m.diode?.forwardVoltage ?? 0,
      slopeResistance: m.diode?.slopeResistance ?? 0,
      // REFERENCE §5: IFSM is one half-sine of 10 ms (50 Hz) or 8.3 ms (60 Hz), i.e. half a cycle.
      surgePulseDuration: m.diode?.surgePulseDuration ?? 1 / (2 * frequency),
    },
    limiter: readLimiter(m.limiter, issues),
  };
  const finalLimiter = mains.limiter.kind === 'none' || mains.limiter.bypass ? 0 : limiterResistanceAtStart(mains.limiter);
  const loop = loopImpedance(mains, finalLimiter);
  if (loop.inductance === 0 && loop.resistance === 0) {
    issues.push({
      path: 'mains.lineResistance',
      message:
        'zero series impedance with no inductance: give the line some resistance or inductance, or the diodes a slope resistance' +
        (mains.limiter.kind !== 'none' ? ' (the bypass relay shorts the limiter)' : ''),
    });
  }
  const raw = input as Record<string, unknown>;
  const downstream = safeParseDesign(downstreamInput(raw, mains, loop.resistance > 0 ? loop.resistance : 1));
  if (!downstream.ok) {
    for (const issue of downstream.issues) {
      issues.push(issue.path.startsWith('source') ? { path: 'mains', message: issue.message } : issue);
    }
  }
  if (issues.length || !downstream.ok) return { ok: false, issues };
  const d = downstream.design;
  if (d.initial.capacitorVoltage < 0) {
    issues.push({
      path: 'initial.capacitorVoltage',
      message: 'must not be negative: the bridge would conduct on all four diodes',
    });
  }
  if (d.initial.inductorCurrent !== 0) {
    issues.push({
      path: 'initial.inductorCurrent',
      message: 'must be 0 for a mains switch-on: the line carries no current before the switch closes',
    });
  }
  const duration = parsed.duration ?? DEFAULT_CYCLES / frequency;
  if (issues.length) return { ok: false, issues };
  return {
    ok: true,
    design: {
      name: d.name,
      notes: d.notes,
      mains,
      capacitor: d.capacitor,
      damping: d.damping,
      bleeder: d.bleeder,
      load: d.load,
      initial: d.initial,
      duration,
      points: d.points,
      ratings: d.ratings,
      derating: d.derating,
      ...(parsed.tolerances ? { tolerances: parsed.tolerances } : {}),
    },
  };
}

/** Validates a mains design file's content; throws DesignError naming each bad field. */
export function parseMainsDesign(input: unknown): MainsDesign {
  const result = safeParseMainsDesign(input);
  if (!result.ok) throw new DesignError(result.issues);
  return result.design;
}

/** The limiter's resistance at switch-on (Ω): the resistor, or the NTC at its start temperature. */
export function limiterResistanceAtStart(limiter: Limiter): number {
  if (limiter.kind === 'none') return 0;
  if (limiter.kind === 'resistor') return limiter.resistance;
  return ntcResistance(limiter.r25, limiter.beta, limiter.startTemperature);
}
