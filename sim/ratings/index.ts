// Ratings, margins and the discharge check. See README.md in this folder.
export {
  LIMIT_TOLERANCE,
  marginPercentOf,
  statusFor,
  summariseChecks,
  worstStatus,
  type Check,
  type CheckStatus,
  type CheckSummary,
} from './status';
export {
  defaultDerating,
  defaultDischarge,
  defaultPolicy,
  defaultReverseVoltage,
  deratingPolicySchema,
  resolvePolicy,
  type DeratingFactors,
  type DeratingPolicy,
  type DeratingPolicyOverride,
  type DeratingRule,
  type DesignDerating,
  type DischargePolicy,
  type ReverseVoltagePolicy,
} from './policy';
export { evaluateChecks } from './checks';
export { dischargeFigures, dischargeTime, evaluateDischarge, largestBleeder, type DischargeFigures } from './discharge';
export type { CheckMetrics, Extreme, MetricValue } from './metricsView';
