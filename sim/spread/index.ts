// Tolerance spread (worst case). Runs on this thread; the worker-thread version is in parallel.ts
// (Node only, imported directly by the server, not re-exported here). See README.md.
export { runSpread, prepareSpread, type SpreadOptions } from './run';
export {
  parseTolerances,
  resolveTolerances,
  tolerancesSchema,
  type PercentTolerance,
  type RangeTolerance,
  type SpreadParameter,
  type ToleranceSpec,
  type Tolerances,
  type TolerancesInput,
} from './tolerances';
export {
  DC_TOLERANCE_PATHS,
  MAINS_ONLY_PATHS,
  MAINS_SHARED_PATHS,
  PATH_INFO,
  TOLERANCE_PATHS,
  isMainsSpreadDesign,
  tolerancePathsFor,
  type SpreadDesign,
  type TolerancePath,
} from './paths';
export { MAINS_ANGLE_SWEEP, type MainsAngleRule } from './mainsSample';
export {
  DEFAULT_SAMPLES,
  MAX_CORNER_PARAMETERS,
  MAX_SAMPLES,
  NORMAL_SIGMAS,
  type SpreadDistribution,
  type SpreadMethod,
} from './sampling';
export { DEFAULT_SEED, PRNG_NAME } from './random';
export {
  HISTOGRAM_BINS,
  HISTOGRAM_METRICS,
  MAINS_HISTOGRAM_METRICS,
  MAINS_SPREAD_METRICS,
  SPREAD_METRICS,
  spreadMetricsFor,
  type MainsSampleMetrics,
  type SpreadMetricKey,
  type SpreadSubject,
} from './metricList';
export { toDesignInput, toMainsDesignInput } from './designInput';
export type {
  CheckSpread,
  MainsSpreadInfo,
  MetricSpread,
  SpreadCancelled,
  SpreadCombination,
  SpreadComplete,
  SpreadHistogram,
  SpreadResult,
} from './summary';
export type { HistogramBin } from './statistics';
