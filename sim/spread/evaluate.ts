/**
 * Running samples: each sample's design through the closed form where it applies (a series RLC
 * with a step source, a few µs) and through the engine's `simulate` otherwise, then the rating
 * checks; a mains design through the mains engine at its worst switch-on angle (mainsSample.ts),
 * then the mains checks. Results go into flat typed arrays (metric-major), which a worker can hand back without
 * copying and which merge by index, so the summary does not depend on who ran which sample.
 */
import type { Design } from '../design';
import { DesignError } from '../errors';
import type { Metrics } from '../metrics';
import { evaluateChecks, type Check, type CheckStatus, type DeratingPolicy } from '../ratings';
import { simulate } from '../simulate';
import { closedFormMetrics } from '../solvers/closedForm';
import type { MainsDesign } from '../mains/schema';
import { fastChecks, type CheckOutcome } from './checkValues';
import { spreadMetricsFor, type MainsSampleMetrics, type SpreadSubject } from './metricList';
import { evaluateMainsDesign, type MainsAngleRule } from './mainsSample';
import { cloneDesign, isMainsSpreadDesign, type SpreadDesign } from './paths';
import { applySample, drawSample, type SamplePlan } from './sampling';

export type SampleSolver = 'closed-form' | 'engine';

export const SOLVER_CLOSED_FORM = 0;
export const SOLVER_ENGINE = 1;
/** The sample's design could not run (no DC operating point for a constant-power load, …). */
export const SOLVER_INVALID = 2;

export const STATUS_CODES: readonly CheckStatus[] = ['pass', 'not-checked', 'warn', 'fail'];
export const STATUS_INVALID = 4;
const STATUS_INDEX: Record<CheckStatus, number> = { pass: 0, 'not-checked': 1, warn: 2, fail: 3 };

/**
 * What a sample asks of the engine: two waveform points (the metrics come from the solver's own
 * extremum search, not from the grid), no cross-check runs (a single check of the design does
 * those; a spread needs the answer, not its audit, thousands of times), and odex at a relative
 * tolerance of 1e−8 on the nonlinear path instead of the single check's 1e−10: the metrics move by
 * about 1e−9 of their value (measured on the cargo-bike preset), far inside any tolerance band.
 */
export const ENGINE_OPTIONS = { points: 2, crossCheck: false, tolerance: 1e-8 } as const;
/** How many invalid samples keep their message. */
const INVALID_MESSAGES = 20;

export interface DesignEvaluation {
  /** The engine's metrics, or for a mains design the mains engine's with the switch-on angle. */
  metrics: Metrics | MainsSampleMetrics;
  checks: Check[];
  solver: SampleSolver;
}

/** The metrics of one design: the closed form where it applies, the engine otherwise. */
export function sampleMetrics(design: Design): { metrics: Metrics; solver: SampleSolver } {
  const closed = closedFormMetrics(design);
  return closed
    ? { metrics: closed, solver: 'closed-form' }
    : { metrics: simulate(design, ENGINE_OPTIONS).metrics, solver: 'engine' };
}

/**
 * Metrics and the full rating checks (with their messages) of one design. A mains design needs the
 * angle rule (which switch-on angle it runs at); its samples count as 'engine' (the mains engine).
 */
export function evaluateDesign(design: SpreadDesign, policy: DeratingPolicy, angle?: MainsAngleRule | null): DesignEvaluation {
  if (isMainsSpreadDesign(design)) {
    if (!angle) throw new Error('a mains design needs its switch-on angle rule');
    return { ...evaluateMainsDesign(design, angle, policy), solver: 'engine' };
  }
  const { metrics, solver } = sampleMetrics(design);
  return { metrics, checks: evaluateChecks(design, metrics, policy), solver };
}

/** What a range of samples produced. Arrays are metric-major: column m of sample j is [m·count + j]. */
export interface SampleBlock {
  from: number;
  count: number;
  metrics: Float64Array;
  checkValues: Float64Array;
  checkMargins: Float64Array;
  checkStatus: Uint8Array;
  solver: Uint8Array;
  invalid: { index: number; message: string }[];
}

export interface EvaluationContext {
  plan: SamplePlan;
  policy: DeratingPolicy;
  /** Check ids in column order (the nominal run's checks). */
  checkIds: string[];
  /** The nominal run's checks: their limits and derated limits hold for every sample. */
  template: Check[];
  /** Read checks with fastChecks (verified against evaluateChecks before the run) or run evaluateChecks. */
  fastChecks: boolean;
  /** Which engine: 'dc' (sim/simulate) or 'mains' (sim/mains). */
  subject: SpreadSubject;
  /** Mains designs: how each sample's switch-on angle is chosen (null for DC). */
  mainsAngle: MainsAngleRule | null;
}

export function emptyBlock(ctx: EvaluationContext, from: number, count: number): SampleBlock {
  const nM = spreadMetricsFor(ctx.subject).length;
  const nC = ctx.checkIds.length;
  return {
    from,
    count,
    metrics: new Float64Array(nM * count).fill(NaN),
    checkValues: new Float64Array(nC * count).fill(NaN),
    checkMargins: new Float64Array(nC * count).fill(NaN),
    checkStatus: new Uint8Array(nC * count),
    solver: new Uint8Array(count),
    invalid: [],
  };
}

