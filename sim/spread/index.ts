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
export { PATH_INFO, TOLERANCE_PATHS, type TolerancePath } from './paths';
export {
  DEFAULT_SAMPLES,
  MAX_CORNER_PARAMETERS,
  MAX_SAMPLES,
  NORMAL_SIGMAS,
  type SpreadDistribution,
  type SpreadMethod,
} from './sampling';
export { DEFAULT_SEED, PRNG_NAME } from './random';
export { HISTOGRAM_BINS, HISTOGRAM_METRICS, SPREAD_METRICS, type SpreadMetricKey } from './metricList';
export { toDesignInput } from './designInput';
export type {
  CheckSpread,
  MetricSpread,
  SpreadCancelled,
  SpreadCombination,
  SpreadComplete,
  SpreadHistogram,
  SpreadResult,
} from './summary';
export type { HistogramBin } from './statistics';
