// The one door from the server to the engine (sim/). Nothing else in server/ imports sim, so that
// the engine's public surface the server relies on is written down here, once.
//
// Everything returned is JSON-safe (what would be stored is what is compared): NaN and ±Infinity
// become null, undefined members go, exactly as JSON.stringify writes them.
import { availableParallelism } from 'node:os';
import {
  ENGINE_VERSION,
  formatEng as engineFormatEng,
  presets as enginePresets,
  safeParseDesign,
  simulate,
  type Design,
} from '../../sim';
import { buildNotices, HV_NOTICE_DISCLAIMER } from '../../sim/notices';
import {
  compareColdHot,
  engineDesignOf,
  parseAngle,
  mainsChecks,
  mainsPresetEntry,
  MAX_SWEEP_POINTS,
  safeParseMainsDesign,
  simulateMains,
  sweepSwitchOnAngle,
  type MainsDesign,
} from '../../sim/mains';
import { prechargeSizingSchema, sizePrecharge } from '../../sim/precharge';
import { deratingPolicySchema, evaluateChecks, resolvePolicy, summariseChecks, type DeratingPolicy } from '../../sim/ratings';
import { snubberBeforeAfter, estimateParasitics, proposeSnubber } from '../../sim/snubber';
import { z } from 'zod';
import { DesignError } from '../../sim/errors';
import { parseQuantity, type Dimension } from '../../sim/units';
import {
  MAX_CORNER_PARAMETERS,
  MAX_SAMPLES,
  prepareSpread,
  tolerancesSchema,
  type SpreadDistribution,
  type SpreadMethod,
  type SpreadResult,
  type TolerancesInput,
} from '../../sim/spread';
import { closeSpreadWorkers, runSpreadParallel } from '../../sim/spread/parallel';
import { analyseStability, optimalDamping, RECOMMENDED_MARGIN_DB } from '../../sim/stability';
import type { FieldError } from '../errors';
import { HttpError } from '../errors';

export { HV_NOTICE_DISCLAIMER };
export type { Design };

export const engineVersion = (): string => ENGINE_VERSION;

export type CheckStatus = 'pass' | 'warn' | 'fail' | 'not-checked';

export interface EngineCheck {
  id: string;
  label: string;
  value: number | null;
  limit: number | null;
  deratedLimit: number | null;
  marginPercent: number | null;
  status: CheckStatus;
  basis: string;
  unit: string;
  part?: string;
  message: string;
}

export interface EngineNotice {
  id: string;
  title: string;
  text: string;
  severity: string;
}

export interface CheckSummary {
  pass: number;
  warn: number;
  fail: number;
  notChecked: number;
  worst: CheckStatus;
}

/** What a revision stores from its check. */
export interface CheckOutcome {
  engineVersion: string;
  metrics: Record<string, unknown>;
  solvers: unknown;
  checks: EngineCheck[];
  notices: EngineNotice[];
  summary: CheckSummary;
  warnings: unknown[];
  worstStatus: CheckStatus;
}

export interface Waveform {
  t: number[];
  vC: number[];
  v: number[];
  i: number[];
  vD?: number[] | null;
  prechargePower?: number[] | null;
}

export interface FullCheck extends CheckOutcome {
  design: Design;
  waveform: Waveform;
  phases: unknown;
}

/** The derating policy a check was judged against, stored with each revision. */
export interface StoredPolicy {
  /** The team's overrides at the time (null: the engine's defaults). */
  team: unknown;
  /** Defaults ← team ← the design's own factors, as resolved. */
  resolved: unknown;
}

const jsonSafe = <T>(value: T): T => JSON.parse(JSON.stringify(value)) as T;

const prefixed = (prefix: string, path: string) => [prefix, path].filter(Boolean).join('.') || '(body)';

function invalidDesign(issues: { path: string; message: string }[], prefix: string): HttpError {
  const fields: FieldError[] = issues.map((i) => ({ path: prefixed(prefix, i.path), message: i.message }));
  const first = fields[0];
  const more = fields.length > 1 ? ` (and ${fields.length - 1} more)` : '';
  return new HttpError(
    422,
    'invalid_design',
    first ? `The design is not valid: ${first.path} ${first.message}${more}.` : 'The design is not valid.',
    fields,
  );
}

