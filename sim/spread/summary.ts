/**
 * From the sample columns to the spread result: per metric and per rating check the nominal value,
 * min, max, 1st/99th percentiles, the worst case and the parameter values that produced it (with
 * the whole design, so the app can open that corner as a design), and histograms for the app.
 * A pure function of the columns, so serial and parallel runs summarise identically.
 */
import type { Design, DesignInput } from '../design';
import type { MainsDesign, MainsDesignInput } from '../mains/schema';
import type { Metrics } from '../metrics';
import type { Check, CheckStatus } from '../ratings';
import { toDesignInput, toMainsDesignInput } from './designInput';
import {
  SOLVER_CLOSED_FORM,
  SOLVER_ENGINE,
  SOLVER_INVALID,
  STATUS_CODES,
  STATUS_INVALID,
  sampleDesign,
  sampleValues,
  type EvaluationContext,
  type SampleBlock,
  type SampleSolver,
} from './evaluate';
import {
  HISTOGRAM_BINS,
  histogramMetricsFor,
  spreadMetricsFor,
  type MainsSampleMetrics,
  type SpreadMetricKey,
  type SpreadSubject,
} from './metricList';
import { MAINS_ANGLE_SWEEP, mainsSampleMetrics, worstSwitchOnAngle, type MainsAngleRule } from './mainsSample';
import { PRNG_NAME } from './random';
import type { SpreadDistribution, SpreadMethod } from './sampling';
import { histogramBins, summariseColumn, type HistogramBin } from './statistics';
import type { SpreadParameter } from './tolerances';

/** One sample's parameter values, and the sample as a design of its own. */
export interface SpreadCombination {
  /** Sample index (the corner's bit pattern for corners: bit j set = parameter j at its max). */
  sample: number;
  /** The toleranced values, SI, by design path. */
  values: Record<string, number>;
  /** The nominal design with these values: open it as a design (a mains design at the switch-on angle the sample ran at). */
  design: DesignInput | MainsDesignInput;
}

/** What a mains spread adds: how the switch-on angle was chosen, and how far that choice was checked. */
export interface MainsSpreadInfo {
  /** 'search': every sample at its own worst angle (corners); 'fixed': every sample at the nominal's worst angle (Monte Carlo). */
  angleMode: MainsAngleRule['mode'];
  /** The nominal design's worst switch-on angle, degrees (the design file's own angle is `designAngle`). */
  nominalAngle: number;
  designAngle: number;
  /** The sweep each search runs, degrees (refined to 0.01° around the worst point). */
  sweep: { from: number; to: number; step: number };
  /**
   * Monte Carlo only: the samples with the largest inrush and the worst margin, searched again for
   * their own worst angle. `differencePercent` is how much more peak current the searched angle
   * gives (≥ 0 up to the refinement's tolerance): the error of holding the nominal's angle.
   */
  angleCheck: {
    sample: number;
    usedAngle: number;
    searchedAngle: number;
    peakCurrentAtUsed: number;
    peakCurrentAtSearched: number;
    differencePercent: number;
  }[];
}

export interface MetricSpread {
  key: SpreadMetricKey;
  label: string;
  unit: string;
  /** Value at the nominal design (null when the metric does not apply there). */
  nominal: number | null;
  /** Samples where the metric applies. */
  count: number;
  min: number | null;
  max: number | null;
  mean: number | null;
  p1: number | null;
  p99: number | null;
  atMin: SpreadCombination | null;
  atMax: SpreadCombination | null;
}

export interface CheckSpread {
  id: string;
  label: string;
  unit: string;
  part?: string;
  limit: number | null;
  deratedLimit: number | null;
  nominal: { value: number | null; marginPercent: number | null; status: CheckStatus };
  /** Over the samples where the check has a value. */
  value: { min: number; max: number; p1: number; p99: number } | null;
  /** Over the samples where the check has a margin; `min` is the worst case. */
  marginPercent: { min: number; max: number; p1: number; p99: number } | null;
  counts: { pass: number; warn: number; fail: number; notChecked: number; invalid: number };
  /** Worst status over the samples (an invalid sample counts as a fail). */
  worstStatus: CheckStatus;
  /** The sample with the smallest margin. */
  worst: (SpreadCombination & { value: number; marginPercent: number; status: CheckStatus }) | null;
  message: string;
}

