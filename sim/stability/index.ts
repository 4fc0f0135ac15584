// Input-filter stability with a constant-power load. See sim/spread/README.md.
export {
  analyseStability,
  DEFAULT_STABILITY_OPTIONS,
  RECOMMENDED_MARGIN_DB,
  type StabilityMode,
  type StabilityOptions,
  type StabilityResult,
} from './analyse';
export { optimalDamping, type OptimalDamping, type OptimalDampingInput } from './optimalDamping';
export { constantPowerOf, incrementalResistance, operatingPoint, type OperatingPoint } from './operatingPoint';
export { filterBranches, logSweep, outputImpedance, refinePeak, type Complex, type FilterBranches } from './impedance';
export { linearisedModel, type LinearisedModel, type LinearState } from './linearised';