function isEngineInputError(error: unknown): error is Error & { issues: { path: string; message: string }[] } {
  return error instanceof Error && error.name === 'DesignError' && Array.isArray((error as { issues?: unknown }).issues);
}

/** Runs engine code, turning its invalid-input errors into a 422 naming the fields. */
function guarded<T>(prefix: string, run: () => T): T {
  try {
    return run();
  } catch (error) {
    if (isEngineInputError(error)) throw invalidDesign(error.issues, prefix);
    throw error;
  }
}

export type DesignValidation =
  { valid: true; design: Design; issues: [] } | { valid: false; issues: { path: string; message: string }[] };

/** A mains design (sim/mains) is one with a `mains` section. */
export function isMainsDesign(input: unknown): boolean {
  return typeof input === 'object' && input !== null && !Array.isArray(input) && 'mains' in input;
}

/** The parsed mains design, or a 422 naming the fields. */
export function requireValidMainsDesign(input: unknown, prefix = ''): MainsDesign {
  const result = safeParseMainsDesign(input);
  if (!result.ok) throw invalidDesign(result.issues, prefix);
  return result.design;
}

/** For a mains design, `design` is the engine design standing for its DC side (engineDesignOf). */
export function validateDesign(input: unknown): DesignValidation {
  if (isMainsDesign(input)) {
    const mains = safeParseMainsDesign(input);
    if (!mains.ok) return { valid: false, issues: mains.issues };
    return { valid: true, design: engineDesignOf(mains.design), issues: [] };
  }
  const result = safeParseDesign(input);
  return result.ok ? { valid: true, design: result.design, issues: [] } : { valid: false, issues: result.issues };
}

/** The validated design, or a 422 whose field paths start with `prefix` (the body's field). */
export function requireValidDesign(input: unknown, prefix = ''): Design {
  const result = validateDesign(input);
  if (!result.valid) throw invalidDesign(result.issues, prefix);
  return result.design;
}

export function listPresets(): { id: string; title: string; summary: string; design: unknown }[] {
  return [
    ...enginePresets.map((p) => ({ id: p.id, title: p.title, summary: p.summary, design: p.design as unknown })),
    { id: mainsPresetEntry.id, title: 'Mains power-up: wall charger front end, 230 V', summary: mainsPresetEntry.summary, design: mainsPresetEntry.design },
  ];
}

export function findPreset(id: string) {
  return listPresets().find((p) => p.id === id) ?? null;
}

/** The team's policy override, or a 422 naming the fields (PUT /api/team/derating). */
export function requireValidTeamPolicy(input: unknown): unknown {
  const result = deratingPolicySchema.safeParse(input);
  if (!result.success) {
    const fields = result.error.issues.map((issue) => ({
      path: prefixed('policy', issue.path.map(String).join('.')),
      message: issue.code === 'unrecognized_keys' ? `unknown key ${issue.keys.join(', ')}` : issue.message,
    }));
    throw new HttpError(
      422,
      'invalid_policy',
      `The derating policy is not valid: ${fields[0]?.path} ${fields[0]?.message}.`,
      fields,
    );
  }
  return result.data;
}

/** Defaults with the team's overrides applied (what a design without its own factors is judged by). */
export function effectivePolicy(teamOverrides: unknown): unknown {
  return jsonSafe(resolvePolicy(teamOverrides ?? undefined));
}

export interface RunCheckOptions {
  points?: number;
  /** Field prefix for error paths ('design' for POST /api/check's body). */
  fieldPrefix?: string;
}

/** Validates, simulates, judges the margins and builds the notices. */
export function runCheck(
  designInput: unknown,
  teamOverrides: unknown,
  options: RunCheckOptions = {},
): FullCheck & { policy: StoredPolicy } {
  const prefix = options.fieldPrefix ?? '';
  if (isMainsDesign(designInput)) return runMainsCheck(designInput, teamOverrides, options);
  const design = requireValidDesign(designInput, prefix);
  const policy = guarded(prefix, () => resolvePolicy(teamOverrides ?? undefined, design.derating));
  const result = guarded(prefix, () => simulate(design, options.points ? { points: options.points } : {}));
  const checks = evaluateChecks(design, result.metrics, policy) as EngineCheck[];
  const notices = buildNotices(design, result) as EngineNotice[];
  const summary = summariseChecks(checks) as CheckSummary;
  const outcome: CheckOutcome = jsonSafe({
    engineVersion: ENGINE_VERSION,
    metrics: result.metrics as unknown as Record<string, unknown>,
    solvers: result.solvers,
    checks,
    notices,
    summary,
    warnings: (result.warnings ?? []) as unknown[],
    worstStatus: summary.worst,
  });
  return {
    ...outcome,
    design,
    waveform: result.waveform as Waveform,
    phases: jsonSafe(result.phases ?? null),
    policy: { team: teamOverrides ?? null, resolved: jsonSafe(policy) },
  };
}

