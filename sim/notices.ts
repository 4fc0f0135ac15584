// Notices carried with a check's result: the high-voltage notice, solver disagreement, and a bypass
// that never closes. The app, the margin report (PDF) and the CLI show them; the fixed wording is
// exported so that each can reuse it word for word.
//
// High-voltage notice, when either holds:
//  - any voltage in the design or the result exceeds 60 V DC. 60 V DC is the upper bound of the lowest
//    energy-source class, ES1, of IEC 62368-1 (recalled from memory [mem], REFERENCE §6) and the
//    residual-voltage threshold of IEC 60204-1:2016, 6.2.4 [pub];
//  - the energy stored at the peak, ½·C·V², reaches 1 J. The 1 J / 10 J / 100 J bands and the 0.25 J
//    reflex-injury figure above 400 V are NFPA 70E practice for stored energy in capacitors, recalled
//    from memory [mem] (REFERENCE §6); 1 J is the lowest band, and the one applied below 60 V.
import type { Design } from './design';
import { linkCapacitance, linkCurrentAt } from './ratings/circuit';
import { dischargeFigures } from './ratings/discharge';
import { formatEng } from './ratings/format';
import { metric, type CheckMetrics } from './ratings/metricsView';
import { defaultDischarge, type DischargePolicy } from './ratings/policy';

export interface Notice {
  id: string;
  title: string;
  text: string;
  severity: 'danger' | 'warning' | 'info';
}

/** What the notices read from a simulation result (the engine's `simulate` output fits). */
export interface NoticeResult {
  metrics: CheckMetrics;
  solvers?: unknown;
  warnings?: readonly unknown[];
}

export const HV_NOTICE_ID = 'high-voltage';
/** DC above this is beyond ES1 of IEC 62368-1 [mem] and the touch-safe level of IEC 60204-1 6.2.4. */
export const HV_VOLTAGE_THRESHOLD = 60;
/** Stored energy from which the notice appears at any voltage, J (NFPA 70E practice, [mem]). */
export const HV_ENERGY_THRESHOLD = 1;
/** Above 400 V, about 0.25 J can already cause a reflex injury (NFPA 70E practice, [mem]). */
export const HV_REFLEX_ENERGY = 0.25;
export const HV_REFLEX_VOLTAGE = 400;

export const HV_NOTICE_TITLE = 'High voltage';
export const HV_NOTICE_ENERGY_TITLE = 'Hazardous stored energy';
/** The fixed closing words of the high-voltage notice; the PDF and the app print them verbatim. */
export const HV_NOTICE_DISCLAIMER =
  'These figures are a design aid, not a safety certification. Work on such equipment must follow local electrical codes and be done or approved by qualified, licensed people.';
export const HV_NO_DISCHARGE_TEXT =
  'With the source removed nothing discharges the DC link: it stays charged until someone discharges it.';

/** Solvers agreeing to within this (relative) raise no notice. */
export const SOLVER_AGREEMENT_TOLERANCE = 1e-6;

export interface HazardFigures {
  /** Largest voltage magnitude in the design or the result, V. */
  voltage: number;
  /** ½·C·V² at the peak capacitor voltage, the damping capacitor included, J. */
  storedEnergy: number;
  /** Time to fall below the discharge threshold with the source removed, s; null when nothing discharges it. */
  dischargeTime: number | null;
  dischargeThreshold: number;
  dischargePath: string | null;
  /** C·V at the discharge's starting voltage, C. */
  storedCharge: number;
}

