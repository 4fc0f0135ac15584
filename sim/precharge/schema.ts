// The sizing request: zod schema (quantities as SI numbers or strings with units, read through the
// engine's parseQuantity) and its normalisation to SI with the degenerate cases rejected by field.
import { z } from 'zod';

import { DesignError, type DesignIssue } from '../errors';
import { parseQuantity, type Dimension } from '../units';

import type { ESeriesName } from './eSeries';

const quantityInput = z.union([z.number(), z.string()], {
  error: (issue) => (issue.input === undefined ? 'is required' : 'must be a number or a string with units'),
});

function quantity(dimension: Dimension) {
  return quantityInput.transform((input, ctx) => {
    // "±10 %" is how a tolerance is usually written; the sign says nothing more than "10 %".
    const text = typeof input === 'string' && dimension === 'ratio' ? input.replace(/^\s*(±|\+\/-|\+-)\s*/, '') : input;
    try {
      return parseQuantity(text, dimension);
    } catch (error) {
      ctx.addIssue({ code: 'custom', message: error instanceof DesignError ? error.issues[0].message : String(error) });
      return z.NEVER;
    }
  });
}

/** The sizing request as the API and the app send it. */
export const prechargeSizingSchema = z.strictObject({
  /** Nominal bus voltage. */
  busVoltage: quantity('voltage'),
  /** ± fraction ("10 %" or 0.1); or give busVoltageMin/busVoltageMax instead. */
  busVoltageTolerance: quantity('ratio').optional(),
  busVoltageMin: quantity('voltage').optional(),
  busVoltageMax: quantity('voltage').optional(),
  /** Nominal DC-link capacitance. */
  capacitance: quantity('capacitance'),
  capacitanceTolerance: quantity('ratio').optional(),
  capacitanceMin: quantity('capacitance').optional(),
  capacitanceMax: quantity('capacitance').optional(),
  /** Allowed peak inrush current during precharge. */
  maxInrushCurrent: quantity('current'),
  /** Longest allowed time from connection until the bypass closes (threshold time + contactor delay). */
  maxPrechargeTime: quantity('time'),
  /** The bypass closes `contactorDelay` after vC reaches this fraction of the bus voltage (0 < k < 1). */
  bypassThreshold: quantity('ratio'),
  contactorDelay: quantity('time').optional(),
  /** Back-to-back attempts a fault-retry scheme may make (whole number ≥ 1). */
  attempts: z.number({ error: 'must be a whole number of attempts' }).optional(),
  /** Total series inductance (source, cables, filter). */
  seriesInductance: quantity('inductance').optional(),
  /** Resistance of the loop once the bypass is closed (source, contactor, cables, ESR). */
  loopResistance: quantity('resistance').optional(),
  bleederResistance: quantity('resistance').optional(),
  /** A load drawing during precharge. */
  load: z
    .strictObject({
      kind: z.enum(['none', 'resistance', 'current'], { error: 'must be "none", "resistance" or "current"' }),
      value: quantityInput.optional(),
    })
    .optional(),
  /** Tolerance of the resistor you would buy (default 5 %); a value must fit at both ends of it. */
  resistorTolerance: quantity('ratio').optional(),
  series: z
    .array(z.enum(['E12', 'E24'], { error: 'must be "E12" or "E24"' }))
    .min(1)
    .optional(),
  /** A resistor already chosen: checked against the window and its pulse ratings. */
  chosenResistor: z
    .strictObject({
      resistance: quantity('resistance'),
      pulseEnergy: quantity('energy').optional(),
      peakPower: quantity('power').optional(),
    })
    .optional(),
  /** A design file (input form) to re-simulate with each value; without one a design is built from this request. */
  design: z.unknown().optional(),
  /** The same as `design` (either name; not both). */
  baseDesign: z.unknown().optional(),
});

export type PrechargeSizingInput = z.input<typeof prechargeSizingSchema>;