/** runCheck for a mains design: simulateMains + mainsChecks, notices from the DC side's engine design. */
function runMainsCheck(
  designInput: unknown,
  teamOverrides: unknown,
  options: RunCheckOptions,
): FullCheck & { policy: StoredPolicy } {
  const prefix = options.fieldPrefix ?? '';
  const mains = requireValidMainsDesign(designInput, prefix);
  const design = engineDesignOf(mains);
  const policy = guarded(prefix, () => resolvePolicy(teamOverrides ?? undefined, mains.derating));
  const result = guarded(prefix, () => simulateMains(mains, options.points ? { points: options.points } : {}));
  const checks = mainsChecks(mains, result, policy) as EngineCheck[];
  const notices = buildNotices(design, result as never) as EngineNotice[];
  const summary = summariseChecks(checks) as CheckSummary;
  const outcome: CheckOutcome = jsonSafe({
    engineVersion: ENGINE_VERSION,
    metrics: result.metrics as unknown as Record<string, unknown>,
    solvers: result.solvers,
    checks,
    notices,
    summary,
    warnings: (result.warnings ?? []) as unknown[],
    worstStatus: summary.worst,
  });
  return {
    ...outcome,
    design,
    waveform: result.waveform as unknown as Waveform,
    phases: null,
    policy: { team: teamOverrides ?? null, resolved: jsonSafe(policy) },
  };
}

/** The stored part of a check (what a revision keeps; no waveform). */
export function storedOutcome(full: CheckOutcome): CheckOutcome {
  const { engineVersion: version, metrics, solvers, checks, notices, summary, warnings, worstStatus } = full;
  return { engineVersion: version, metrics, solvers, checks, notices, summary, warnings, worstStatus };
}

/** Precharge sizing (POST /api/precharge/size): the engine's own input schema; the current team's
 * policy judges a chosen resistor. */
export function sizePrechargeStateless(input: unknown, teamOverrides: unknown, fieldPrefix = ''): unknown {
  const parsed = prechargeSizingSchema.safeParse(input);
  if (!parsed.success) {
    const fields = parsed.error.issues.map((issue) => ({
      path: prefixed(
        fieldPrefix,
        issue.code === 'unrecognized_keys'
          ? [...issue.path.map(String), issue.keys.join(',')].join('.')
          : issue.path.map(String).join('.'),
      ),
      message: issue.code === 'unrecognized_keys' ? `unknown field ${issue.keys.join(', ')}` : issue.message,
    }));
    throw new HttpError(
      422,
      'invalid_sizing',
      `The sizing request is not valid: ${fields[0]?.path} ${fields[0]?.message}.`,
      fields,
    );
  }
  const policy = guarded(fieldPrefix, () => resolvePolicy(teamOverrides ?? undefined));
  return jsonSafe(guarded(fieldPrefix, () => sizePrecharge(parsed.data, simulate, policy)));
}

/**
 * Precharge sizing for a saved design. The design supplies the bus voltage, the capacitance, the
 * bypass threshold and delay, the resistor already chosen and (as the base design) the circuit
 * around it; the options add the limits (maxInrushCurrent, maxPrechargeTime are required) and may
 * override anything else.
 */
