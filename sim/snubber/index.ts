// Turn-off overshoot and RC snubber design. See sim/spread/README.md.
export {
  DEFAULT_SNUBBER_MULTIPLE,
  estimateParasitics,
  proposeSnubber,
  type Parasitics,
  type ParasiticsInput,
  type SnubberInput,
  type SnubberProposal,
} from './parasitics';
export { ringMode, turnOffSummary, type RingMode, type TurnOffSummary } from './turnOff';
export {
  snubberBeforeAfter,
  type SnubberComparison,
  type SnubberComparisonOptions,
  type SnubberValues,
  type TurnOffRun,
} from './beforeAfter';