export function hazardFigures(
  design: Design,
  result: NoticeResult | null,
  policy: DischargePolicy = defaultDischarge,
): HazardFigures {
  const m = result?.metrics ?? null;
  const voltages = [
    design.source.voltage,
    design.initial.capacitorVoltage,
    design.initial.dampingVoltage,
    metric(m?.peakCapacitorVoltage),
    metric(m?.minCapacitorVoltage),
    metric(m?.peakBusVoltage),
    metric(m?.finalCapacitorVoltage),
  ].filter((v): v is number => v !== null);
  const voltage = Math.max(0, ...voltages.map(Math.abs));
  // Peak capacitor voltage (or, before a run, the source voltage) across all the link's capacitance.
  const peak = Math.max(
    Math.abs(metric(m?.peakCapacitorVoltage) ?? 0),
    Math.abs(metric(m?.minCapacitorVoltage) ?? 0),
    m ? 0 : Math.abs(design.source.voltage),
    Math.abs(design.initial.capacitorVoltage),
  );
  const storedEnergy = Math.max(0.5 * linkCapacitance(design) * peak * peak, metric(m?.storedEnergyAtPeak) ?? 0);
  const discharge = dischargeFigures(design, m, policy);
  return {
    voltage,
    storedEnergy,
    dischargeTime: discharge.time,
    dischargeThreshold: policy.thresholdVoltage,
    dischargePath: discharge.path,
    storedCharge: discharge.storedCharge,
  };
}

function energyWords(energy: number, voltage: number): string | null {
  // Bands from NFPA 70E practice, recalled from memory [mem] (REFERENCE §6). At or below 60 V the
  // hazard is the arc and the burn of a short, not a shock.
  if (voltage <= HV_VOLTAGE_THRESHOLD)
    return energy >= HV_ENERGY_THRESHOLD ? 'enough to arc and burn if the DC link is shorted' : null;
  if (energy >= 100) return 'enough to cause serious or fatal injury';
  if (energy >= 10) return 'enough to cause serious injury';
  if (energy >= HV_ENERGY_THRESHOLD) return 'enough to burn and to cause a reflex injury';
  if (energy >= HV_REFLEX_ENERGY && voltage > HV_REFLEX_VOLTAGE) return 'enough to cause a reflex injury';
  return null;
}

/** The high-voltage notice, or null when the design stays at or below 60 V and under 1 J. */
export function highVoltageNotice(
  design: Design,
  result: NoticeResult | null,
  policy: DischargePolicy = defaultDischarge,
): Notice | null {
  const h = hazardFigures(design, result, policy);
  const highVoltage = h.voltage > HV_VOLTAGE_THRESHOLD;
  const highEnergy = h.storedEnergy >= HV_ENERGY_THRESHOLD;
  if (!highVoltage && !highEnergy) return null;

  const v = formatEng(h.voltage, 'V');
  const e = formatEng(h.storedEnergy, 'J');
  const harm = energyWords(h.storedEnergy, h.voltage);
  const hazard = highVoltage
    ? `This design reaches ${v}, above the ${formatEng(HV_VOLTAGE_THRESHOLD, 'V')} DC that is safe to touch, and stores ${e} at its peak${harm ? `, ${harm}` : ''}.`
    : `This design stays at ${v} but stores ${e} at its peak, ${harm ?? 'enough to arc and burn if the DC link is shorted'}.`;
  const safe = formatEng(h.dischargeThreshold, 'V');
  let discharge: string;
  if (h.voltage <= h.dischargeThreshold) discharge = '';
  else if (h.storedCharge <= policy.exemptCharge) {
    discharge = `With the source removed it keeps ${formatEng(h.storedCharge, 'C')}, within the ${formatEng(policy.exemptCharge, 'C')} that IEC 60204-1 exempts from the discharge rule.`;
  } else if (h.dischargeTime === null) discharge = HV_NO_DISCHARGE_TEXT;
  else
    discharge = `With the source removed, ${h.dischargePath ?? 'the bleeder'} brings it below ${safe} in ${formatEng(h.dischargeTime, 's')}.`;

  return {
    id: HV_NOTICE_ID,
    title: highVoltage ? HV_NOTICE_TITLE : HV_NOTICE_ENERGY_TITLE,
    text: [hazard, discharge, HV_NOTICE_DISCLAIMER].filter(Boolean).join(' '),
    severity: highVoltage ? 'danger' : 'warning',
  };
}

/**
 * The largest relative disagreement between the engine's solvers on vC and on i, from
 * `result.solvers.maxDisagreement` (each relative to the run's peak magnitude), or null when the
 * result reports none.
 */
