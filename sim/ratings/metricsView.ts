// The part of the engine's metrics the checks read, typed loosely enough that the engine's own
// `Metrics` object is accepted as is. A value the engine reports as `{ value, time }` or as a plain
// number is read the same way; null or undefined means "not applicable in this run".

export interface Extreme {
  value: number;
  time: number;
}

export type MetricValue = number | Extreme | null | undefined;

export interface CheckMetrics {
  peakCapacitorVoltage?: MetricValue;
  minCapacitorVoltage?: MetricValue;
  peakBusVoltage?: MetricValue;
  peakCurrent?: MetricValue;
  i2t?: MetricValue;
  prechargeEnergy?: MetricValue;
  prechargePeakPower?: MetricValue;
  bypassTime?: MetricValue;
  residualStep?: MetricValue;
  peakCurrentAfterBypass?: MetricValue;
  i2tAfterBypass?: MetricValue;
  finalCapacitorVoltage?: MetricValue;
  steadyStateVoltage?: MetricValue;
  storedEnergyAtPeak?: MetricValue;
}

/** The number in a metric, or null when it is absent or not finite. */
export function metric(value: MetricValue): number | null {
  if (value === null || value === undefined) return null;
  const n = typeof value === 'number' ? value : value.value;
  return Number.isFinite(n) ? n : null;
}

/** The time of an extreme, or null. */
export function metricTime(value: MetricValue): number | null {
  if (value === null || value === undefined || typeof value === 'number') return null;
  return Number.isFinite(value.time) ? value.time : null;
}
