/**
 * runSpread: the tolerance spread of a design, by corners or Monte Carlo, on this thread. Runs in
 * slices and yields to the event loop between them, so that progress is reported (at least every
 * 1 % of the samples) and an AbortSignal is seen promptly; a cancelled run returns
 * `{ status: 'cancelled' }` rather than throwing. The parallel run (parallel.ts) shares the plan
 * and the summary, and gives the identical result for the same seed.
 */
import type { Design } from '../design';
import type { Metrics } from '../metrics';
import { DesignError } from '../errors';
import { evaluateChecks, resolvePolicy, type DeratingPolicy } from '../ratings';
import { fastChecksAgree } from './checkValues';
import {
  emptyBlock,
  evaluateDesign,
  evaluateRange,
  mergeBlock,
  sampleDesign,
  sampleMetrics,
  type EvaluationContext,
} from './evaluate';
import { worstSwitchOnAngle, type MainsAngleRule } from './mainsSample';
import { isMainsSpreadDesign, type SpreadDesign } from './paths';
import { DEFAULT_SEED } from './random';
import { MAX_CORNER_PARAMETERS, samplesFor, type SamplePlan, type SpreadDistribution, type SpreadMethod } from './sampling';
import { summariseSpread, type SpreadComplete, type SpreadResult } from './summary';
import { resolveTolerances, type Tolerances, type TolerancesInput } from './tolerances';

export interface SpreadOptions {
  method: SpreadMethod;
  /** Monte Carlo samples, default 2000, at most 100 000 (corners always run all 2ⁿ). */
  samples?: number;
  /** Monte Carlo: uniform in the band, or normal with the band = ±3σ, truncated. Default uniform. */
  distribution?: SpreadDistribution;
  /** Monte Carlo seed, an integer 0 … 2³² − 1; default DEFAULT_SEED. Reported in the result. */
  seed?: number;
  /** Resolved derating policy (see sim/ratings resolvePolicy); default the published defaults with the design's derating. */
  policy?: DeratingPolicy;
  onProgress?: (done: number, total: number) => void;
  signal?: AbortSignal;
}

export interface PreparedSpread {
  ctx: EvaluationContext;
  nominal: SpreadComplete['nominal'];
}

/**
 * Validates the options and tolerances, and runs the nominal design (which must run). A mains design
 * (sim/mains) runs at its worst switch-on angle, searched here; corners search it again for every
 * corner, Monte Carlo keeps it (mainsSample.ts, README "Mains designs").
 */
export function prepareSpread(design: SpreadDesign, tolerances: Tolerances | TolerancesInput, options: SpreadOptions): PreparedSpread {
  if (options.method !== 'corners' && options.method !== 'monte-carlo') {
    throw new DesignError('must be "corners" or "monte-carlo"', 'method');
  }
  const distribution = options.distribution ?? 'uniform';
  if (distribution !== 'uniform' && distribution !== 'normal')
    throw new DesignError('must be "uniform" or "normal"', 'distribution');
  const seed = options.seed ?? DEFAULT_SEED;
  if (!Number.isInteger(seed) || seed < 0 || seed > 0xffffffff)
    throw new DesignError('must be a whole number from 0 to 4 294 967 295', 'seed');
  const parameters = resolveTolerances(design, tolerances);
  if (options.method === 'corners' && parameters.length > MAX_CORNER_PARAMETERS) {
    const extra = parameters[MAX_CORNER_PARAMETERS];
    throw new DesignError(
      `corners cover at most ${MAX_CORNER_PARAMETERS} toleranced values (1024 runs), and this is value ${MAX_CORNER_PARAMETERS + 1} of ${parameters.length}: use Monte Carlo, or drop the tolerances that matter least`,
      `tolerances.${extra.path}`,
    );
  }
  const total = samplesFor(options.method, parameters.length, options.samples);
  const plan: SamplePlan = { design, parameters, method: options.method, distribution, seed, total };
  const policy = options.policy ?? resolvePolicy(undefined, design.derating);
  if (isMainsSpreadDesign(design)) {
    const worst = worstSwitchOnAngle(design);
    const mainsAngle: MainsAngleRule = { mode: options.method === 'corners' ? 'search' : 'fixed', angle: worst.angle };
    const nominal = evaluateDesign(design, policy, { mode: 'fixed', angle: worst.angle });
    return {
      ctx: {
        plan,
        policy,
        checkIds: nominal.checks.map((c) => c.id),
        template: nominal.checks,
        // The fast readers follow evaluateChecks on a DC design; the mains checks are mainsChecks.
        fastChecks: false,
        subject: 'mains',
        mainsAngle,
      },
      nominal,
    };
  }
  const nominal = evaluateDesign(design, policy);
  const fast = fastChecksHold(plan, policy, nominal);
  return {
    ctx: {
      plan,
      policy,
      checkIds: nominal.checks.map((c) => c.id),
      template: nominal.checks,
      fastChecks: fast,
      subject: 'dc',
      mainsAngle: null,
    },
    nominal,
  };
}

