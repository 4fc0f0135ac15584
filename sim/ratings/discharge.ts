// Discharge check: with the source removed, how long until the DC link is touch-safe.
//
// The link discharges through whatever resistance stays across it (the bleeder, and a resistive load
// if the policy says it stays connected): v(t) = V0·e^(−t/RC), so
//   t = R·C·ln(V0/Vsafe),   and to meet t ≤ t_allowed:   R ≤ t_allowed / (C·ln(V0/Vsafe)).
// [der; REFERENCE §6: 400 V, 1 mF → 60 V in 5 s needs Rb ≤ 2.64 kΩ]
// Rule and default figures: IEC 60204-1:2016, 6.2.4 — ≤ 60 V within 5 s after disconnection, parts
// storing ≤ 60 µC exempt [pub, REFERENCE §6]; both figures are in the policy.
//
// V0 is the highest voltage the link reaches in the run (peak, the magnitude of the minimum, or the
// steady state if the run ends before it): the source may be removed at any moment, and the peak is
// the worst one to remove it at. A constant-current or constant-power load is never counted: a
// converter stops drawing when its input goes.
import type { Design } from '../design';

import { dischargeResistance, linkCapacitance } from './circuit';
import { formatEng } from './format';
import { metric, type CheckMetrics } from './metricsView';
import type { DischargePolicy } from './policy';
import { marginPercentOf, type Check } from './status';

/** R·C·ln(V0/Vsafe); 0 when already at or below Vsafe; Infinity with no discharge path. */
export function dischargeTime(resistance: number, capacitance: number, fromVoltage: number, safeVoltage: number): number {
  const v0 = Math.abs(fromVoltage);
  if (v0 <= safeVoltage) return 0;
  if (!Number.isFinite(resistance)) return Infinity;
  return resistance * capacitance * Math.log(v0 / safeVoltage);
}

/** The largest bleeder that meets the allowed time: t_allowed/(C·ln(V0/Vsafe)); Infinity if V0 ≤ Vsafe. */
export function largestBleeder(allowedTime: number, capacitance: number, fromVoltage: number, safeVoltage: number): number {
  const v0 = Math.abs(fromVoltage);
  if (v0 <= safeVoltage) return Infinity;
  return allowedTime / (capacitance * Math.log(v0 / safeVoltage));
}

export interface DischargeFigures {
  /** Voltage the discharge starts from, V. */
  startVoltage: number;
  capacitance: number;
  /** Resistance left across the link, Ω; Infinity when there is none. */
  resistance: number;
  storedCharge: number;
  /** Time to reach the threshold, s: 0 when already below it, null when it never gets there. */
  time: number | null;
  /** What discharges the link, in words: "the bleeder", "the bleeder and the load", or null. */
  path: string | null;
}

export function dischargeFigures(design: Design, metrics: CheckMetrics | null, policy: DischargePolicy): DischargeFigures {
  const candidates = [
    metric(metrics?.peakCapacitorVoltage),
    metric(metrics?.minCapacitorVoltage),
    metric(metrics?.steadyStateVoltage),
    metric(metrics?.finalCapacitorVoltage),
    design.initial.capacitorVoltage,
  ];
  // Without a result, the source voltage is the best estimate of what the link charges to.
  if (!metrics) candidates.push(design.source.voltage);
  const startVoltage = Math.max(0, ...candidates.filter((v): v is number => v !== null).map(Math.abs));
  const capacitance = linkCapacitance(design);
  const resistance = dischargeResistance(design, policy.loadStaysConnected);
  const t = dischargeTime(resistance, capacitance, startVoltage, policy.thresholdVoltage);
  const hasBleeder = design.bleeder !== null;
  const loadCounts = policy.loadStaysConnected && design.load?.kind === 'resistance';
  const path =
    hasBleeder && loadCounts ? 'the bleeder and the load' : hasBleeder ? 'the bleeder' : loadCounts ? 'the load' : null;
  return {
    startVoltage,
    capacitance,
    resistance,
    storedCharge: capacitance * startVoltage,
    time: Number.isFinite(t) ? t : null,
    path,
  };
}

export function evaluateDischarge(design: Design, metrics: CheckMetrics | null, policy: DischargePolicy): Check {
  const f = dischargeFigures(design, metrics, policy);
  const vSafe = formatEng(policy.thresholdVoltage, 'V');
  const allowed = formatEng(policy.allowedTime, 's');
  const v0 = formatEng(f.startVoltage, 'V');
  const base = {
    id: 'discharge',
    label: 'Discharge to a safe voltage',
    limit: policy.allowedTime,
    deratedLimit: policy.allowedTime,
    unit: 's',
    part: 'bleeder',
    basis:
      `time for ${f.path ?? 'the bleeder'} to bring the DC link from ${v0} below ${vSafe}, t = R·C·ln(V0/${vSafe}), ` +
      `vs ${allowed} allowed, no derating (${policy.source})`,
  };

  if (f.startVoltage <= policy.thresholdVoltage) {
    return {
      ...base,
      value: 0,
      marginPercent: 100,
      status: 'pass',
      message: `The DC link never exceeds ${vSafe} (it reaches ${v0}), so it needs no discharge path.`,
    };
  }
  if (f.storedCharge <= policy.exemptCharge) {
    return {
      ...base,
      value: f.time,
      marginPercent: f.time === null ? null : marginPercentOf(f.time, policy.allowedTime),
      status: 'pass',
      message: `The DC link stores only ${formatEng(f.storedCharge, 'C')} at ${v0}, within the ${formatEng(policy.exemptCharge, 'C')} exemption, so the ${allowed} rule does not apply.`,
    };
  }

  // The bleeder needed so that it, in parallel with a load that stays connected, meets the time.
  const pathMax = largestBleeder(policy.allowedTime, f.capacitance, f.startVoltage, policy.thresholdVoltage);
  const loadResistance = policy.loadStaysConnected && design.load?.kind === 'resistance' ? design.load.value : Infinity;
  const bleederMax = Number.isFinite(loadResistance) ? 1 / (1 / pathMax - 1 / loadResistance) : pathMax;
  const bleederPower = (design.source.voltage * design.source.voltage) / bleederMax;
  const advice = `a bleeder of at most ${formatEng(bleederMax, 'Ω')} (it dissipates ${formatEng(bleederPower, 'W')} at ${formatEng(design.source.voltage, 'V')})`;

  if (f.time === null) {
    return {
      ...base,
      value: null,
      marginPercent: null,
      status: 'fail',
      message: `With the source removed nothing discharges the DC link: it never discharges and stays near ${v0}. Add ${advice} to reach ${vSafe} within ${allowed}.`,
    };
  }
  const status = f.time <= policy.allowedTime * (1 + 1e-9) ? 'pass' : 'fail';
  const took = formatEng(f.time, 's');
  const who = f.path ?? 'the bleeder';
  const capitalised = who.charAt(0).toUpperCase() + who.slice(1);
  return {
    ...base,
    value: f.time,
    marginPercent: marginPercentOf(f.time, policy.allowedTime),
    status,
    message:
      status === 'pass'
        ? `With the source removed, ${who} brings the DC link from ${v0} below ${vSafe} in ${took}, inside the ${allowed} allowed.`
        : `${capitalised} takes ${took} to bring the DC link from ${v0} below ${vSafe}, over the ${allowed} allowed. Use ${advice}.`,
  };
}