export function sizePrechargeForDesign(designInput: unknown, options: Record<string, unknown>, teamOverrides: unknown): unknown {
  const design = requireValidDesign(designInput, 'design');
  const bypass = design.precharge?.bypass;
  const defaults: Record<string, unknown> = {
    busVoltage: design.source.voltage,
    capacitance: design.capacitor.capacitance,
    bypassThreshold: bypass && bypass.when === 'voltage' ? bypass.fraction : 0.95,
    contactorDelay: bypass?.delay ?? 0,
    baseDesign: designInput,
  };
  if (design.precharge) {
    defaults.chosenResistor = {
      resistance: design.precharge.resistance,
      ...(design.ratings.prechargePulseEnergy !== undefined ? { pulseEnergy: design.ratings.prechargePulseEnergy } : {}),
      ...(design.ratings.prechargePeakPower !== undefined ? { peakPower: design.ratings.prechargePeakPower } : {}),
    };
  }
  const input = { ...defaults, ...options };
  const parsed = prechargeSizingSchema.safeParse(input);
  if (!parsed.success) {
    const fields = parsed.error.issues.map((issue) => ({
      path: prefixed('options', issue.path.map(String).join('.')),
      message: issue.message,
    }));
    throw new HttpError(
      422,
      'invalid_sizing',
      `The sizing options are not valid: ${fields[0]?.path} ${fields[0]?.message}.`,
      fields,
    );
  }
  const policy = guarded('options', () => resolvePolicy(teamOverrides ?? undefined, design.derating));
  return jsonSafe(guarded('options', () => sizePrecharge(parsed.data, simulate, policy)));
}

export function formatEng(value: number | null | undefined, unit: string): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '—';
  return engineFormatEng(value, unit);
}

// ---------- spread, stability, snubber (issue 7) ----------

/** Spread options as the engine takes them, minus progress and cancel (the job adds those). */
export interface SpreadRequest {
  method: SpreadMethod;
  samples?: number;
  distribution?: SpreadDistribution;
  seed?: number;
}

/**
 * Checks a spread request against the design before it is queued (the tolerances are known, the
 * parts exist, corners have at most 10 values) and runs the nominal design; a 422 names the field.
 * Returns the total number of samples the run will take.
 */
export function prepareSpreadForDesign(
  designInput: unknown,
  tolerances: unknown,
  request: SpreadRequest,
  teamOverrides: unknown,
  fieldPrefix = 'options',
): { design: Design | MainsDesign; tolerances: TolerancesInput; policy: DeratingPolicy; total: number } {
  // A mains design spreads through the mains engine (sim/spread runs both), not its DC stand-in.
  const design = isMainsDesign(designInput) ? requireValidMainsDesign(designInput, 'design') : requireValidDesign(designInput, 'design');
  const policy = guarded(fieldPrefix, () => resolvePolicy(teamOverrides ?? undefined, design.derating));
  const prepared = guarded(fieldPrefix, () =>
    prepareSpread(design, tolerances as TolerancesInput, { ...request, policy }),
  );
  return { design, tolerances: tolerances as TolerancesInput, policy, total: prepared.ctx.plan.total };
}

/** Runs the spread over worker threads (the event loop stays free). JSON-safe result. */
export async function runSpreadJob(
  prepared: { design: Design | MainsDesign; tolerances: TolerancesInput; policy: DeratingPolicy },
  request: SpreadRequest,
  hooks: { onProgress: (done: number, total: number) => void; signal: AbortSignal },
): Promise<SpreadResult> {
  const result = await runSpreadParallel(prepared.design, prepared.tolerances, {
    ...request,
    // Leave a core to the API thread, so the server keeps answering while a spread runs.
    workers: spreadThreads(),
    policy: prepared.policy,
    onProgress: hooks.onProgress,
    signal: hooks.signal,
  });
  return jsonSafe(result);
}

/** Spread threads in the server: SPREAD_THREADS, else one per core but one (at least one). */
export function spreadThreads(env: NodeJS.ProcessEnv = process.env): number {
  const given = Number(env.SPREAD_THREADS);
  if (Number.isInteger(given) && given >= 1) return given;
  return Math.max(1, availableParallelism() - 1);
}

export const closeEngineWorkers = (): Promise<void> => closeSpreadWorkers();

export interface StabilityRequest {
  fMin?: number;
  fMax?: number;
  pointsPerDecade?: number;
  /** Damping helper: Cd/C ratio n (optional). */
  dampingRatio?: number;
}

