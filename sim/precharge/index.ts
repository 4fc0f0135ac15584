// Precharge resistor sizing. See sim/ratings/README.md ("Precharge sizing").
export {
  sizePrecharge,
  MAX_SIMULATIONS,
  type Binding,
  type ChosenResistorResult,
  type FirstOrderFigures,
  type PrechargeCandidate,
  type PrechargeSizingResult,
  type SimulatedFigures,
  type SimulateFn,
  type SimulationLike,
} from './sizer';
export {
  prechargeSizingSchema,
  parseSizingRequest,
  DEFAULT_RESISTOR_TOLERANCE,
  type PrechargeSizingInput,
  type SizingRequest,
} from './schema';
export { E12, E24, E_SERIES, standardValuesBetween, type ESeriesName, type StandardValue } from './eSeries';
export {
  energyToFraction,
  largestResistanceForTime,
  largestResistanceReachingThreshold,
  rcCharge,
  stepChargeI2t,
  stepCurrentPeak,
  timeToFraction,
  voltageAfterThreshold,
  type RcCharge,
  type RcLoad,
} from './firstOrder';