/** The design of sample k (a fresh copy). */
export function sampleDesign(plan: SamplePlan, k: number): SpreadDesign {
  const values = new Float64Array(plan.parameters.length);
  drawSample(plan, k, values);
  return applySample(plan, values, cloneDesign(plan.design));
}

/** The values of sample k, by path. */
export function sampleValues(plan: SamplePlan, k: number): Record<string, number> {
  const values = new Float64Array(plan.parameters.length);
  drawSample(plan, k, values);
  const out: Record<string, number> = {};
  plan.parameters.forEach((p, j) => (out[p.path] = values[j]));
  return out;
}

/**
 * Runs samples [from, to). `shouldStop`, asked after each sample, ends the block early (the block
 * then holds `count` = samples done).
 */
export function evaluateRange(ctx: EvaluationContext, from: number, to: number, shouldStop?: () => boolean): SampleBlock {
  const { plan, policy, checkIds } = ctx;
  const count = to - from;
  const block = emptyBlock(ctx, from, count);
  const metricList = spreadMetricsFor(ctx.subject);
  const nM = metricList.length;
  const columnOf = new Map(checkIds.map((id, c) => [id, c]));
  const values = new Float64Array(plan.parameters.length);
  for (let j = 0; j < count; j++) {
    const k = from + j;
    drawSample(plan, k, values);
    const design = applySample(plan, values, cloneDesign(plan.design));
    let result: { metrics: Metrics | MainsSampleMetrics; solver: SampleSolver; checks: CheckOutcome[] };
    try {
      if (isMainsSpreadDesign(design)) {
        result = evaluateDesign(design as MainsDesign, policy, ctx.mainsAngle);
      } else {
        const { metrics, solver } = sampleMetrics(design);
        const checks = ctx.fastChecks ? fastChecks(design, metrics, policy, ctx.template) : evaluateChecks(design, metrics, policy);
        result = { metrics, solver, checks };
      }
    } catch (error) {
      if (!(error instanceof DesignError)) throw error;
      block.solver[j] = SOLVER_INVALID;
      for (let c = 0; c < checkIds.length; c++) block.checkStatus[c * count + j] = STATUS_INVALID;
      if (block.invalid.length < INVALID_MESSAGES) block.invalid.push({ index: k, message: error.message });
      if (shouldStop?.()) return truncate(block, j + 1);
      continue;
    }
    block.solver[j] = result.solver === 'closed-form' ? SOLVER_CLOSED_FORM : SOLVER_ENGINE;
    for (let m = 0; m < nM; m++) {
      const x = metricList[m].read(result.metrics);
      block.metrics[m * count + j] = x === null || !Number.isFinite(x) ? NaN : x;
    }
    for (let c = 0; c < checkIds.length; c++) block.checkStatus[c * count + j] = STATUS_INDEX['not-checked'];
    for (const check of result.checks) {
      const c = columnOf.get(check.id);
      if (c === undefined) continue;
      block.checkStatus[c * count + j] = STATUS_INDEX[check.status];
      block.checkValues[c * count + j] = check.value ?? NaN;
      block.checkMargins[c * count + j] = check.marginPercent ?? NaN;
    }
    if (shouldStop?.()) return truncate(block, j + 1);
  }
  return block;
}

/** The first `done` samples of a block, repacked. */
function truncate(block: SampleBlock, done: number): SampleBlock {
  if (done === block.count) return block;
  const cut = <T extends Float64Array | Uint8Array>(a: T, columns: number): T => {
    const out = new (a.constructor as new (n: number) => T)(columns * done);
    for (let c = 0; c < columns; c++) out.set(a.subarray(c * block.count, c * block.count + done), c * done);
    return out;
  };
  const nM = block.metrics.length / block.count;
  const nC = block.checkValues.length / block.count;
  return {
    from: block.from,
    count: done,
    metrics: cut(block.metrics, nM),
    checkValues: cut(block.checkValues, nC),
    checkMargins: cut(block.checkMargins, nC),
    checkStatus: cut(block.checkStatus, nC),
    solver: block.solver.slice(0, done),
    invalid: block.invalid,
  };
}

/** Copies a block into the full-length columns at its own index range. */
export function mergeBlock(into: SampleBlock, block: SampleBlock): void {
  const offset = block.from - into.from;
  const copy = (dst: Float64Array | Uint8Array, src: Float64Array | Uint8Array) => {
    const columns = src.length / block.count;
    for (let c = 0; c < columns; c++) dst.set(src.subarray(c * block.count, (c + 1) * block.count), c * into.count + offset);
  };
  if (block.count === 0) return;
  copy(into.metrics, block.metrics);
  copy(into.checkValues, block.checkValues);
  copy(into.checkMargins, block.checkMargins);
  copy(into.checkStatus, block.checkStatus);
  into.solver.set(block.solver, offset);
  // Kept by index, so that the list does not depend on the order blocks arrive in.
  into.invalid = [...into.invalid, ...block.invalid].sort((a, b) => a.index - b.index).slice(0, INVALID_MESSAGES);
}