/** Stability of the input filter with its constant-power load, and the damping helper for n. */
export function runStability(designInput: unknown, request: StabilityRequest, fieldPrefix = 'design'): unknown {
  const design = requireValidDesign(designInput, fieldPrefix);
  const { dampingRatio, ...sweep } = request;
  const analysis = guarded(fieldPrefix, () => analyseStability(design, sweep));
  const n = dampingRatio ?? 4;
  const damping = guarded('options', () =>
    optimalDamping({ inductance: design.source.inductance + (design.filter?.inductance ?? 0), capacitance: design.capacitor.capacitance, n }),
  );
  return jsonSafe({ ...analysis, damping: { n, ...damping }, recommendedMarginDb: RECOMMENDED_MARGIN_DB });
}

export interface SnubberRequest {
  f1: number;
  f2: number;
  addedCapacitance: number;
  switchingFrequency: number;
  busVoltage?: number;
  multiple?: number;
  points?: number;
}

/** Parasitics from the two ring measurements, the RC snubber, and the turn-off before and after. */
export function runSnubber(designInput: unknown, request: SnubberRequest, teamOverrides: unknown, fieldPrefix = 'design'): unknown {
  const design = requireValidDesign(designInput, fieldPrefix);
  const parasitics = guarded('', () =>
    estimateParasitics({ f1: request.f1, f2: request.f2, addedCapacitance: request.addedCapacitance }),
  );
  const busVoltage = request.busVoltage ?? design.source.voltage;
  const proposal = guarded('', () =>
    proposeSnubber({
      lStray: parasitics.lStray,
      cParasitic: parasitics.cParasitic,
      busVoltage,
      switchingFrequency: request.switchingFrequency,
      ...(request.multiple !== undefined ? { multiple: request.multiple } : {}),
    }),
  );
  const policy = guarded(fieldPrefix, () => resolvePolicy(teamOverrides ?? undefined, design.derating));
  const comparison = guarded(fieldPrefix, () =>
    snubberBeforeAfter(design, { rs: proposal.rs, cs: proposal.cs }, { points: request.points ?? 400, policy }),
  );
  return jsonSafe({ parasitics, proposal: { ...proposal, busVoltage, switchingFrequency: request.switchingFrequency }, comparison });
}

/** A quantity: a number in SI, or a string with units ("1.2 MHz"), read as the engine reads designs. */
const quantity = (dimension: Dimension) =>
  z.union([z.number(), z.string()]).transform((value, zctx) => {
    try {
      const parsed = parseQuantity(value, dimension);
      if (!Number.isFinite(parsed)) throw new Error('must be finite');
      return parsed;
    } catch (error) {
      zctx.addIssue({
        code: 'custom',
        message: error instanceof DesignError ? error.issues[0].message : `could not read "${String(value)}" as a ${dimension}`,
      });
      return z.NEVER;
    }
  });

/** Options of a spread (POST /api/revisions/:id/analyses {kind: 'spread'}). */
export const spreadOptionsSchema = z
  .object({
    method: z.enum(['corners', 'monte-carlo'], { error: 'must be "corners" or "monte-carlo"' }),
    samples: z
      .number({ error: 'must be a whole number of samples' })
      .int('must be a whole number of samples')
      .min(1, 'must be at least 1')
      .max(MAX_SAMPLES, `must be at most ${MAX_SAMPLES} (the largest Monte Carlo run)`)
      .optional(),
    distribution: z.enum(['uniform', 'normal'], { error: 'must be "uniform" or "normal"' }).optional(),
    seed: z
      .number({ error: 'must be a whole number' })
      .int('must be a whole number')
      .min(0, 'must be 0 or more')
      .max(0xffffffff, 'must be at most 4294967295')
      .optional(),
    /** The tolerances to spread; when absent, the design's own `tolerances` section. */
    tolerances: z.record(z.string(), z.unknown(), { error: 'must be an object mapping design paths to tolerances' }).optional(),
  })
  .strict()
  .superRefine((options, zctx) => {
    if (options.tolerances === undefined) return;
    const parsed = tolerancesSchema.safeParse(options.tolerances);
    if (!parsed.success)
      for (const issue of parsed.error.issues) zctx.addIssue({ code: 'custom', path: ['tolerances', ...issue.path.map(String)], message: issue.message });
    else if (options.method === 'corners' && Object.keys(parsed.data).length > MAX_CORNER_PARAMETERS)
      zctx.addIssue({
        code: 'custom',
        path: ['tolerances'],
        message: `corners cover at most ${MAX_CORNER_PARAMETERS} toleranced values (1024 runs): use Monte Carlo, or drop the tolerances that matter least`,
      });
    if (options.method === 'corners' && options.samples !== undefined)
      zctx.addIssue({ code: 'custom', path: ['samples'], message: 'corners run every combination; samples is for Monte Carlo only' });
  }) as unknown as z.ZodType<Record<string, unknown>>;

