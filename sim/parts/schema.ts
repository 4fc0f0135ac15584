/**
 * Parts: the team's shared list of components with their ratings, one zod schema per kind.
 *
 * Every rating is a quantity as engineers type it (an SI number, or a string with units such as
 * "940 µF", "3 mΩ", "10 %") and comes out in SI. Each kind names its main value as required (a
 * capacitor without a capacitance or a voltage rating is not a part); the other ratings are
 * optional, and a check that needs one the part does not give stays "not checked".
 */
import { z } from 'zod';

import { DesignError, type DesignIssue } from '../errors';
import { formatEng, parseQuantity, type Dimension } from '../units';

export const PART_KINDS = ['capacitor', 'resistor', 'inductor', 'contactor', 'fuse', 'semiconductor'] as const;
export type PartKind = (typeof PART_KINDS)[number];

type Bound = 'positive' | 'nonNegative' | 'tolerance';

interface FieldInfo {
  label: string;
  dimension: Dimension;
  bound: Bound;
  /** SI unit symbol, for CSV headers and messages. */
  unit: string;
}

/** Every rating a part can carry, in the order the CSV lists them. */
export const PART_FIELDS = {
  capacitance: { label: 'Capacitance', dimension: 'capacitance', bound: 'positive', unit: 'F' },
  resistance: { label: 'Resistance', dimension: 'resistance', bound: 'positive', unit: 'Ω' },
  inductance: { label: 'Inductance', dimension: 'inductance', bound: 'positive', unit: 'H' },
  tolerance: { label: 'Tolerance', dimension: 'ratio', bound: 'tolerance', unit: '' },
  ratedVoltage: { label: 'Rated voltage', dimension: 'voltage', bound: 'positive', unit: 'V' },
  surgeVoltage: { label: 'Surge voltage', dimension: 'voltage', bound: 'positive', unit: 'V' },
  esr: { label: 'ESR', dimension: 'resistance', bound: 'nonNegative', unit: 'Ω' },
  pulseEnergy: { label: 'Pulse energy', dimension: 'energy', bound: 'positive', unit: 'J' },
  pulseDuration: { label: 'Pulse duration', dimension: 'time', bound: 'positive', unit: 's' },
  peakPower: { label: 'Peak power', dimension: 'power', bound: 'positive', unit: 'W' },
  continuousPower: { label: 'Continuous power', dimension: 'power', bound: 'positive', unit: 'W' },
  saturationCurrent: { label: 'Saturation current', dimension: 'current', bound: 'positive', unit: 'A' },
  dcr: { label: 'DC resistance', dimension: 'resistance', bound: 'nonNegative', unit: 'Ω' },
  makeCurrent: { label: 'Make current', dimension: 'current', bound: 'positive', unit: 'A' },
  carryCurrent: { label: 'Carry current', dimension: 'current', bound: 'positive', unit: 'A' },
  ratedCurrent: { label: 'Rated current', dimension: 'current', bound: 'positive', unit: 'A' },
  meltingI2t: { label: 'Melting I²t', dimension: 'i2t', bound: 'positive', unit: 'A²s' },
  blockingVoltage: { label: 'Blocking voltage', dimension: 'voltage', bound: 'positive', unit: 'V' },
  surgeCurrent: { label: 'Surge current (IFSM)', dimension: 'current', bound: 'positive', unit: 'A' },
  i2t: { label: 'I²t', dimension: 'i2t', bound: 'positive', unit: 'A²s' },
} as const satisfies Record<string, FieldInfo>;

export type PartField = keyof typeof PART_FIELDS;
export const PART_FIELD_KEYS = Object.keys(PART_FIELDS) as PartField[];

/** Which ratings each kind has; the first list is required. */
export const KIND_FIELDS = {
  capacitor: { required: ['capacitance', 'ratedVoltage'], optional: ['tolerance', 'surgeVoltage', 'esr'] },
  resistor: { required: ['resistance'], optional: ['tolerance', 'pulseEnergy', 'pulseDuration', 'peakPower', 'continuousPower'] },
  inductor: { required: ['inductance'], optional: ['tolerance', 'saturationCurrent', 'dcr'] },
  contactor: { required: ['carryCurrent'], optional: ['makeCurrent', 'ratedVoltage'] },
  fuse: { required: ['meltingI2t'], optional: ['ratedCurrent', 'ratedVoltage'] },
  semiconductor: { required: ['blockingVoltage'], optional: ['surgeCurrent', 'i2t'] },
} as const satisfies Record<PartKind, { required: readonly PartField[]; optional: readonly PartField[] }>;

export const KIND_LABELS: Record<PartKind, string> = {
  capacitor: 'a capacitor',
  resistor: 'a resistor',
  inductor: 'an inductor',
  contactor: 'a contactor or relay',
  fuse: 'a fuse',
  semiconductor: 'a semiconductor',
};

