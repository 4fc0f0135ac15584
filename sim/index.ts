/**
 * The engine's one public entry. Pure TypeScript: it runs in Node and in the browser bundle
 * (the CLI and the bench, which use Node, are not exported from here).
 */
export { ENGINE_VERSION, simulate, checkDesign, DISAGREEMENT_WARNING } from './simulate';
export type {
  SimulateOptions,
  SimulationResult,
  SolverReport,
  SolverName,
  Waveform,
  PhaseSummary,
  CheckOutcome,
} from './simulate';

export { DesignError } from './errors';
export type { DesignIssue } from './errors';

export { parseQuantity, formatEng, DIMENSIONS } from './units';
export type { Dimension } from './units';

export {
  designSchema,
  parseDesign,
  safeParseDesign,
  finalSeriesResistance,
  RATING_KEYS,
  RATING_DIMENSIONS,
  DEFAULT_POINTS,
  MAX_POINTS,
  DEFAULT_SETTLE_FRACTION,
} from './design';
export type { Design, DesignInput, Bypass, Load, LoadKind, RatingKey } from './design';

export type { Metrics, Extremum, PhaseParameters } from './metrics';
export type { Classification, SeriesPath } from './model/seriesPath';
export { seriesPath, steadyStateVoltage } from './model/seriesPath';

export { closedFormMetrics, closedFormApplies } from './solvers/closedForm';

export { presets } from './presets';
export type { Preset } from './presets';

// Ratings, margins and derating; the high-voltage and other notices; precharge sizing.
export * from './ratings';
export * from './notices';
export * from './precharge';

// Worst case, stability and turn-off snubbers (the worker-thread spread in sim/spread/parallel.ts
// is Node-only and imported by the server directly).
export * from './spread';
export * from './stability';
export * from './snubber';

// Bench captures, the fit to a measured ringing, and the parts library.
export * from './capture';
export * from './fit';
export * from './parts';

// Mains power-up through a bridge rectifier.
export * from './mains';