/** A sizing request in SI with the corners resolved. */
export interface SizingRequest {
  busVoltage: { nominal: number; min: number; max: number };
  capacitance: { nominal: number; min: number; max: number };
  maxInrushCurrent: number;
  maxPrechargeTime: number;
  bypassThreshold: number;
  contactorDelay: number;
  attempts: number;
  seriesInductance: number | null;
  loopResistance: number | null;
  bleederResistance: number | null;
  load: { kind: 'resistance' | 'current'; value: number } | null;
  resistorTolerance: number;
  series: ESeriesName[];
  chosenResistor: { resistance: number; pulseEnergy: number | null; peakPower: number | null } | null;
  baseDesign: unknown;
  /** The request field the base design came in ('design' or 'baseDesign'), for error paths. */
  baseDesignField: 'design' | 'baseDesign';
}

export const DEFAULT_RESISTOR_TOLERANCE = 0.05;

function zodIssues(error: z.ZodError): DesignIssue[] {
  const issues: DesignIssue[] = [];
  for (const issue of error.issues) {
    const path = issue.path.map(String).join('.');
    if (issue.code === 'unrecognized_keys') {
      for (const key of issue.keys) issues.push({ path: path ? `${path}.${key}` : key, message: `unknown field "${key}"` });
    } else issues.push({ path, message: issue.message });
  }
  return issues;
}

function band(
  name: string,
  nominal: number,
  tolerance: number | undefined,
  min: number | undefined,
  max: number | undefined,
  issues: DesignIssue[],
): { nominal: number; min: number; max: number } {
  if (tolerance !== undefined && (min !== undefined || max !== undefined)) {
    issues.push({ path: `${name}Tolerance`, message: `give either ${name}Tolerance or ${name}Min/${name}Max, not both` });
  }
  if (tolerance !== undefined && !(tolerance >= 0 && tolerance < 1)) {
    issues.push({ path: `${name}Tolerance`, message: 'must be at least 0 and below 100 %' });
  }
  const t = tolerance ?? 0;
  // Rounded to 12 significant digits so that 800 V + 10 % is 880 V, not 880.0000000000001 V.
  const lo = min ?? Number((nominal * (1 - t)).toPrecision(12));
  const hi = max ?? Number((nominal * (1 + t)).toPrecision(12));
  if (min !== undefined && !(min > 0)) issues.push({ path: `${name}Min`, message: 'must be greater than 0' });
  if (lo > nominal) issues.push({ path: `${name}Min`, message: `must not be above the nominal ${name}` });
  if (hi < nominal) issues.push({ path: `${name}Max`, message: `must not be below the nominal ${name}` });
  return { nominal, min: lo, max: hi };
}

