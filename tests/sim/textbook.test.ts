/**
 * The engine against circuit-theory facts computed here from their own formulas, never through the
 * engine's code. Sources are named beside each value; "from memory" and "derived" as the reference
 * sheet marks them.
 */
import { parseDesign, type DesignInput } from '@/sim/design';
import { simulate } from '@/sim/simulate';
import { closedFormMetrics } from '@/sim/solvers/closedForm';

import { expectClose } from '../helpers/expectClose';

function run(input: DesignInput) {
  return simulate(parseDesign(input), { points: 400 });
}

function rlc(vs: number, r: number, l: number, c: number, v0: number, i0: number, duration: number): DesignInput {
  return {
    source: { voltage: vs, resistance: r, inductance: l },
    capacitor: { capacitance: c },
    initial: { capacitorVoltage: v0, inductorCurrent: i0 },
    duration,
  };
}

describe('worked examples (series RLC step and natural responses)', () => {
  it('A: 48 V, 280 Ω, 0.1 H, 0.4 µF from rest peaks at 67.20 V at 654.5 µs and 65.96 mA at 268.1 µs', () => {
    // Step-response example in Nilsson & Riedel, Electric Circuits, ch. 8 (from memory); values derived:
    // α = R/2L = 1400 s⁻¹, ωn = 1/√(LC) = 5000, ωd = √(ωn² − α²) = 4800 rad/s.
    // Peak vC at t = π/ωd, Vpk = Vs(1 + e^(−απ/ωd)); i = (Vs/(L ωd)) e^(−αt) sin ωd t peaks at tan ωd t = ωd/α.
    const { metrics } = run(rlc(48, 280, 0.1, 0.4e-6, 0, 0, 5e-3));
    const alpha = 1400;
    const wd = 4800;
    expectClose(metrics.peakCapacitorVoltage.time, Math.PI / wd, 1e-10);
    expectClose(metrics.peakCapacitorVoltage.value, 48 * (1 + Math.exp((-alpha * Math.PI) / wd)), 1e-10);
    const tI = Math.atan(wd / alpha) / wd;
    expectClose(metrics.peakCurrent.time, tI, 1e-9);
    expectClose(metrics.peakCurrent.value, (48 / (0.1 * wd)) * Math.exp(-alpha * tI) * Math.sin(wd * tI), 1e-10);
    // The printed four-figure values.
    expectClose(metrics.peakCapacitorVoltage.value, 67.2, 1e-4);
    expectClose(metrics.peakCapacitorVoltage.time, 654.5e-6, 1e-4);
    expectClose(metrics.peakCurrent.value, 65.96e-3, 1e-4);
    expectClose(metrics.peakCurrent.time, 268.1e-6, 2e-4);
    expect(metrics.classification).toBe('underdamped');
    expectClose(metrics.alpha, 1400, 1e-14);
    expectClose(metrics.omegaD, 4800, 1e-14);
  });

  it('B: 100 V on 0.1 µF through 100 mH and 560 Ω reverses to −40.0 V at 327 µs; peak |i| 68.7 mA at 134.1 µs', () => {
    // Natural-response example, Nilsson & Riedel, Electric Circuits, ch. 8 (from memory); derived:
    // α = 2800, ωd = 9600, ζ = 0.28. Minimum at t = π/ωd: v = −V0·e^(−απ/ωd);
    // i = −(V0/(L ωd)) e^(−αt) sin ωd t, extremum at tan ωd t = ωd/α.
    const { metrics } = run(rlc(0, 560, 0.1, 0.1e-6, 100, 0, 3e-3));
    expectClose(metrics.zeta, 0.28, 1e-14);
    expectClose(metrics.minCapacitorVoltage.time, Math.PI / 9600, 1e-10);
    expectClose(metrics.minCapacitorVoltage.value, -100 * Math.exp((-2800 * Math.PI) / 9600), 1e-10);
    const tI = Math.atan(9600 / 2800) / 9600;
    expectClose(metrics.peakCurrent.time, tI, 1e-9);
    expectClose(metrics.peakCurrent.value, (100 / (0.1 * 9600)) * Math.exp(-2800 * tI) * Math.sin(9600 * tI), 1e-10);
    expectClose(metrics.minCapacitorVoltage.value, -40.0, 2e-3);
    expectClose(metrics.peakCurrent.value, 68.7e-3, 1e-3);
    // Vs = V0 is not the case here; Vss = 0 and V0 = 100 V: overshoot is (peak − 0)/(0 − 100)·100 = −100 % (peak = V0 at t = 0).
    expectClose(metrics.overshootPercent, -100, 1e-12);
  });

  it('C: 24 V, 1 Ω, 1 H, 0.25 F from 12 V and 12 A peaks at 38.99 V at 0.9416 s; max |i| is I0 at t = 0', () => {
    // Step response with initial energy, Alexander & Sadiku, Fundamentals of Electric Circuits, ch. 8 (from memory).
    // Derived: α = 0.5, ωd = √3.75. i = e^(−αt)[I0 cos ωd t + ((ΔV/L − αI0)/ωd) sin ωd t] = 0 at
    // ωd t = π − atan(I0 ωd/(ΔV/L − αI0)); v = Vs − e^(−αt)[ΔV cos + ((αΔV − I0/C)/ωd) sin].
    const { metrics } = run(rlc(24, 1, 1, 0.25, 12, 12, 10));
    const wd = Math.sqrt(3.75);
    const tPk = (Math.PI - Math.atan((12 * wd) / (12 - 6))) / wd;
    const vPk = 24 - Math.exp(-0.5 * tPk) * (12 * Math.cos(wd * tPk) + ((0.5 * 12 - 12 / 0.25) / wd) * Math.sin(wd * tPk));
    expectClose(metrics.peakCapacitorVoltage.time, tPk, 1e-10);
    expectClose(metrics.peakCapacitorVoltage.value, vPk, 1e-11);
    expectClose(metrics.peakCapacitorVoltage.value, 38.99, 1e-4);
    expectClose(metrics.peakCapacitorVoltage.time, 0.9416, 1e-4);
    expect(metrics.peakCurrent).toEqual({ value: 12, time: 0 });
  });

  it('D: 24 V, 5 Ω, 1 H, 0.25 F from 20 V and 10 A is overdamped and peaks at 27.302 V at 0.5973 s', () => {
    // Derived: s = −1, −4; K1 = (I0/C − s2A)/(s1 − s2) = 8, K2 = (s1A − I0/C)/(s1 − s2) = −12;
    // v = 24 + 8e^(−t) − 12e^(−4t); i = 0 at e^(3t) = 6.
    const { metrics } = run(rlc(24, 5, 1, 0.25, 20, 10, 10));
    const t = Math.log(6) / 3;
    expect(metrics.classification).toBe('overdamped');
    expectClose(metrics.peakCapacitorVoltage.time, t, 1e-10);
    expectClose(metrics.peakCapacitorVoltage.value, 24 + 8 * Math.exp(-t) - 12 * Math.exp(-4 * t), 1e-12);
    expectClose(metrics.peakCapacitorVoltage.value, 27.302, 2e-5);
  });
});