export interface SpreadHistogram {
  key: SpreadMetricKey;
  label: string;
  unit: string;
  nominal: number | null;
  bins: HistogramBin[];
  /** Rating lines to draw: the checks that compare this metric with a limit. */
  ratings: { checkId: string; label: string; limit: number; deratedLimit: number | null }[];
}

export interface SpreadComplete {
  status: 'complete';
  /** Which engine ran the samples: the DC engine or the mains engine (a design with a mains section). */
  subject: SpreadSubject;
  /** Mains designs only (null for DC). */
  mains: MainsSpreadInfo | null;
  method: SpreadMethod;
  /** Monte Carlo only (null for corners). */
  distribution: SpreadDistribution | null;
  seed: number | null;
  prng: string | null;
  samples: number;
  parameters: SpreadParameter[];
  /** How the samples were computed. */
  solver: {
    used: SampleSolver | 'mixed';
    closedForm: number;
    engine: number;
    invalid: number;
    /** 'fast': per-sample checks read without messages (checkValues.ts), verified against evaluateChecks; 'full': evaluateChecks per sample. */
    checks: 'fast' | 'full';
  };
  nominal: { metrics: Metrics | MainsSampleMetrics; checks: Check[]; solver: SampleSolver };
  metrics: MetricSpread[];
  checks: CheckSpread[];
  histograms: SpreadHistogram[];
  /** The check with the smallest margin over all samples, and where. */
  worstCase:
    (SpreadCombination & { checkId: string; label: string; value: number; marginPercent: number; status: CheckStatus }) | null;
  /** Worst status over every check and sample; invalid samples count as a fail. */
  worstStatus: CheckStatus;
  /** Samples whose design could not run (the first few, by index, with the reason). */
  invalid: { count: number; samples: (SpreadCombination & { message: string })[] };
  /** Wall time and threads; the only fields that differ between otherwise identical runs. */
  run: { elapsedMs: number; workers: number };
}

export interface SpreadCancelled {
  status: 'cancelled';
  method: SpreadMethod;
  seed: number | null;
  done: number;
  total: number;
}

export type SpreadResult = SpreadComplete | SpreadCancelled;

/** Which checks draw their rating line on which histogram. */
const HISTOGRAM_CHECKS: Record<string, string[]> = {
  peakCapacitorVoltage: ['capacitor-voltage', 'capacitor-surge-voltage'],
  peakCurrent: ['inductor-saturation', 'diode-surge-current'],
  i2t: ['fuse-i2t', 'diode-i2t', 'cable-i2t'],
  prechargeEnergy: ['precharge-pulse-energy'],
  peakBusVoltage: ['switch-voltage'],
};

/** The same for a mains spread, whose checks read the rectifier's metrics (sim/mains/checks.ts). */
const MAINS_HISTOGRAM_CHECKS: Record<string, string[]> = {
  peakCapacitorVoltage: ['capacitor-voltage', 'capacitor-surge-voltage'],
  peakCurrent: ['inductor-saturation'],
  surgeEquivalentCurrent: ['diode-surge-current'],
  i2t: ['fuse-i2t', 'cable-i2t'],
  diodeI2t: ['diode-i2t'],
  limiterEnergy: ['precharge-pulse-energy'],
};

const SEVERITY: Record<CheckStatus, number> = { pass: 0, 'not-checked': 1, warn: 2, fail: 3 };

export interface SummaryInput {
  ctx: EvaluationContext;
  nominal: { metrics: Metrics | MainsSampleMetrics; checks: Check[]; solver: SampleSolver };
  columns: SampleBlock;
  run: { elapsedMs: number; workers: number };
}