/** Validates and normalises a sizing request; throws DesignError naming each bad field. */
export function parseSizingRequest(input: unknown): SizingRequest {
  const parsed = prechargeSizingSchema.safeParse(input);
  if (!parsed.success) throw new DesignError(zodIssues(parsed.error));
  const d = parsed.data;
  const issues: DesignIssue[] = [];

  if (!(d.busVoltage > 0)) issues.push({ path: 'busVoltage', message: 'must be greater than 0' });
  if (!(d.capacitance > 0)) issues.push({ path: 'capacitance', message: 'must be greater than 0' });
  // Imax ≤ 0: no resistance limits the inrush to it (R ≥ V/Imax has no finite answer).
  if (!(d.maxInrushCurrent > 0)) {
    issues.push({ path: 'maxInrushCurrent', message: 'must be greater than 0: no resistance limits the inrush to zero or less' });
  }
  if (!(d.maxPrechargeTime > 0)) issues.push({ path: 'maxPrechargeTime', message: 'must be greater than 0' });
  // k ≥ 1: an RC charge approaches V but never reaches it, ln(1/(1−k)) is infinite. k ≤ 0: no precharge.
  if (!(d.bypassThreshold > 0 && d.bypassThreshold < 1)) {
    issues.push({
      path: 'bypassThreshold',
      message:
        d.bypassThreshold >= 1
          ? 'must be below 100 %: the capacitor only approaches the bus voltage and never reaches it'
          : 'must be above 0 %',
    });
  }
  const delay = d.contactorDelay ?? 0;
  if (delay < 0) issues.push({ path: 'contactorDelay', message: 'must not be negative' });
  const attempts = d.attempts ?? 1;
  if (!Number.isInteger(attempts) || attempts < 1)
    issues.push({ path: 'attempts', message: 'must be a whole number, at least 1' });
  for (const key of ['seriesInductance', 'loopResistance'] as const) {
    const v = d[key];
    if (v !== undefined && v < 0) issues.push({ path: key, message: 'must not be negative' });
  }
  if (d.bleederResistance !== undefined && !(d.bleederResistance > 0)) {
    issues.push({ path: 'bleederResistance', message: 'must be greater than 0' });
  }
  const resistorTolerance = d.resistorTolerance ?? DEFAULT_RESISTOR_TOLERANCE;
  if (!(resistorTolerance >= 0 && resistorTolerance < 0.5))
    issues.push({ path: 'resistorTolerance', message: 'must be at least 0 and below 50 %' });

  let load: SizingRequest['load'] = null;
  if (d.load && d.load.kind !== 'none') {
    if (d.load.value === undefined) issues.push({ path: 'load.value', message: 'is required for a load' });
    else {
      try {
        const value = parseQuantity(d.load.value, d.load.kind === 'resistance' ? 'resistance' : 'current', 'load.value');
        if (d.load.kind === 'resistance' && !(value > 0))
          issues.push({ path: 'load.value', message: 'a load resistance must be greater than 0' });
        else if (d.load.kind === 'current' && value < 0)
          issues.push({ path: 'load.value', message: 'a load current must not be negative' });
        // A zero load current is no load at all: the plain RC formulas apply.
        else if (!(d.load.kind === 'current' && value === 0)) load = { kind: d.load.kind, value };
      } catch (error) {
        if (error instanceof DesignError) issues.push(...error.issues);
        else throw error;
      }
    }
  }

  const chosen = d.chosenResistor;
  if (chosen && !(chosen.resistance > 0)) issues.push({ path: 'chosenResistor.resistance', message: 'must be greater than 0' });
  for (const key of ['pulseEnergy', 'peakPower'] as const) {
    const v = chosen?.[key];
    if (v !== undefined && !(v > 0)) issues.push({ path: `chosenResistor.${key}`, message: 'must be greater than 0' });
  }

  if (d.design !== undefined && d.baseDesign !== undefined) {
    issues.push({ path: 'baseDesign', message: 'give the base design once, as "design" ("baseDesign" is the same field)' });
  }

  const busVoltage = band('busVoltage', d.busVoltage, d.busVoltageTolerance, d.busVoltageMin, d.busVoltageMax, issues);
  const capacitance = band('capacitance', d.capacitance, d.capacitanceTolerance, d.capacitanceMin, d.capacitanceMax, issues);
  if (issues.length) throw new DesignError(issues);

  return {
    busVoltage,
    capacitance,
    maxInrushCurrent: d.maxInrushCurrent,
    maxPrechargeTime: d.maxPrechargeTime,
    bypassThreshold: d.bypassThreshold,
    contactorDelay: delay,
    attempts,
    seriesInductance: d.seriesInductance ?? null,
    loopResistance: d.loopResistance ?? null,
    bleederResistance: d.bleederResistance ?? null,
    load,
    resistorTolerance,
    series: d.series ? [...new Set(d.series)] : ['E12', 'E24'],
    chosenResistor: chosen
      ? { resistance: chosen.resistance, pulseEnergy: chosen.pulseEnergy ?? null, peakPower: chosen.peakPower ?? null }
      : null,
    baseDesign: d.design ?? d.baseDesign,
    baseDesignField: d.design !== undefined ? 'design' : 'baseDesign',
  };
}