export const stabilityOptionsSchema = z
  .object({
    fMin: quantity('frequency').optional(),
    fMax: quantity('frequency').optional(),
    pointsPerDecade: z.number().int('must be a whole number').min(5, 'must be at least 5').max(400, 'must be at most 400').optional(),
    dampingRatio: z.number({ error: 'must be a number' }).gt(0, 'must be greater than 0').max(100, 'must be at most 100').optional(),
  })
  .strict() as unknown as z.ZodType<Record<string, unknown>>;

export const snubberOptionsSchema = z
  .object({
    f1: quantity('frequency'),
    f2: quantity('frequency'),
    addedCapacitance: quantity('capacitance'),
    switchingFrequency: quantity('frequency'),
    busVoltage: quantity('voltage').optional(),
    multiple: z.number({ error: 'must be a number' }).gt(0, 'must be greater than 0').max(100, 'must be at most 100').optional(),
    points: z.number().int().min(50).max(5000).optional(),
  })
  .strict() as unknown as z.ZodType<Record<string, unknown>>;

/** Body of POST /api/stability. */
export const stabilityRequestSchema = z.object({ design: z.unknown(), options: stabilityOptionsSchema.default({}) });
/** Body of POST /api/snubber/propose. */
export const snubberRequestSchema = z.object({ design: z.unknown(), options: snubberOptionsSchema });

// ---------- mains power-up (issue 9) ----------

/** An angle in degrees: a number, or a string the engine reads ("90°", "90 deg", "1.571 rad"). */
const degrees = z.union([z.number({ error: 'must be an angle in degrees' }), z.string()]).transform((value, zctx) => {
  try {
    const parsed = parseAngle(value);
    if (!Number.isFinite(parsed)) throw new Error('must be finite');
    return parsed;
  } catch (error) {
    zctx.addIssue({
      code: 'custom',
      message: error instanceof DesignError ? error.issues[0].message : `could not read "${String(value)}" as an angle in degrees`,
    });
    return z.NEVER;
  }
});

const sweepShape = {
  from: degrees.optional(),
  to: degrees.optional(),
  step: degrees.optional(),
  refine: z.boolean({ error: 'must be true or false' }).optional(),
};

function checkSweepRange(options: { from?: number; to?: number; step?: number }, zctx: z.RefinementCtx, path: string[] = []) {
  const from = options.from ?? 0;
  const to = options.to ?? 180;
  const step = options.step ?? 5;
  if (from < -360 || from > 360) zctx.addIssue({ code: 'custom', path: [...path, 'from'], message: 'must be between -360° and 360°' });
  if (to < -360 || to > 720) zctx.addIssue({ code: 'custom', path: [...path, 'to'], message: 'must be between -360° and 720°' });
  if (!(to > from)) zctx.addIssue({ code: 'custom', path: [...path, 'to'], message: `must be greater than from (${from}°)` });
  if (!(step > 0)) zctx.addIssue({ code: 'custom', path: [...path, 'step'], message: 'must be greater than 0°' });
  else if (to > from && Math.floor((to - from) / step) + 1 > MAX_SWEEP_POINTS)
    zctx.addIssue({
      code: 'custom',
      path: [...path, 'step'],
      message: `gives ${Math.floor((to - from) / step) + 1} points; at most ${MAX_SWEEP_POINTS} (use a larger step)`,
    });
}

/** Options of the switch-on angle sweep (analysis kind mains-sweep, POST /api/mains/sweep). */
export const mainsSweepOptionsSchema = z
  .object(sweepShape)
  .strict()
  .superRefine((o, zctx) => checkSweepRange(o, zctx)) as unknown as z.ZodType<Record<string, unknown>>;