/** Samples on which the fast check readers are compared with evaluateChecks before a run. */
const FAST_CHECK_PROBES = 16;

/**
 * Whether the fast check readers (checkValues.ts) agree exactly with evaluateChecks on the nominal
 * design and on the run's first samples; if not, the run uses evaluateChecks throughout.
 */
function fastChecksHold(plan: SamplePlan, policy: DeratingPolicy, nominal: PreparedSpread['nominal']): boolean {
  if (!fastChecksAgree(plan.design as Design, nominal.metrics as Metrics, policy, nominal.checks, nominal.checks)) return false;
  for (let k = 0; k < Math.min(plan.total, FAST_CHECK_PROBES); k++) {
    const design = sampleDesign(plan, k) as Design;
    let metrics;
    try {
      metrics = sampleMetrics(design).metrics;
    } catch (error) {
      if (error instanceof DesignError) continue;
      throw error;
    }
    if (!fastChecksAgree(design, metrics, policy, evaluateChecks(design, metrics, policy), nominal.checks)) return false;
  }
  return true;
}

/** Samples per progress report: at most 1 % of the run. */
export function progressStep(total: number): number {
  return Math.max(1, Math.floor(total / 100));
}

const SLICE_MS = 15;

function now(): number {
  return typeof performance !== 'undefined' ? performance.now() : Date.now();
}

/** Lets timers and abort events run. */
export function yieldToEventLoop(): Promise<void> {
  return new Promise((resolve) => (typeof setImmediate === 'function' ? setImmediate(resolve) : setTimeout(resolve, 0)));
}

export async function runSpread(
  design: SpreadDesign,
  tolerances: Tolerances | TolerancesInput,
  options: SpreadOptions,
): Promise<SpreadResult> {
  const started = now();
  const { ctx, nominal } = prepareSpread(design, tolerances, options);
  const { total } = ctx.plan;
  const cancelled = (done: number): SpreadResult => ({
    status: 'cancelled',
    method: ctx.plan.method,
    seed: ctx.plan.method === 'monte-carlo' ? ctx.plan.seed : null,
    done,
    total,
  });
  const columns = emptyBlock(ctx, 0, total);
  const step = progressStep(total);
  let done = 0;
  let sliceStart = now();
  options.onProgress?.(0, total);
  const sliceOver = () => now() - sliceStart > SLICE_MS;
  while (done < total) {
    if (options.signal?.aborted) return cancelled(done);
    const nextReport = Math.min(total, (Math.floor(done / step) + 1) * step);
    // A slice ends at the next 1 % mark or after SLICE_MS, whichever comes first.
    const block = evaluateRange(ctx, done, nextReport, sliceOver);
    mergeBlock(columns, block);
    done += block.count;
    if (done === nextReport) options.onProgress?.(done, total);
    if (sliceOver()) {
      await yieldToEventLoop();
      sliceStart = now();
    }
  }
  if (options.signal?.aborted) return cancelled(done);
  return summariseSpread({ ctx, nominal, columns, run: { elapsedMs: now() - started, workers: 1 } });
}
