// Status and margin of one value against a rating and its derated limit, and the roll-up of a list.
//
//   margin % = (derated limit − value) / derated limit · 100   (positive = headroom)
//   pass         value ≤ derated limit          (at the derated limit is still a pass: the derated
//                                                limit is the level the part may be worked to)
//   warn         derated limit < value ≤ rating (at the absolute rating is a warn, not a fail: the
//                                                rating is itself a permitted maximum)
//   fail         value > rating
//   not-checked  no rating given, or the metric does not apply in this run — never a pass.
// Values within one part in 10⁹ of a limit count as at it, so that 450 V × 0.8 computed in floating
// point (360.00000000000006 V) and a metric of exactly 360 V agree.

export type CheckStatus = 'pass' | 'warn' | 'fail' | 'not-checked';

export interface Check {
  /** Stable id: "capacitor-voltage", "discharge", … */
  id: string;
  label: string;
  /** The metric compared, in `unit` (SI); null when not applicable. */
  value: number | null;
  /** The absolute rating (or the policy's limit), null when none is given. */
  limit: number | null;
  /** limit × derating factor. */
  deratedLimit: number | null;
  /** (deratedLimit − value)/deratedLimit·100; positive is headroom. */
  marginPercent: number | null;
  status: CheckStatus;
  /** Which metric, which rating, which factor and where the factor comes from. */
  basis: string;
  unit: string;
  /** The kind of part the rating belongs to ("DC-link capacitor"). */
  part?: string;
  /** One plain sentence (two at most): what happened and what to do. */
  message: string;
}

export const LIMIT_TOLERANCE = 1e-9;

function atOrBelow(value: number, limit: number): boolean {
  return value <= limit + LIMIT_TOLERANCE * Math.abs(limit);
}

export function statusFor(value: number, limit: number, deratedLimit: number): Exclude<CheckStatus, 'not-checked'> {
  if (atOrBelow(value, deratedLimit)) return 'pass';
  if (atOrBelow(value, limit)) return 'warn';
  return 'fail';
}

export function marginPercentOf(value: number, deratedLimit: number): number | null {
  if (!(deratedLimit > 0)) return null;
  return ((deratedLimit - value) / deratedLimit) * 100;
}

/** Worst first: a fail outweighs a warn, a warn outweighs an unproven (not checked) item, which outweighs a pass. */
const SEVERITY: Record<CheckStatus, number> = { pass: 0, 'not-checked': 1, warn: 2, fail: 3 };

/** The worst status in the list; an empty list proves nothing, so it is 'not-checked'. */
export function worstStatus(checks: readonly Pick<Check, 'status'>[]): CheckStatus {
  let worst: CheckStatus | null = null;
  for (const check of checks) if (worst === null || SEVERITY[check.status] > SEVERITY[worst]) worst = check.status;
  return worst ?? 'not-checked';
}

export interface CheckSummary {
  pass: number;
  warn: number;
  fail: number;
  notChecked: number;
  worst: CheckStatus;
}

export function summariseChecks(checks: readonly Pick<Check, 'status'>[]): CheckSummary {
  const summary: CheckSummary = { pass: 0, warn: 0, fail: 0, notChecked: 0, worst: worstStatus(checks) };
  for (const { status } of checks) {
    if (status === 'not-checked') summary.notChecked += 1;
    else summary[status] += 1;
  }
  return summary;
}