/** A start temperature: "25 °C", "298.15 K" or a number in K; the engine reads and bounds it. */
const temperature = z.union([z.number({ error: 'must be a temperature (K, or "25 °C")' }), z.string()]);

/** Options of the cold/hot comparison (analysis kind mains-cold-hot, POST /api/mains/cold-hot). */
export const mainsColdHotOptionsSchema = z
  .object({
    cold: temperature.optional(),
    hot: temperature.optional(),
    sweep: z.object(sweepShape).strict().optional(),
  })
  .strict()
  .superRefine((o, zctx) => checkSweepRange(o.sweep ?? {}, zctx, ['sweep'])) as unknown as z.ZodType<Record<string, unknown>>;

/** Body of POST /api/mains/sweep and /api/mains/cold-hot. */
export const mainsRequestSchema = z.object({ design: z.unknown(), options: z.record(z.string(), z.unknown()).default({}) });

function parseOptions(schema: z.ZodType<Record<string, unknown>>, input: unknown, prefix: string): Record<string, unknown> {
  const parsed = schema.safeParse(input ?? {});
  if (parsed.success) return parsed.data;
  const fields = parsed.error.issues.map((issue) => ({
    path: prefixed(
      prefix,
      issue.code === 'unrecognized_keys'
        ? [...issue.path.map(String), issue.keys.join(',')].join('.')
        : issue.path.map(String).join('.'),
    ),
    message: issue.code === 'unrecognized_keys' ? `unknown field ${issue.keys.join(', ')}` : issue.message,
  }));
  throw new HttpError(400, 'validation_failed', `${fields[0].path}: ${fields[0].message}`, fields);
}

function requireMains(designInput: unknown, prefix: string): MainsDesign {
  if (!isMainsDesign(designInput))
    throw invalidDesign([{ path: 'mains', message: 'is required: this analysis is for mains designs (a design with a mains section)' }], prefix);
  return requireValidMainsDesign(designInput, prefix);
}

/** The peak inrush against switch-on angle and the worst angle. `options` as validated by mainsSweepOptionsSchema. */
export function runMainsSweep(designInput: unknown, options: Record<string, unknown>, designPrefix = 'design'): unknown {
  const design = requireMains(designInput, designPrefix);
  const sweep = guarded('options', () => sweepSwitchOnAngle(design, options as never));
  return jsonSafe({ ...sweep, currentAngle: design.mains.angle });
}

const coldHotCase = (c: ReturnType<typeof compareColdHot>['cold'], design: MainsDesign, policy: DeratingPolicy) => {
  const checks = mainsChecks(design, c.result, policy) as EngineCheck[];
  const m = c.result.metrics;
  return {
    startTemperature: c.startTemperature,
    limiterResistance: c.limiterResistance,
    angle: c.angle,
    sweep: c.sweep,
    metrics: m,
    checks,
    summary: summariseChecks(checks),
  };
};

/** Cold start against hot restart of the NTC, each at its own worst angle, with the checks of each. */
export function runMainsColdHot(
  designInput: unknown,
  options: Record<string, unknown>,
  teamOverrides: unknown,
  designPrefix = 'design',
): unknown {
  const design = requireMains(designInput, designPrefix);
  if (design.mains.limiter.kind !== 'ntc')
    throw invalidDesign([{ path: 'mains.limiter.kind', message: 'must be "ntc" for the cold/hot comparison (a resistor has no temperature to start from)' }], designPrefix);
  const policy = guarded(designPrefix, () => resolvePolicy(teamOverrides ?? undefined, design.derating));
  const { sweep, ...temps } = options as { sweep?: Record<string, unknown>; cold?: number | string; hot?: number | string };
  const comparison = guarded('options', () =>
    compareColdHot(design, { ...temps, sweep: sweep as never, simulate: { waveform: false } }),
  );
  return jsonSafe({
    cold: coldHotCase(comparison.cold, design, policy),
    hot: coldHotCase(comparison.hot, design, policy),
    surgePulseDuration: design.mains.diode.surgePulseDuration,
  });
}

export const parseMainsSweepOptions = (input: unknown, prefix = 'options') => parseOptions(mainsSweepOptionsSchema, input, prefix);
export const parseMainsColdHotOptions = (input: unknown, prefix = 'options') => parseOptions(mainsColdHotOptionsSchema, input, prefix);
