// First-order (RC) precharge formulas. The engine simulates the full circuit; these closed forms give
// the sizing window and the "estimate" column shown beside the engine's figures.
//
// Model: source V → precharge resistor R → DC link C, with an optional resistance Rp across C (the
// bleeder, a resistive load, or both in parallel) and an optional constant load current I_L drawn
// from C. Capacitor empty at t = 0. Node equation: C·dv/dt = (V − v)/R − v/Rp − I_L, so
//   v(t) = v∞·(1 − e^(−t/τ)),  Rth = R‖Rp,  τ = Rth·C,  v∞ = Rth·(V/R − I_L).
// With Rp → ∞ this is REFERENCE §2: v tends to V − I_L·R, and the time to kV is
//   t_k = R·C·ln[(V − I_L·R)/(V − I_L·R − k·V)]                      [der, REFERENCE §2]
// and with no load at all t_k = R·C·ln(1/(1−k)) (95 % → 2.996 RC)   [pub: standard circuit texts]

export interface RcLoad {
  /** Resistance across the capacitor (bleeder ‖ resistive load), Ω; Infinity or undefined = none. */
  parallelResistance?: number;
  /** Constant current drawn from the capacitor during precharge, A; 0 or undefined = none. */
  loadCurrent?: number;
}

function parallel(a: number, b: number): number {
  if (!Number.isFinite(a)) return b;
  if (!Number.isFinite(b)) return a;
  return (a * b) / (a + b);
}

/** Time for an empty capacitor charged through R to reach fraction k of V, no load: R·C·ln(1/(1−k)). */
export function timeToFraction(resistance: number, capacitance: number, k: number): number {
  return resistance * capacitance * Math.log(1 / (1 - k));
}

/**
 * Energy dissipated in the series resistor while an empty C charges to k·V with no load:
 * ∫(V − v)²/R dt = C·V²·(k − k²/2); ½CV² for a full charge.                    [der, REFERENCE §2]
 */
export function energyToFraction(capacitance: number, voltage: number, k: number): number {
  return capacitance * voltage * voltage * (k - (k * k) / 2);
}

export interface RcCharge {
  /** Voltage the capacitor tends to with this R and load, V. */
  settlingVoltage: number;
  /** Time constant R‖Rp·C, s. */
  timeConstant: number;
  /** Time to reach k·V, s; null when the load holds the capacitor at or below k·V (never reached). */
  timeToThreshold: number | null;
}

export function rcCharge(resistance: number, capacitance: number, voltage: number, k: number, load: RcLoad = {}): RcCharge {
  const rp = load.parallelResistance ?? Infinity;
  const iLoad = load.loadCurrent ?? 0;
  const rth = parallel(resistance, rp);
  const settlingVoltage = rth * (voltage / resistance - iLoad);
  const timeConstant = rth * capacitance;
  const target = k * voltage;
  // The threshold is reached only if the capacitor settles above it (REFERENCE §2: I_L·R < (1−k)V).
  const timeToThreshold = settlingVoltage > target ? timeConstant * Math.log(settlingVoltage / (settlingVoltage - target)) : null;
  return { settlingVoltage, timeConstant, timeToThreshold };
}

/** Capacitor voltage t seconds after it crossed k·V, still charging through R (the contactor delay). */
export function voltageAfterThreshold(charge: RcCharge, voltage: number, k: number, delay: number): number {
  const vk = k * voltage;
  if (delay <= 0) return vk;
  return charge.settlingVoltage - (charge.settlingVoltage - vk) * Math.exp(-delay / charge.timeConstant);
}

/**
 * The largest R for which k·V is reachable at all: R‖Rp·(V/R − I_L) = k·V solved for R,
 *   R = Rp·V·(1−k) / (Rp·I_L + k·V);  Rp → ∞: (1−k)·V/I_L;  I_L = 0: Rp·(1−k)/k.
 * Infinity when there is no load (any R gets there eventually).                               [der]
 */
