/**
 * Mains power-up: a bridge rectifier charging the DC link from the AC mains, with a resistor or NTC
 * inrush limiter, at any switch-on angle. Pure TypeScript (see README.md in this folder).
 */
export {
  mainsDesignSchema,
  parseMainsDesign,
  safeParseMainsDesign,
  parseTemperature,
  parseAngle,
  limiterResistanceAtStart,
  loopImpedance,
  sourcePeak,
  NTC_COLD_START,
  NTC_HOT_RESTART,
  DEFAULT_ANGLE,
  DEFAULT_CYCLES,
  DEFAULT_FREQUENCY,
} from './schema';
export type { MainsDesign, MainsDesignInput, MainsKind, MainsSource, Limiter, LimiterBypass, ThermalModel } from './schema';

export {
  simulateMains,
  estimateMainsOdeCost,
  MAINS_ENGINE_VERSION,
  CROSS_CHECK_BUDGET,
  NONLINEAR_EVALUATION_BUDGET,
} from './simulate';
export type { MainsResult, MainsWaveform, MainsSolverReport, MainsSolverName, MainsSimulateOptions } from './simulate';
export type { MainsMetrics, DiodeMetrics } from './metrics';
export type { BridgeEvent, BridgeEventKind } from './record';

export { sweepSwitchOnAngle, withAngle, MAX_SWEEP_POINTS } from './sweep';
export type { SweepOptions, SweepPoint, SweepResult } from './sweep';

export { compareColdHot, withStartTemperature } from './coldHot';
export type { ColdHotOptions, ColdHotCase, ColdHotComparison } from './coldHot';

export { mainsChecks, engineDesignOf } from './checks';
export { ntcResistance, T25 } from './ntc';
export { minimize } from './minimize';
export { mainsPreset, mainsPresetEntry } from './preset';
export type { MainsPreset } from './preset';