export function summariseSpread({ ctx, nominal, columns, run }: SummaryInput): SpreadComplete {
  const { plan } = ctx;
  const n = columns.count;
  const metricList = spreadMetricsFor(ctx.subject);
  const angleColumn = ctx.subject === 'mains' ? metricList.findIndex((info) => info.key === 'switchOnAngle') : -1;
  /** The switch-on angle sample k ran at (mains), else undefined. */
  const angleOf = (k: number): number | undefined => {
    if (angleColumn < 0) return undefined;
    const angle = columns.metrics[angleColumn * n + k];
    return Number.isFinite(angle) ? angle : undefined;
  };
  const inputOf = (k: number): DesignInput | MainsDesignInput => {
    const design = sampleDesign(plan, k);
    return ctx.subject === 'mains' ? toMainsDesignInput(design as MainsDesign, angleOf(k)) : toDesignInput(design as Design);
  };
  const combos = new Map<number, SpreadCombination>();
  const combination = (k: number): SpreadCombination => {
    let c = combos.get(k);
    if (!c) {
      c = { sample: k, values: sampleValues(plan, k), design: inputOf(k) };
      combos.set(k, c);
    }
    return c;
  };

  const metricSummaries = metricList.map((_, m) => summariseColumn(columns.metrics.subarray(m * n, (m + 1) * n)));
  const metrics: MetricSpread[] = metricList.map((info, m) => {
    const s = metricSummaries[m];
    return {
      key: info.key,
      label: info.label,
      unit: info.unit,
      nominal: finite(info.read(nominal.metrics)),
      count: s.count,
      min: s.min,
      max: s.max,
      mean: s.mean,
      p1: s.p1,
      p99: s.p99,
      atMin: s.minIndex === null ? null : combination(s.minIndex),
      atMax: s.maxIndex === null ? null : combination(s.maxIndex),
    };
  });

  const nominalById = new Map(nominal.checks.map((c) => [c.id, c]));
  const checks: CheckSpread[] = ctx.checkIds.map((id, c) => {
    const base = nominalById.get(id)!;
    const status = columns.checkStatus.subarray(c * n, (c + 1) * n);
    const values = summariseColumn(columns.checkValues.subarray(c * n, (c + 1) * n));
    const margins = summariseColumn(columns.checkMargins.subarray(c * n, (c + 1) * n));
    const counts = { pass: 0, warn: 0, fail: 0, notChecked: 0, invalid: 0 };
    for (let j = 0; j < n; j++) {
      const code = status[j];
      if (code === STATUS_INVALID) counts.invalid++;
      else if (code === 0) counts.pass++;
      else if (code === 1) counts.notChecked++;
      else if (code === 2) counts.warn++;
      else counts.fail++;
    }
    const worstStatus: CheckStatus =
      counts.fail > 0 || counts.invalid > 0 ? 'fail' : counts.warn > 0 ? 'warn' : counts.notChecked > 0 ? 'not-checked' : 'pass';
    const k = margins.minIndex;
    const worst =
      k === null
        ? null
        : {
            ...combination(k),
            value: columns.checkValues[c * n + k],
            marginPercent: columns.checkMargins[c * n + k],
            status: STATUS_CODES[status[k]],
          };
    const check: CheckSpread = {
      id,
      label: base.label,
      unit: base.unit,
      ...(base.part ? { part: base.part } : {}),
      limit: base.limit,
      deratedLimit: base.deratedLimit,
      nominal: { value: base.value, marginPercent: base.marginPercent, status: base.status },
      value: values.count ? { min: values.min!, max: values.max!, p1: values.p1!, p99: values.p99! } : null,
      marginPercent: margins.count ? { min: margins.min!, max: margins.max!, p1: margins.p1!, p99: margins.p99! } : null,
      counts,
      worstStatus,
      worst,
      message: '',
    };
    check.message = checkMessage(check, n);
    return check;
  });

  const histogramChecks = ctx.subject === 'mains' ? MAINS_HISTOGRAM_CHECKS : HISTOGRAM_CHECKS;
  const histograms: SpreadHistogram[] = histogramMetricsFor(ctx.subject).map((key) => {
    const m = metricList.findIndex((info) => info.key === key);
    const s = metricSummaries[m];
    const ratings = (histogramChecks[key] ?? [])
      .map((id) => nominalById.get(id))
      .filter((c): c is Check => !!c && c.limit !== null)
      .map((c) => ({ checkId: c.id, label: c.label, limit: c.limit!, deratedLimit: c.deratedLimit }));
    return {
      key,
      label: metricList[m].label,
      unit: metricList[m].unit,
      nominal: metrics[m].nominal,
      bins: histogramBins(s.values, s.min, s.max, HISTOGRAM_BINS),
      ratings,
    };
  });

  let worstCase: SpreadComplete['worstCase'] = null;
  for (const check of checks) {
    if (!check.worst) continue;
    const better =
      !worstCase ||
      check.worst.marginPercent < worstCase.marginPercent ||
      (check.worst.marginPercent === worstCase.marginPercent && SEVERITY[check.worst.status] > SEVERITY[worstCase.status]);
    if (better) worstCase = { ...check.worst, checkId: check.id, label: check.label };
  }

  let closedForm = 0;
  let engine = 0;
  let invalid = 0;
  for (let j = 0; j < n; j++) {
    if (columns.solver[j] === SOLVER_CLOSED_FORM) closedForm++;
    else if (columns.solver[j] === SOLVER_ENGINE) engine++;
    else if (columns.solver[j] === SOLVER_INVALID) invalid++;
  }
  const worstStatus = checks.reduce<CheckStatus>(
    (w, c) => (SEVERITY[c.worstStatus] > SEVERITY[w] ? c.worstStatus : w),
    invalid > 0 ? 'fail' : 'pass',
  );

  return {
    status: 'complete',
    subject: ctx.subject,
    mains: ctx.subject === 'mains' ? mainsInfo(ctx, metrics, worstCase, angleOf) : null,
    method: plan.method,
    distribution: plan.method === 'monte-carlo' ? plan.distribution : null,
    seed: plan.method === 'monte-carlo' ? plan.seed : null,
    prng: plan.method === 'monte-carlo' ? PRNG_NAME : null,
    samples: n,
    parameters: plan.parameters,
    solver: {
      used: engine === 0 ? 'closed-form' : closedForm === 0 ? 'engine' : 'mixed',
      closedForm,
      engine,
      invalid,
      checks: ctx.fastChecks ? 'fast' : 'full',
    },
    nominal,
    metrics,
    checks,
    histograms,
    worstCase,
    worstStatus: checks.length ? worstStatus : invalid > 0 ? 'fail' : 'not-checked',
    invalid: { count: invalid, samples: columns.invalid.map((e) => ({ ...combination(e.index), message: e.message })) },
    run,
  };
}