export function largestResistanceReachingThreshold(voltage: number, k: number, load: RcLoad = {}): number {
  const rp = load.parallelResistance ?? Infinity;
  const iLoad = load.loadCurrent ?? 0;
  if (!Number.isFinite(rp)) return iLoad > 0 ? ((1 - k) * voltage) / iLoad : Infinity;
  return (rp * voltage * (1 - k)) / (rp * iLoad + k * voltage);
}

/**
 * The largest R whose time to k·V is at most `time`. Without a load this is the closed form
 * t/(C·ln(1/(1−k))); with one, t_k(R) rises monotonically from 0 to ∞ on (0, R_reach), so bisection
 * on a log scale converges (60 halvings of the ratio, far below any E-series step).
 */
export function largestResistanceForTime(
  time: number,
  capacitance: number,
  voltage: number,
  k: number,
  load: RcLoad = {},
): number {
  if (!(time > 0)) return 0;
  const noLoad = !Number.isFinite(load.parallelResistance ?? Infinity) && !(load.loadCurrent ?? 0);
  if (noLoad) return time / (capacitance * Math.log(1 / (1 - k)));
  const reach = largestResistanceReachingThreshold(voltage, k, load);
  const takes = (r: number) => rcCharge(r, capacitance, voltage, k, load).timeToThreshold ?? Infinity;
  // Bracket: start from the no-load answer (an upper bound on the loaded one) capped just below reach.
  let high = Math.min(time / (capacitance * Math.log(1 / (1 - k))), reach * (1 - 1e-12));
  if (takes(high) <= time) return high;
  let low = high;
  while (takes(low) > time) low /= 2;
  for (let n = 0; n < 200 && high / low > 1 + 1e-12; n += 1) {
    const mid = Math.sqrt(low * high);
    if (takes(mid) <= time) low = mid;
    else high = mid;
  }
  return low;
}

/**
 * Peak current when a step ΔV is applied to a series R–L–C from rest (the bypass closing across the
 * residual step). From the series RLC step response (REFERENCE §1): underdamped
 * i = ΔV/(L·ωd)·e^(−αt)·sin ωd·t, peaking at ωd·t* = atan(ωd/α) with i_pk = ΔV·√(C/L)·e^(−α·t*);
 * critically damped i_pk = 2ΔV/(e·R); overdamped i = ΔV/(L(s1−s2))·(e^(s1·t) − e^(s2·t)), peaking at
 * t* = ln(s2/s1)/(s1 − s2). L = 0 gives ΔV/R; R = 0 and L = 0 gives Infinity (no limit at all).  [der]
 */
export function stepCurrentPeak(deltaV: number, resistance: number, inductance: number, capacitance: number): number {
  const dv = Math.abs(deltaV);
  if (dv === 0) return 0;
  if (!(inductance > 0)) return resistance > 0 ? dv / resistance : Infinity;
  const alpha = resistance / (2 * inductance);
  const omegaN = 1 / Math.sqrt(inductance * capacitance);
  const zeta = alpha / omegaN;
  if (Math.abs(zeta - 1) < 1e-9) return (2 * dv) / (Math.E * resistance);
  if (zeta < 1) {
    const omegaD = omegaN * Math.sqrt(1 - zeta * zeta);
    const tPeak = Math.atan2(omegaD, alpha) / omegaD;
    return dv * Math.sqrt(capacitance / inductance) * Math.exp(-alpha * tPeak);
  }
  const beta = Math.sqrt(alpha * alpha - omegaN * omegaN);
  const s2 = -alpha - beta;
  const s1 = (omegaN * omegaN) / s2; // = −α + β without the cancellation when ζ ≫ 1
  const tPeak = Math.log(s2 / s1) / (s1 - s2);
  return (dv / (inductance * (s1 - s2))) * (Math.exp(s1 * tPeak) - Math.exp(s2 * tPeak));
}

/** ∫i²dt of any step charge through a loop resistance: ½·C·ΔV²/R_loop, whatever L is. [der, REFERENCE §1–2] */
export function stepChargeI2t(deltaV: number, capacitance: number, loopResistance: number): number {
  return (0.5 * capacitance * deltaV * deltaV) / loopResistance;
}