describe('second-order facts', () => {
  it.each([
    [0.1, 72.9],
    [0.2, 52.7],
    [0.5, 16.3],
    [0.707, 4.3],
  ])('from rest at ζ = %d the overshoot is 100·exp(−πζ/√(1−ζ²)) ≈ %d %%', (zeta, printed) => {
    // Ogata, Modern Control Engineering, 5th ed., §5-3; Nise, Control Systems Engineering, ch. 4.
    // L = 1 mH, C = 1 mF gives Z0 = 1 Ω, so R = 2ζ.
    const { metrics } = run(rlc(100, 2 * zeta, 1e-3, 1e-3, 0, 0, 0.5));
    const exact = 100 * Math.exp((-Math.PI * zeta) / Math.sqrt(1 - zeta * zeta));
    expectClose(metrics.overshootPercent, exact, 1e-9);
    expectClose(metrics.overshootPercent, printed, 0, 0.05);
    expectClose(metrics.zeta, zeta, 1e-14);
    expectClose(metrics.peakCapacitorVoltage.time, Math.PI / (1e3 * Math.sqrt(1 - zeta * zeta)), 1e-10);
  });

  it('an undamped LC from rest peaks at 2·Vs and Vs·√(C/L), at the first of its equal peaks', () => {
    // R = 0 [der]: v = Vs(1 − cos ωn t), i = Vs√(C/L) sin ωn t. Ten periods in the run: the earliest counts.
    const L = 10e-6;
    const C = 100e-6;
    const wn = 1 / Math.sqrt(L * C);
    const { metrics } = run(rlc(400, 0, L, C, 0, 0, (10 * 2 * Math.PI) / wn));
    expect(metrics.classification).toBe('undamped');
    expect(metrics.q).toBeNull();
    expectClose(metrics.omegaD, wn, 1e-15);
    expectClose(metrics.peakCapacitorVoltage.value, 800, 1e-12);
    expectClose(metrics.peakCapacitorVoltage.time, Math.PI / wn, 1e-9);
    expectClose(metrics.peakCurrent.value, 400 * Math.sqrt(C / L), 1e-12);
    expectClose(metrics.peakCurrent.time, Math.PI / 2 / wn, 1e-9);
    expectClose(metrics.minCapacitorVoltage.value, 0, 0, 1e-9);
    expectClose(metrics.overshootPercent, 100, 1e-10);
  });

  it('a lossless turn-off of 50 A at 400 V through 20 nH into 1 nF peaks at 623.6 V, and at 858.3 V from 0 V', () => {
    // REFERENCE §4 [der]: from the bus, V = Vs + I0√(L/C) at a quarter period; from 0 V,
    // V = Vs + √(Vs² + (I0 Z0)²). f = 1/(2π√(LC)) = 35.6 MHz.
    const L = 20e-9;
    const C = 1e-9;
    const z0 = Math.sqrt(L / C);
    const atBus = run(rlc(400, 0, L, C, 400, 50, 200e-9)).metrics;
    expectClose(atBus.peakBusVoltage.value, 400 + 50 * z0, 1e-12);
    expectClose(atBus.peakCapacitorVoltage.time, Math.PI / 2 / (1 / Math.sqrt(L * C)), 1e-9);
    expectClose(atBus.peakBusVoltage.value, 623.6, 1e-4);
    expectClose((atBus.omegaN ?? 0) / (2 * Math.PI), 35.6e6, 1e-3);
    const fromZero = run(rlc(400, 0, L, C, 0, 50, 200e-9)).metrics;
    expectClose(fromZero.peakBusVoltage.value, 400 + Math.hypot(400, 50 * z0), 1e-12);
    expectClose(fromZero.peakBusVoltage.value, 858.3, 1e-4);
  });

  it('R = 0 with initial energy peaks at Vs + √(ΔV² + (I0 Z0)²) and √(I0² + (ΔV/Z0)²)', () => {
    // REFERENCE §1 [der].
    const L = 2e-3;
    const C = 5e-6;
    const z0 = Math.sqrt(L / C);
    const { metrics } = run(rlc(100, 0, L, C, 30, -2, 0.01));
    expectClose(metrics.peakCapacitorVoltage.value, 100 + Math.hypot(70, 2 * z0), 1e-12);
    expectClose(metrics.peakCurrent.value, Math.hypot(2, 70 / z0), 1e-12);
  });

  it('critically damped from rest: i peaks at 2Vs/(e·R) at t = 2L/R, without overshoot', () => {
    // REFERENCE §1 [der]: i = (Vs/L)·t·e^(−αt), α = R/2L = ωn.
    const L = 1e-3;
    const C = 1e-3;
    const R = 2 * Math.sqrt(L / C);
    const { metrics } = run(rlc(50, R, L, C, 0, 0, 0.1));
    expect(metrics.classification).toBe('critically-damped');
    expectClose(metrics.omegaD, 0, 0, 0);
    expectClose(metrics.peakCurrent.value, (2 * 50) / (Math.E * R), 1e-12);
    expectClose(metrics.peakCurrent.time, (2 * L) / R, 1e-9);
    expect(metrics.peakCapacitorVoltage.value).toBeLessThanOrEqual(50 * (1 + 1e-12));
  });

  it('splits the damping classes at α = ωn and stays continuous across the split', () => {
    const L = 1e-3;
    const C = 1e-3;
    const Rc = 2 * Math.sqrt(L / C);
    const classOf = (r: number) => run(rlc(50, r, L, C, 0, 0, 0.1)).metrics;
    const below = classOf(Rc * (1 - 1e-6));
    const at = classOf(Rc);
    const above = classOf(Rc * (1 + 1e-6));
    expect([below.classification, at.classification, above.classification]).toEqual([
      'underdamped',
      'critically-damped',
      'overdamped',
    ]);
    // dIpk/dR is finite at the split: a 1e−6 change in R moves the peak by ~1e−6 relative.
    expectClose(below.peakCurrent.value, at.peakCurrent.value, 3e-6);
    expectClose(above.peakCurrent.value, at.peakCurrent.value, 3e-6);
  });

  it('a step charge through any series R dissipates ½CΔV² and ∫i²dt = ½CΔV²/R', () => {
    // REFERENCE §1 [der]; run long enough (60 time constants) that the tail is below rounding.
    const { metrics } = run(rlc(400, 0.5, 20e-6, 1e-3, 100, 0, 0.03));
    expectClose(metrics.i2t, (0.5 * 1e-3 * 300 ** 2) / 0.5, 1e-10);
  });
});

