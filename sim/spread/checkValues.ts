/**
 * The rating checks of one sample without their sentences. `evaluateChecks` (sim/ratings) writes a
 * message, a basis and formatted numbers for every check, which costs far more than the closed form
 * itself (measured: ~0.6 ms against ~0.1 ms per sample on this machine under load); a spread needs
 * only each check's value, margin and status, thousands of times.
 *
 * The rating, derated limit and policy do not vary across a spread (ratings are never toleranced),
 * so only the value has to be read per sample; status and margin then come from the ratings
 * module's own `statusFor` and `marginPercentOf`. The readers below follow `evaluateChecks`
 * (sim/ratings/checks.ts) check by check, and the discharge check follows `evaluateDischarge` on the
 * ratings module's own `dischargeFigures`. `fastChecksAgree` compares them with `evaluateChecks` before a run uses them
 * (the nominal and the first samples); on any difference, or a check id this file does not know,
 * the run uses `evaluateChecks` for every sample. A test compares both over every preset.
 */
import type { Design } from '../design';
import type { Metrics } from '../metrics';
import {
  dischargeFigures,
  LIMIT_TOLERANCE,
  marginPercentOf,
  statusFor,
  type Check,
  type CheckStatus,
  type DeratingPolicy,
} from '../ratings';
import { linkCurrentAt } from '../ratings/circuit';

export interface CheckOutcome {
  id: string;
  value: number | null;
  marginPercent: number | null;
  status: CheckStatus;
}

function finite(x: number | null | undefined): number | null {
  return x === null || x === undefined || !Number.isFinite(x) ? null : x;
}

function largest(...values: (number | null)[]): number | null {
  const present = values.filter((v): v is number => v !== null).map(Math.abs);
  return present.length ? Math.max(...present) : null;
}

interface Context {
  design: Design;
  metrics: Metrics;
  peakI: number | null;
  i2t: number | null;
  bypassTime: number | null;
  finalCurrent: number | null;
}

type Reader = (c: Context) => number | null;

const prechargeOnly =
  (read: (c: Context) => number | null): Reader =>
  (c) =>
    c.design.precharge ? read(c) : null;

/** The value each rating check compares, as evaluateChecks reads it (null: does not apply). */
const READERS: Record<string, Reader> = {
  'capacitor-voltage': (c) => finite(c.metrics.peakCapacitorVoltage?.value),
  'capacitor-surge-voltage': (c) => finite(c.metrics.peakCapacitorVoltage?.value),
  'inductor-saturation': (c) => c.peakI,
  'precharge-pulse-energy': prechargeOnly((c) => finite(c.metrics.prechargeEnergy)),
  'precharge-peak-power': prechargeOnly((c) => finite(c.metrics.prechargePeakPower)),
  'precharge-continuous-power': (c) => {
    const pre = c.design.precharge;
    const staysIn = pre !== null && (pre.bypass === null || c.bypassTime === null);
    return pre && staysIn && c.finalCurrent !== null ? c.finalCurrent * c.finalCurrent * pre.resistance : null;
  },
  'contactor-make-current': (c) => {
    const pre = c.design.precharge;
    if (!pre) return c.peakI;
    if (!pre.bypass || c.bypassTime === null) return null;
    return largest(finite(c.metrics.peakCurrentAfterBypass));
  },
  'contactor-carry-current': (c) => {
    const pre = c.design.precharge;
    if (pre && (!pre.bypass || c.bypassTime === null)) return null;
    return c.finalCurrent;
  },
  'fuse-i2t': (c) => c.i2t,
  'diode-surge-current': (c) => c.peakI,
  'diode-i2t': (c) => c.i2t,
  'switch-voltage': (c) => finite(c.metrics.peakBusVoltage?.value),
  'cable-i2t': (c) => c.i2t,
};

export const FAST_CHECK_IDS = [...Object.keys(READERS), 'capacitor-reverse-voltage', 'discharge'];

/** The discharge check's outcome, as evaluateDischarge decides it, from the ratings module's own figures. */
function dischargeOutcome(design: Design, metrics: Metrics, policy: DeratingPolicy): CheckOutcome {
  const rule = policy.discharge;
  const f = dischargeFigures(design, metrics, rule);
  const id = 'discharge';
  if (f.startVoltage <= rule.thresholdVoltage) return { id, value: 0, marginPercent: 100, status: 'pass' };
  if (f.storedCharge <= rule.exemptCharge) {
    return {
      id,
      value: f.time,
      marginPercent: f.time === null ? null : marginPercentOf(f.time, rule.allowedTime),
      status: 'pass',
    };
  }
  if (f.time === null) return { id, value: null, marginPercent: null, status: 'fail' };
  return {
    id,
    value: f.time,
    marginPercent: marginPercentOf(f.time, rule.allowedTime),
    status: f.time <= rule.allowedTime * (1 + LIMIT_TOLERANCE) ? 'pass' : 'fail',
  };
}

/**
 * Value, margin and status of each check in `template` (the nominal run's checks, which fix the
 * order, the limits and the derated limits) for one sample.
 */
export function fastChecks(design: Design, metrics: Metrics, policy: DeratingPolicy, template: readonly Check[]): CheckOutcome[] {
  const finalVc = finite(metrics.finalCapacitorVoltage);
  const context: Context = {
    design,
    metrics,
    peakI: largest(finite(metrics.peakCurrent?.value), finite(metrics.peakCurrentAfterBypass)),
    i2t: finite(metrics.i2t),
    bypassTime: finite(metrics.bypassTime),
    finalCurrent: finalVc === null ? null : Math.abs(linkCurrentAt(design, finalVc)),
  };
  return template.map((check): CheckOutcome => {
    if (check.id === 'discharge') return dischargeOutcome(design, metrics, policy);
    if (check.id === 'capacitor-reverse-voltage') {
      const min = finite(metrics.minCapacitorVoltage?.value);
      const value = min === null ? null : Math.max(0, -min);
      const limit = policy.capacitorReverseVoltage.limit;
      if (design.ratings.capacitorVoltage === undefined || limit === null || value === null) {
        return { id: check.id, value, marginPercent: null, status: 'not-checked' };
      }
      return { id: check.id, value, marginPercent: marginPercentOf(value, limit), status: statusFor(value, limit, limit) };
    }
    const read = READERS[check.id];
    if (!read) throw new Error(`no fast reader for the check "${check.id}"`);
    const value = read(context);
    if (value === null || check.limit === null || check.deratedLimit === null) {
      return { id: check.id, value, marginPercent: null, status: 'not-checked' };
    }
    return {
      id: check.id,
      value,
      marginPercent: marginPercentOf(value, check.deratedLimit),
      status: statusFor(value, check.limit, check.deratedLimit),
    };
  });
}

/** Whether fastChecks gives exactly what evaluateChecks gives for this design and run. */
export function fastChecksAgree(
  design: Design,
  metrics: Metrics,
  policy: DeratingPolicy,
  full: readonly Check[],
  template: readonly Check[],
): boolean {
  if (full.length !== template.length || full.some((c) => !FAST_CHECK_IDS.includes(c.id))) return false;
  const fast = fastChecks(design, metrics, policy, template);
  return full.every((c, k) => {
    const f = fast[k];
    return f.id === c.id && f.status === c.status && Object.is(f.value, c.value) && Object.is(f.marginPercent, c.marginPercent);
  });
}
