/**
 * The metrics a spread reports: every scalar metric of the engine and the value part of each peak
 * metric; for a mains design, the mains engine's (peak inrush, line and diode I²t, the
 * half-sine-equivalent surge current, the limiter's energy and power, the capacitor's peak) and the
 * switch-on angle each sample ran at. A metric that does not apply in a sample (null, e.g. no
 * bypass) is stored as NaN and left out of that metric's statistics.
 */
import type { MainsMetrics } from '../mains/metrics';
import type { Metrics } from '../metrics';

/** A mains sample's metrics: the mains engine's, and the switch-on angle it ran at (degrees). */
export type MainsSampleMetrics = MainsMetrics & { switchOnAngle: number };

/** Which engine the spread runs: the DC engine (sim/simulate) or the mains engine (sim/mains). */
export type SpreadSubject = 'dc' | 'mains';

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
  | 'q'
  | 'diodeI2t'
  | 'diodePulseI2t'
  | 'diodePeakCurrent'
  | 'surgeEquivalentCurrent'
  | 'limiterEnergy'
  | 'limiterPeakPower'
  | 'limiterContinuousPower'
  | 'lineRmsCurrent'
  | 'limiterStartResistance'
  | 'peakLimiterTemperature'
  | 'switchOnAngle';

export interface SpreadMetricInfo<M = Metrics> {
  key: SpreadMetricKey;
  label: string;
  /** SI unit symbol; '' for a plain number, '%' for overshootPercent, 'rad/s' for rates, '°' for the angle. */
  unit: string;
  read: (m: M) => number | null;
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

/** The mains spread's metrics, the inrush ones first. */
export const MAINS_SPREAD_METRICS: SpreadMetricInfo<MainsSampleMetrics>[] = [
  { key: 'peakCurrent', label: 'Peak inrush current', unit: 'A', read: (m) => value(m.peakCurrent) },
  { key: 'switchOnAngle', label: 'Worst switch-on angle', unit: '°', read: (m) => m.switchOnAngle },
  { key: 'i2t', label: 'Line I²t', unit: 'A²s', read: (m) => m.i2t },
  { key: 'diodeI2t', label: 'Diode I²t (worst diode)', unit: 'A²s', read: (m) => m.diodeI2t },
  { key: 'diodePulseI2t', label: 'Diode I²t of the worst pulse', unit: 'A²s', read: (m) => m.diodePulseI2t },
  {
    key: 'diodePeakCurrent',
    label: 'Diode peak current',
    unit: 'A',
    read: (m) => (m.diodes.length ? Math.max(...m.diodes.map((d) => d.peakCurrent)) : null),
  },
  { key: 'surgeEquivalentCurrent', label: 'Surge current (half-sine equivalent)', unit: 'A', read: (m) => m.surgeEquivalentCurrent },
  { key: 'limiterEnergy', label: 'Limiter energy', unit: 'J', read: (m) => (m.limiterStartResistance === null ? null : m.limiterEnergy) },
  { key: 'limiterPeakPower', label: 'Limiter peak power', unit: 'W', read: (m) => value(m.limiterPeakPower) },
  { key: 'limiterContinuousPower', label: 'Limiter continuous power', unit: 'W', read: (m) => m.limiterContinuousPower },
  { key: 'limiterStartResistance', label: 'Limiter resistance at switch-on', unit: 'Ω', read: (m) => m.limiterStartResistance },
  { key: 'peakLimiterTemperature', label: 'NTC peak temperature', unit: 'K', read: (m) => value(m.peakLimiterTemperature) },
  { key: 'lineRmsCurrent', label: 'Line RMS current (last cycle)', unit: 'A', read: (m) => m.lineRmsCurrent },
  { key: 'peakCapacitorVoltage', label: 'Peak capacitor voltage', unit: 'V', read: (m) => value(m.peakCapacitorVoltage) },
  { key: 'minCapacitorVoltage', label: 'Minimum capacitor voltage', unit: 'V', read: (m) => value(m.minCapacitorVoltage) },
  { key: 'peakBusVoltage', label: 'Peak bus voltage', unit: 'V', read: (m) => value(m.peakBusVoltage) },
  { key: 'finalCapacitorVoltage', label: 'Final capacitor voltage', unit: 'V', read: (m) => m.finalCapacitorVoltage },
  { key: 'steadyStateVoltage', label: 'No-load DC level', unit: 'V', read: (m) => m.steadyStateVoltage },
  { key: 'storedEnergyAtPeak', label: 'Stored energy at the peak', unit: 'J', read: (m) => m.storedEnergyAtPeak },
  { key: 'bypassTime', label: 'Relay time', unit: 's', read: (m) => m.bypassTime },
  { key: 'peakCurrentAfterBypass', label: 'Peak current after the relay', unit: 'A', read: (m) => m.peakCurrentAfterBypass },
  { key: 'i2tAfterBypass', label: 'I²t after the relay', unit: 'A²s', read: (m) => m.i2tAfterBypass },
];

/** The mains metrics that get histograms. */
export const MAINS_HISTOGRAM_METRICS: SpreadMetricKey[] = [
  'peakCurrent',
  'surgeEquivalentCurrent',
  'i2t',
  'diodeI2t',
  'limiterEnergy',
  'peakCapacitorVoltage',
];

export function spreadMetricsFor(subject: SpreadSubject): SpreadMetricInfo<any>[] {
  return subject === 'mains' ? MAINS_SPREAD_METRICS : SPREAD_METRICS;
}

export function histogramMetricsFor(subject: SpreadSubject): SpreadMetricKey[] {
  return subject === 'mains' ? MAINS_HISTOGRAM_METRICS : HISTOGRAM_METRICS;
}

export const HISTOGRAM_BINS = 30;
