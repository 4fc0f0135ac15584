/**
 * The metrics a spread reports: every scalar metric of the engine and the value part of each peak
 * metric. A metric that does not apply in a sample (null, e.g. no bypass) is stored as NaN and left
 * out of that metric's statistics.
 */
import type { Metrics } from '../metrics';

export type SpreadMetricKey =
  | 'peakCapacitorVoltage'
  | 'minCapacitorVoltage'
  | 'peakBusVoltage'
  | 'peakCurrent'
  | 'i2t'
  | 'prechargeEnergy'
  | 'prechargePeakPower'
  | 'bypassTime'
  | 'residualStep'
  | 'peakCurrentAfterBypass'
  | 'i2tAfterBypass'
  | 'finalCapacitorVoltage'
  | 'steadyStateVoltage'
  | 'overshootPercent'
  | 'storedEnergyAtPeak'
  | 'timeTo95'
  | 'alpha'
  | 'omegaN'
  | 'omegaD'
  | 'zeta'
  | 'q';

export interface SpreadMetricInfo {
  key: SpreadMetricKey;
  label: string;
  /** SI unit symbol; '' for a plain number, '%' for overshootPercent, 'rad/s' for rates. */
  unit: string;
  read: (m: Metrics) => number | null;
}

const value = (e: { value: number } | null | undefined) => (e ? e.value : null);

export const SPREAD_METRICS: SpreadMetricInfo[] = [
  { key: 'peakCapacitorVoltage', label: 'Peak capacitor voltage', unit: 'V', read: (m) => value(m.peakCapacitorVoltage) },
  { key: 'minCapacitorVoltage', label: 'Minimum capacitor voltage', unit: 'V', read: (m) => value(m.minCapacitorVoltage) },
  { key: 'peakBusVoltage', label: 'Peak bus voltage', unit: 'V', read: (m) => value(m.peakBusVoltage) },
  { key: 'peakCurrent', label: 'Peak current', unit: 'A', read: (m) => value(m.peakCurrent) },
  { key: 'i2t', label: 'I²t', unit: 'A²s', read: (m) => m.i2t },
  { key: 'prechargeEnergy', label: 'Precharge resistor energy', unit: 'J', read: (m) => m.prechargeEnergy },
  { key: 'prechargePeakPower', label: 'Precharge resistor peak power', unit: 'W', read: (m) => m.prechargePeakPower },
  { key: 'bypassTime', label: 'Bypass time', unit: 's', read: (m) => m.bypassTime },
  { key: 'residualStep', label: 'Residual step at the bypass', unit: 'V', read: (m) => m.residualStep },
  { key: 'peakCurrentAfterBypass', label: 'Peak current after the bypass', unit: 'A', read: (m) => m.peakCurrentAfterBypass },
  { key: 'i2tAfterBypass', label: 'I²t after the bypass', unit: 'A²s', read: (m) => m.i2tAfterBypass },
  { key: 'finalCapacitorVoltage', label: 'Final capacitor voltage', unit: 'V', read: (m) => m.finalCapacitorVoltage },
  { key: 'steadyStateVoltage', label: 'Steady-state voltage', unit: 'V', read: (m) => m.steadyStateVoltage },
  { key: 'overshootPercent', label: 'Overshoot', unit: '%', read: (m) => m.overshootPercent },
  { key: 'storedEnergyAtPeak', label: 'Stored energy at the peak', unit: 'J', read: (m) => m.storedEnergyAtPeak },
  { key: 'timeTo95', label: 'Settling time', unit: 's', read: (m) => m.timeTo95 },
  { key: 'alpha', label: 'Damping rate α', unit: '1/s', read: (m) => m.alpha },
  { key: 'omegaN', label: 'Natural frequency ωn', unit: 'rad/s', read: (m) => m.omegaN },
  { key: 'omegaD', label: 'Ring frequency ωd', unit: 'rad/s', read: (m) => m.omegaD },
  { key: 'zeta', label: 'Damping ratio ζ', unit: '', read: (m) => m.zeta },
  { key: 'q', label: 'Quality factor Q', unit: '', read: (m) => m.q },
];

/** Metrics that get histogram data for the app. */
export const HISTOGRAM_METRICS: SpreadMetricKey[] = [
  'peakCapacitorVoltage',
  'peakCurrent',
  'i2t',
  'prechargeEnergy',
  'peakBusVoltage',
];

export const HISTOGRAM_BINS = 30;
