// Fits of a ringing bench capture: log-decrement estimate, series L and R, least-squares refinement.
// See README.md in this folder.
export { FitError, type FitErrorCode } from './errors';
export {
  estimateRinging,
  inferSeriesRL,
  logDecrementFromZeta,
  naturalFrequency,
  zetaFromHalfPeriodDecrement,
  zetaFromLogDecrement,
  type DecrementMode,
  type RingingEstimate,
  type RingingOptions,
  type RingPeak,
  type SeriesRL,
} from './logDecrement';
export { FIT_PARAMS, type FitParam } from './params';
export { levenbergMarquardt, solveLinear, type LeastSquaresOptions, type LeastSquaresResult } from './leastSquares';
export { refineFit, type RefineOptions, type RefineResult } from './refine';
export { fitCapture, type CaptureFit, type FitCaptureOptions } from './fitCapture';