function boundProblem(bound: Bound, value: number, info: FieldInfo): string | null {
  const shown = info.unit ? formatEng(value, info.unit) : String(value);
  if (bound === 'tolerance') return value >= 0 && value < 1 ? null : `must be at least 0 and below 100 % (got ${value * 100} %)`;
  if (value < 0) return `must not be negative (got ${shown})`;
  if (bound === 'positive' && value === 0) return 'must be greater than 0';
  return null;
}

const quantityInput = z.union([z.number(), z.string()], {
  error: (issue) => (issue.input === undefined ? 'is required' : 'must be a number or a string with units'),
});

function quantity(info: FieldInfo) {
  return quantityInput.transform((input, ctx) => {
    let value: number;
    try {
      value = parseQuantity(input, info.dimension);
    } catch (error) {
      ctx.addIssue({ code: 'custom', message: error instanceof DesignError ? error.issues[0].message : String(error) });
      return z.NEVER;
    }
    const problem = boundProblem(info.bound, value, info);
    if (problem) {
      ctx.addIssue({ code: 'custom', message: problem });
      return z.NEVER;
    }
    return value;
  });
}

const text = (max: number) =>
  z
    .string({ error: (issue) => (issue.input === undefined ? 'is required' : 'must be text') })
    .trim()
    .max(max, { error: `must be at most ${max} characters` });

const common = {
  /** Assigned by the parts library when the part is stored. */
  id: z.string({ error: 'must be text' }).min(1, { error: 'must not be empty' }).optional(),
  /** The team's own part number ("NF-CAP-940-900"), unique within the team. */
  partNumber: text(64).pipe(z.string().min(1, { error: 'is required' })),
  description: text(200).optional(),
  maker: text(100).optional(),
  notes: text(1000).optional(),
};

type Shape<K extends PartKind> = {
  kind: z.ZodLiteral<K>;
} & typeof common &
  Record<(typeof KIND_FIELDS)[K]['required'][number], ReturnType<typeof quantity>> &
  Record<(typeof KIND_FIELDS)[K]['optional'][number], z.ZodOptional<ReturnType<typeof quantity>>>;

function kindSchema<K extends PartKind>(kind: K) {
  const fields = KIND_FIELDS[kind];
  const shape: Record<string, z.ZodType> = { kind: z.literal(kind), ...common };
  for (const key of fields.required) shape[key] = quantity(PART_FIELDS[key]);
  for (const key of fields.optional) shape[key] = quantity(PART_FIELDS[key]).optional();
  return z.strictObject(shape as Shape<K>);
}

const capacitorSchema = kindSchema('capacitor').superRefine((part, ctx) => {
  const { ratedVoltage, surgeVoltage } = part as { ratedVoltage?: number; surgeVoltage?: number };
  if (surgeVoltage !== undefined && ratedVoltage !== undefined && surgeVoltage < ratedVoltage) {
    ctx.addIssue({ code: 'custom', path: ['surgeVoltage'], message: 'must not be below the rated voltage' });
  }
});

export const partSchema = z.discriminatedUnion(
  'kind',
  [
    capacitorSchema,
    kindSchema('resistor'),
    kindSchema('inductor'),
    kindSchema('contactor'),
    kindSchema('fuse'),
    kindSchema('semiconductor'),
  ],
  { error: () => `must be one of ${PART_KINDS.join(', ')}` },
);

export type PartInput = z.input<typeof partSchema>;
export type Part = z.output<typeof partSchema>;
export type PartOf<K extends PartKind> = Extract<Part, { kind: K }>;

function issuesOf(error: z.ZodError): DesignIssue[] {
  const issues: DesignIssue[] = [];
  for (const issue of error.issues) {
    const path = issue.path.map(String).join('.');
    if (issue.code === 'unrecognized_keys') {
      for (const key of issue.keys) {
        const message = key in PART_FIELDS ? 'does not apply to this kind of part' : `unknown field "${key}"`;
        issues.push({ path: path ? `${path}.${key}` : key, message });
      }
    } else issues.push({ path, message: issue.message });
  }
  return issues;
}

export type SafeParsePart = { ok: true; part: Part } | { ok: false; issues: DesignIssue[] };

/** Validates one part; never throws. Issues are named by field ("ratedVoltage"). */
export function safeParsePart(input: unknown): SafeParsePart {
  const result = partSchema.safeParse(input);
  return result.success ? { ok: true, part: result.data } : { ok: false, issues: issuesOf(result.error) };
}

/** Validates one part; throws DesignError naming each bad field. */
export function parsePart(input: unknown): Part {
  const result = safeParsePart(input);
  if (!result.ok) throw new DesignError(result.issues);
  return result.part;
}