/**
 * How the mains spread chose its angles; for Monte Carlo (every sample at the nominal's worst
 * angle), the samples with the largest inrush and the worst margin searched again for their own.
 */
function mainsInfo(
  ctx: EvaluationContext,
  metrics: MetricSpread[],
  worstCase: SpreadComplete['worstCase'],
  angleOf: (k: number) => number | undefined,
): MainsSpreadInfo {
  const rule = ctx.mainsAngle!;
  const angleCheck: MainsSpreadInfo['angleCheck'] = [];
  if (rule.mode === 'fixed') {
    const peak = metrics.find((m) => m.key === 'peakCurrent');
    const samples = [...new Set([peak?.atMax?.sample, worstCase?.sample].filter((k): k is number => k !== undefined))];
    for (const k of samples) {
      const design = sampleDesign(ctx.plan, k) as MainsDesign;
      const usedAngle = angleOf(k) ?? rule.angle;
      const atUsed = mainsSampleMetrics(design, { mode: 'fixed', angle: usedAngle }).peakCurrent.value;
      const searched = worstSwitchOnAngle(design);
      angleCheck.push({
        sample: k,
        usedAngle,
        searchedAngle: searched.angle,
        peakCurrentAtUsed: atUsed,
        peakCurrentAtSearched: searched.peakCurrent,
        differencePercent: atUsed > 0 ? (100 * (searched.peakCurrent - atUsed)) / atUsed : 0,
      });
    }
  }
  return {
    angleMode: rule.mode,
    nominalAngle: rule.angle,
    designAngle: (ctx.plan.design as MainsDesign).mains.angle,
    sweep: { ...MAINS_ANGLE_SWEEP },
    angleCheck,
  };
}

function finite(x: number | null): number | null {
  return x === null || !Number.isFinite(x) ? null : x;
}

function fmtPercent(x: number): string {
  return `${Number(x.toPrecision(3))} %`;
}

/** One plain sentence about the check over the spread. */
function checkMessage(c: CheckSpread, n: number): string {
  const bad = c.counts.fail + c.counts.invalid;
  if (c.limit === null || (!c.marginPercent && c.counts.invalid === 0))
    return `${c.label}: not checked (no rating, or the metric does not apply).`;
  const worst = c.marginPercent ? `worst margin ${fmtPercent(c.marginPercent.min)}` : 'no margin';
  if (bad > 0) return `${c.label}: ${bad} of ${n} samples fail; ${worst}.`;
  if (c.counts.warn > 0) return `${c.label}: ${c.counts.warn} of ${n} samples are past the derated limit; ${worst}.`;
  if (c.counts.notChecked > 0) return `${c.label}: passes where it applies (${c.counts.pass} of ${n} samples); ${worst}.`;
  return `${c.label}: every sample passes; ${worst}.`;
}