export function solverDisagreement(result: NoticeResult): { vC: number; i: number } | null {
  const report = result.solvers as { maxDisagreement?: { vC?: unknown; i?: unknown } } | null | undefined;
  const d = report && typeof report === 'object' ? report.maxDisagreement : undefined;
  if (!d || typeof d !== 'object') return null;
  const read = (x: unknown) => (typeof x === 'number' && Number.isFinite(x) ? Math.abs(x) : 0);
  return { vC: read(d.vC), i: read(d.i) };
}

function solverNotice(result: NoticeResult): Notice | null {
  const d = solverDisagreement(result);
  if (d === null || Math.max(d.vC, d.i) <= SOLVER_AGREEMENT_TOLERANCE) return null;
  return {
    id: 'solver-disagreement',
    title: 'Solvers disagree',
    text: `The engine's independent solvers differ by ${d.vC.toExponential(1)} on the capacitor voltage and ${d.i.toExponential(1)} on the current (relative to the peaks), more than the ${SOLVER_AGREEMENT_TOLERANCE.toExponential(0)} they should agree to. Treat the figures with care: shorten the run or separate its very different time scales, and check again.`,
    severity: 'warning',
  };
}

/** DC voltage the link settles at while the precharge resistor is still in: v = Vs − R·i(v), by bisection. */
function prechargeSettlingVoltage(design: Design): number {
  const vs = design.source.voltage;
  const r = design.source.resistance + (design.filter?.resistance ?? 0) + (design.precharge?.resistance ?? 0);
  let lo = Math.min(0, vs);
  let hi = Math.max(0, vs);
  // f(v) = v − (Vs − R·i(v)) rises with v for any passive load, so the root is bracketed by [0, Vs].
  for (let n = 0; n < 200 && hi - lo > 1e-12 * Math.max(1, Math.abs(vs)); n += 1) {
    const mid = (lo + hi) / 2;
    if (mid - (vs - r * linkCurrentAt(design, mid)) > 0) hi = mid;
    else lo = mid;
  }
  return (lo + hi) / 2;
}

function bypassNotice(design: Design, result: NoticeResult): Notice | null {
  const bypass = design.precharge?.bypass;
  if (!bypass || metric(result.metrics.bypassTime) !== null) return null;
  if (bypass.when === 'time') {
    return {
      id: 'bypass-never-closes',
      title: 'The bypass does not close in this run',
      text: `The bypass is set to close at ${formatEng(bypass.time ?? 0, 's')}, after the run ends at ${formatEng(design.duration, 's')}. Lengthen the run to see it close.`,
      severity: 'warning',
    };
  }
  const target = bypass.fraction * design.source.voltage;
  const settles = prechargeSettlingVoltage(design);
  const ends = metric(result.metrics.finalCapacitorVoltage);
  const pct = `${Number((bypass.fraction * 100).toPrecision(3))} %`;
  const text =
    Math.abs(settles) < Math.abs(target)
      ? `The threshold is never reached: with the load and bleeder drawing through the precharge resistor, the capacitor settles at ${formatEng(settles, 'V')}, below the ${formatEng(target, 'V')} (${pct} of the source) the bypass waits for. The resistor then carries the load for good: lower the threshold, disconnect the load during precharge, or use a smaller resistor.`
      : `The capacitor does not reach ${formatEng(target, 'V')} (${pct} of the source) before the run ends${ends === null ? '' : ` at ${formatEng(ends, 'V')}`}, so the bypass does not close. Lengthen the run to see it close.`;
  return { id: 'bypass-never-closes', title: 'Bypass threshold never reached', text, severity: 'warning' };
}

/**
 * Every notice for one design and its result, most serious first. `policy` sets the discharge
 * threshold quoted in the high-voltage notice (default 60 V, IEC 60204-1:2016, 6.2.4).
 */
export function buildNotices(design: Design, result: NoticeResult | null, policy: DischargePolicy = defaultDischarge): Notice[] {
  const notices: Notice[] = [];
  const hv = highVoltageNotice(design, result, policy);
  if (hv) notices.push(hv);
  if (result) {
    const solver = solverNotice(result);
    if (solver) notices.push(solver);
    const bypass = bypassNotice(design, result);
    if (bypass) notices.push(bypass);
  }
  return notices;
}