describe('RC charging (L = 0)', () => {
  it('reaches the fraction k at RC·ln(1/(1−k)) with C·V²(k − k²/2) in the resistor', () => {
    // Standard circuit texts (RC charging); energy derived: ∫(V/R)²e^(−2t/RC) dt·R from 0 to t_k.
    const R = 47;
    const C = 470e-6;
    const V = 400;
    for (const k of [0.9, 0.95]) {
      const { metrics } = run({
        source: { voltage: V },
        precharge: { resistance: R, bypass: { fraction: k } },
        filter: { resistance: 1e-3 },
        capacitor: { capacitance: C },
        settleFraction: k,
        duration: 0.2,
      });
      const rc = (R + 1e-3) * C;
      expectClose(metrics.bypassTime, rc * Math.log(1 / (1 - k)), 1e-12);
      expectClose(metrics.timeTo95, rc * Math.log(1 / (1 - k)), 1e-12);
      expectClose(metrics.prechargeEnergy, (R / (R + 1e-3)) * C * V * V * (k - (k * k) / 2), 1e-11);
      expectClose(metrics.prechargePeakPower, R * (V / (R + 1e-3)) ** 2, 1e-13);
      expect(metrics.classification).toBe('first-order');
      expect(metrics.alpha).toBeNull();
    }
    // 95 % is reached at 2.996 RC (printed value).
    const t95 = Math.log(20);
    expectClose(t95, 2.996, 2e-4);
  });

  it('closedFormMetrics agrees with the full check', () => {
    const input = rlc(24, 2, 1, 1, 3, 1, 20);
    const fast = closedFormMetrics(parseDesign(input));
    const full = run(input).metrics;
    expect(fast).not.toBeNull();
    expectClose(fast?.peakCapacitorVoltage.value, full.peakCapacitorVoltage.value, 1e-12);
    expectClose(fast?.i2t, full.i2t, 1e-10);
    expectClose(fast?.timeTo95, full.timeTo95 ?? NaN, 1e-10);
  });
});
