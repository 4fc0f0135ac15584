/**
 * Whole checks through `simulate`, against formulas derived here (REFERENCE §2–§4) and against
 * small independent integrations written in this file.
 */
import { DesignError } from '@/sim/errors';
import { parseDesign, type DesignInput } from '@/sim/design';
import { simulate } from '@/sim/simulate';

import { expectClose } from '../helpers/expectClose';

const check = (input: DesignInput, points = 400) => simulate(parseDesign(input), { points });

describe('a circuit that is stiff for an explicit integrator', () => {
  it('1 Ω, 10 nH, 1 mF finishes on the exact path and matches the overdamped closed form', () => {
    // REFERENCE §1 [der]: s1,2 = −α ± √(α² − ωn²), K1 = (I0/C − s2A)/(s1 − s2), K2 = (s1A − I0/C)/(s1 − s2),
    // v = Vs + K1e^(s1t) + K2e^(s2t), i = C(s1K1e^(s1t) + s2K2e^(s2t)); here A = −400 V, I0 = 0.
    const vs = 400;
    const R = 1;
    const L = 10e-9;
    const C = 1e-3;
    const T = 5e-3;
    const result = check({ source: { voltage: vs, resistance: R, inductance: L }, capacitor: { capacitance: C }, duration: T });
    const alpha = R / (2 * L);
    const beta = Math.sqrt(alpha * alpha - 1 / (L * C));
    const s1 = -alpha + beta;
    const s2 = -alpha - beta;
    const K1 = (0 - s2 * -vs) / (s1 - s2);
    const K2 = (s1 * -vs - 0) / (s1 - s2);
    const tPeak = Math.log((-s2 * s2 * K2) / (s1 * s1 * K1)) / (s1 - s2);
    const iPeak = C * (s1 * K1 * Math.exp(s1 * tPeak) + s2 * K2 * Math.exp(s2 * tPeak));
    const m = result.metrics;
    expectClose(m.finalCapacitorVoltage, vs + K1 * Math.exp(s1 * T) + K2 * Math.exp(s2 * T), 1e-9);
    expectClose(m.peakCurrent.value, iPeak, 1e-9);
    expectClose(m.peakCurrent.time, tPeak, 1e-6);
    // ∫i² from the energy balance about the final state [der].
    const x1 = K1 * Math.exp(s1 * T) + K2 * Math.exp(s2 * T);
    const i1 = C * (s1 * K1 * Math.exp(s1 * T) + s2 * K2 * Math.exp(s2 * T));
    expectClose(m.i2t, (0.5 * C * (vs * vs - x1 * x1) - 0.5 * L * i1 * i1) / R, 1e-9);
    expect(result.solvers.stiff).toBe(true);
    expect(result.solvers.waveformFrom).toBe('exact');
    expect(result.solvers.ran).toEqual(['exact', 'closed-form']);
    expect(result.solvers.skipped.map((s) => s.solver)).toEqual(['odex']);
    expect(result.solvers.skipped[0].reason).toMatch(/stiff/);
    expect(result.solvers.maxDisagreement.vC).toBeLessThan(1e-9);
    expect(result.warnings).toEqual([]);
  });
});

describe('precharge and bypass', () => {
  it('closing the bypass at 95 % adds a second inrush: ½CΔV²/R = 20 A²s against 0.16 A²s while precharging', () => {
    // REFERENCE §2 [der]: 400 V, 1 mF, 95 %, 10 mΩ loop. With L = 0 the precharge phase is RC with
    // R1 = 500 Ω + 10 mΩ: ∫i² = (V²/R1²)(R1C/2)(1 − 0.05²) = CV²(1 − 0.05²)/(2R1) ≈ 0.16 A²s, reached at
    // t95 = R1·C·ln 20. The bypass closes at ΔV = 0.05·400 = 20 V: i jumps to 20 V/10 mΩ = 2 kA and
    // ∫i² = ½·C·ΔV²/R = ½·1e−3·400/0.01 = 20 A²s (the run lasts 5·10⁴ time constants of 10 µs).
    const C = 1e-3;
    const R1 = 500.01;
    const { metrics: m, warnings } = check({
      source: { voltage: '400 V', resistance: '10 mΩ' },
      precharge: { resistance: '500 Ω', bypass: { when: 'voltage', fraction: 0.95 } },
      capacitor: { capacitance: '1 mF' },
      duration: 2,
    });
    expect(warnings).toEqual([]);
    expectClose(m.bypassTime, R1 * C * Math.log(20), 1e-12);
    expectClose(m.residualStep, 20, 1e-10);
    expectClose(m.peakCurrentAfterBypass, 2000, 1e-10);
    expectClose(m.i2tAfterBypass, 20, 1e-10);
    const prechargeI2t = (C * 400 * 400 * (1 - 0.05 ** 2)) / (2 * R1);
    expectClose(m.prechargeEnergy, 500 * prechargeI2t, 1e-10);
    expectClose(prechargeI2t, 0.16, 0.01);
    expectClose(m.i2t, prechargeI2t + 20, 1e-10);
    expect((m.i2tAfterBypass ?? 0) / prechargeI2t).toBeGreaterThan(100);
    expectClose(m.prechargePeakPower, 500 * (400 / R1) ** 2, 1e-13);
    expect(m.prechargePhase?.classification).toBe('first-order');
  });

  it('with a load current the threshold is reached at RC·ln[(V − I_L R)/(V − I_L R − kV)]', () => {
    // REFERENCE §2 [der]: C dv/dt = (V − v)/R − I_L, so v → V − I_L·R.
    const R = 47.01;
    const C = 1e-3;
    const { metrics } = check({
      source: { voltage: 400, resistance: 0.01 },
      precharge: { resistance: 47, bypass: { fraction: 0.9 } },
      capacitor: { capacitance: C },
      load: { kind: 'current', value: 0.1 },
      duration: 0.5,
    });
    const a = 400 - 0.1 * R;
    expectClose(metrics.bypassTime, R * C * Math.log(a / (a - 0.9 * 400)), 1e-12);
    expectClose(metrics.steadyStateVoltage, 400 - 0.1 * 0.01, 1e-14);
  });

  it.each<[string, DesignInput['load'], DesignInput['bleeder']]>([
    ['a load current with I_L·R > (1 − k)V', { kind: 'current', value: 2 }, undefined],
    ['a bleeder that divides the bus below the threshold', undefined, { resistance: 300 }],
  ])('says the threshold is never reached with %s', (_label, load, bleeder) => {
    // I_L R = 94 V > 0.05·400 V; 400·300/347 = 345.8 V < 380 V [der].
    const { metrics, warnings } = check({
      source: { voltage: 400, resistance: 0.01 },
      precharge: { resistance: 47, bypass: { fraction: 0.95 } },
      capacitor: { capacitance: '1 mF' },
      load,
      bleeder,
      duration: 1,
    });
    expect(metrics.bypassTime).toBeNull();
    expect(metrics.residualStep).toBeNull();
    expect(metrics.peakCurrentAfterBypass).toBeNull();
    expect(metrics.i2tAfterBypass).toBeNull();
    expect(metrics.prechargeEnergy).toBeGreaterThan(0);
    expect(warnings.join(' ')).toMatch(/bypass threshold never reached.*load or bleeder/);
  });

  it('a capacitor that starts above the threshold closes after the delay', () => {
    const { metrics } = check({
      source: { voltage: 400, resistance: 0.01, inductance: '1 uH' },
      precharge: { resistance: 47, bypass: { fraction: 0.9, delay: '3 ms' } },
      capacitor: { capacitance: '1 mF' },
      initial: { capacitorVoltage: 390 },
      duration: 0.02,
    });
    expectClose(metrics.bypassTime, 3e-3, 1e-15);
  });

  it('a bypass at a fixed time leaves Vs − vC(t) as the residual step; one after the run is null', () => {
    // RC charging [pub: standard circuit texts]: vC = V(1 − e^(−t/RC)).
    const base: DesignInput = { source: { voltage: 100, resistance: 0.1 }, capacitor: { capacitance: '1 mF' }, duration: 0.1 };
    const at = check({ ...base, precharge: { resistance: 20, bypass: { when: 'time', time: '30 ms' } } }).metrics;
    expectClose(at.bypassTime, 0.03, 1e-15);
    expectClose(at.residualStep, 100 * Math.exp(-0.03 / (20.1 * 1e-3)), 1e-11);
    const late = check({ ...base, precharge: { resistance: 20, bypass: { when: 'time', time: '0.2 s' } } });
    expect(late.metrics.bypassTime).toBeNull();
    expect(late.metrics.peakCurrentAfterBypass).toBeNull();
    expect(late.warnings.join(' ')).toMatch(/after the end of the run/);
  });

  it('without a precharge the precharge metrics are 0 and the bypass metrics null', () => {
    const { metrics } = check({
      source: { voltage: 48, resistance: 0.1, inductance: '1 uH' },
      capacitor: { capacitance: '1 mF' },
      duration: 0.01,
    });
    expect(metrics.prechargeEnergy).toBe(0);
    expect(metrics.prechargePeakPower).toBe(0);
    expect(metrics.bypassTime).toBeNull();
    expect(metrics.residualStep).toBeNull();
    expect(metrics.peakCurrentAfterBypass).toBeNull();
    expect(metrics.i2tAfterBypass).toBeNull();
    expect(metrics.prechargePhase).toBeNull();
  });
});

describe('conventions', () => {
  it('with L = 0 an initial inductor current is ignored, with a warning', () => {
    const { metrics, warnings } = check({
      source: { voltage: 100, resistance: 2 },
      capacitor: { capacitance: '1 mF' },
      initial: { capacitorVoltage: 20, inductorCurrent: 500 },
      duration: 0.05,
    });
    expect(warnings.join(' ')).toMatch(/initial inductor current is ignored/);
    expect(metrics.peakCurrent).toEqual({ value: 40, time: 0 });
    expect(metrics.classification).toBe('first-order');
    expect([metrics.alpha, metrics.omegaN, metrics.zeta, metrics.omegaD, metrics.q]).toEqual([null, null, null, null, null]);
  });

  it('overshoot is null when the steady state equals the initial voltage', () => {
    const { metrics } = check({
      source: { voltage: 48, resistance: 0.1, inductance: '1 uH' },
      capacitor: { capacitance: '1 mF' },
      initial: { capacitorVoltage: 48 },
      duration: 0.01,
    });
    expect(metrics.overshootPercent).toBeNull();
    expect(metrics.timeTo95).toBeNull();
  });

  it('a linear source rise is solved exactly (RC ramp response)', () => {
    // [der] C dv/dt = (Vs·t/tr − v)/R: v = (Vs/tr)(t − τ(1 − e^(−t/τ))) for t ≤ tr, then an RC approach to Vs.
    const R = 10;
    const C = 1e-4;
    const tau = R * C;
    const tr = 2e-3;
    const result = check({ source: { voltage: 50, resistance: R, riseTime: tr }, capacitor: { capacitance: C }, duration: 6e-3 });
    const ramp = (t: number) => (50 / tr) * (t - tau * (1 - Math.exp(-t / tau)));
    const exact = (t: number) => (t <= tr ? ramp(t) : 50 - (50 - ramp(tr)) * Math.exp(-(t - tr) / tau));
    result.waveform.t.forEach((t, k) => expectClose(result.waveform.vC[k], exact(t), 0, 1e-11 * 50));
    expectClose(result.metrics.finalCapacitorVoltage, exact(6e-3), 1e-13);
    expect(result.solvers.ran).toEqual(['exact', 'odex']);
    expect(result.solvers.maxDisagreement.vC).toBeLessThan(1e-8);
  });

  it('resamples to the requested points and inserts the exact peaks', () => {
    const input: DesignInput = {
      source: { voltage: 48, resistance: 0.02, inductance: '0.5 uH' },
      capacitor: { capacitance: '1.5 mF' },
      duration: '1 ms',
    };
    const result = simulate(parseDesign(input));
    const { waveform, metrics } = result;
    expect(waveform.t.length).toBeGreaterThanOrEqual(2000);
    expect(waveform.t.length).toBeLessThanOrEqual(2008);
    for (let k = 1; k < waveform.t.length; k++) expect(waveform.t[k]).toBeGreaterThanOrEqual(waveform.t[k - 1]);
    const k = waveform.t.indexOf(metrics.peakCapacitorVoltage.time);
    expect(k).toBeGreaterThan(0);
    expect(waveform.vC[k]).toBe(metrics.peakCapacitorVoltage.value);
    expect(Math.max(...waveform.vC)).toBe(metrics.peakCapacitorVoltage.value);
    const j = waveform.t.indexOf(metrics.peakCurrent.time);
    expectClose(Math.abs(waveform.i[j]), metrics.peakCurrent.value, 1e-14);
    expect(waveform.vD).toBeNull();
    expect(simulate(parseDesign(input), { points: 50 }).waveform.t.length).toBeLessThan(60);
  });

  it('refuses more than 200 000 points with an error naming the field', () => {
    const design = parseDesign({ source: { voltage: 48, resistance: 1 }, capacitor: { capacitance: '1 mF' }, duration: 1 });
    expect(() => simulate(design, { points: 200_001 })).toThrow(DesignError);
    expect(() => simulate(design, { points: 200_001 })).toThrow(/points/);
  });
});

describe('turn-off with an RC snubber', () => {
  it.each([0.5, 0.7, 1])('at ζ = %d the switch voltage peaks at the R·I0 step at t = 0+', (zeta) => {
    // REFERENCE §4 [der]: the switch sees vC + R·i; v(0+) = Vbus + R·I0 and dv/dt(0+) = (I0/C)(1 − 4ζ²) ≤ 0.
    const L = 20e-9;
    const C = 1e-9;
    const R = 2 * zeta * Math.sqrt(L / C);
    const { metrics } = check({
      source: { voltage: 400, inductance: L },
      capacitor: { capacitance: C, esr: R },
      initial: { capacitorVoltage: 400, inductorCurrent: 50 },
      duration: 300e-9,
    });
    expectClose(metrics.peakBusVoltage.value, 400 + R * 50, 1e-12);
    expect(metrics.peakBusVoltage.time).toBe(0);
  });

  it('at ζ = 0.3 the ring rises above the step', () => {
    const L = 20e-9;
    const C = 1e-9;
    const R = 0.6 * Math.sqrt(L / C);
    const { metrics } = check({
      source: { voltage: 400, inductance: L },
      capacitor: { capacitance: C, esr: R },
      initial: { capacitorVoltage: 400, inductorCurrent: 50 },
      duration: 300e-9,
    });
    expect(metrics.peakBusVoltage.value).toBeGreaterThan(400 + R * 50);
    expect(metrics.peakBusVoltage.time).toBeGreaterThan(0);
  });
});

describe('constant-power load', () => {
  it('settles at the higher root of (1 + R/Rb)v² − Vs·v + R·P = 0', () => {
    // DC with the inductor shorted and the capacitors open: v = Vs − R(v/Rb + P/v) [der].
    const vs = 96;
    const R = 0.5;
    const Rb = 1000;
    const P = 500;
    const result = check(
      {
        source: { voltage: vs, resistance: R, inductance: '20 uH' },
        capacitor: { capacitance: '470 uF', esr: '50 mΩ' },
        damping: { resistance: 0.5, capacitance: '2 mF' },
        bleeder: { resistance: Rb },
        load: { kind: 'power', value: P, undervoltage: 40 },
        duration: '40 ms',
      },
      200,
    );
    const a = 1 + R / Rb;
    const higher = (vs + Math.sqrt(vs * vs - 4 * a * R * P)) / (2 * a);
    expectClose(result.metrics.steadyStateVoltage, higher, 1e-14);
    expectClose(result.metrics.finalCapacitorVoltage, higher, 1e-7);
    expect(result.solvers.waveformFrom).toBe('odex');
    expect(result.solvers.ran).toEqual(['odex', 'odex-check']);
    expect(result.solvers.maxDisagreement.vC).toBeLessThan(1e-6);
    // With ESR > 0 the bus is algebraic: where it first reaches U the loaded bus would sit below U,
    // so the load holds the bus at U (slide) until it can draw its full P/U (see sim/README.md).
    expect(result.phases.map((p) => p.load)).toEqual(['off', 'slide', 'on']);
  });

  it.each([
    [0.06, 'decays'],
    [0.03, 'grows'],
  ])('with R = %d Ω a ring around the operating point %s (stable iff L·P/(C·V²) < R < V²/P)', (R, expected) => {
    // REFERENCE §3 [der]: linearised, C·dv/dt = i + (P/V²)·v, L·di/dt = −R·i − v; here L·P/(C·V²) ≈ 0.043 Ω.
    const vs = 48;
    const L = 100e-6;
    const C = 100e-6;
    const P = 100;
    const v = (vs + Math.sqrt(vs * vs - 4 * R * P)) / 2;
    const result = check(
      {
        source: { voltage: vs, resistance: R, inductance: L },
        capacitor: { capacitance: C },
        load: { kind: 'power', value: P },
        initial: { capacitorVoltage: v + 0.5, inductorCurrent: P / v },
        duration: '50 ms',
      },
      4000,
    );
    const { t, vC } = result.waveform;
    const swing = (from: number, to: number) =>
      Math.max(...vC.filter((_, k) => t[k] >= from && t[k] <= to).map((x) => Math.abs(x - v)));
    const early = swing(0, 5e-3);
    const late = swing(45e-3, 50e-3);
    if (expected === 'grows') expect(late).toBeGreaterThan(5 * early);
    else expect(late).toBeLessThan(early / 5);
  });

  it('connecting after the run, it leaves odex with the same precharge run as the exact path without it', () => {
    // Two independent solvers on one precharge + bypass run: odex (chosen for the constant-power load,
    // with its own threshold event) against exact propagation of the same circuit without the load.
    const base: DesignInput = {
      source: { voltage: 400, resistance: 0.05, inductance: '50 µH' },
      precharge: { resistance: 5, bypass: { when: 'voltage', fraction: 0.9, delay: '1 ms' } },
      capacitor: { capacitance: '470 µF', esr: '20 mΩ' },
      damping: { resistance: 0.5, capacitance: '1 mF' },
      duration: '30 ms',
    };
    const withLoad = check({ ...base, load: { kind: 'power', value: 2000, start: '1 s' } });
    const without = check(base);
    expect(withLoad.solvers.waveformFrom).toBe('odex');
    expect(without.solvers.waveformFrom).toBe('exact');
    const a = withLoad.metrics;
    const b = without.metrics;
    expectClose(a.bypassTime, b.bypassTime ?? NaN, 1e-9);
    expectClose(a.peakCurrentAfterBypass, b.peakCurrentAfterBypass ?? NaN, 1e-8);
    expectClose(a.peakCapacitorVoltage.value, b.peakCapacitorVoltage.value, 1e-9);
    expectClose(a.i2t, b.i2t, 1e-8);
    expectClose(a.i2tAfterBypass, b.i2tAfterBypass ?? NaN, 1e-7);
    expectClose(a.prechargeEnergy, b.prechargeEnergy, 1e-8);
    expectClose(a.finalCapacitorVoltage, b.finalCapacitorVoltage, 1e-10);
  });

  it('latches at its undervoltage threshold when it switches on below the lower operating point', () => {
    // [der] With L = 0 the charging current is (Vs − v)/R; the load can be fed where (Vs − v)/R ≥ P/v,
    // i.e. between the roots of v² − Vs·v + R·P = 0: 40 V and 60 V for 100 V, 10 Ω, 240 W. Switching on
    // at U = 30 V it would pull the bus back under U: it chatters at U, which the engine takes as the
    // bus held at U (the load drawing the whole 7 A charging current), and says so.
    const { metrics, phases, warnings } = check({
      source: { voltage: 100, resistance: 10 },
      capacitor: { capacitance: '1 mF' },
      load: { kind: 'power', value: 240, undervoltage: 30 },
      duration: 0.2,
    });
    expect(phases.map((p) => p.load)).toEqual(['off', 'slide']);
    // Off until vC = 30 V: t = RC·ln(100/70).
    expectClose(phases[1].start, 10e-3 * Math.log(100 / 70), 1e-10);
    expectClose(metrics.finalCapacitorVoltage, 30, 1e-12);
    expectClose(metrics.steadyStateVoltage, 60, 1e-14);
    expect(warnings.join(' ')).toMatch(/held at its undervoltage threshold/);
  });

  it('matches a small independent integration through the undervoltage switch-on', () => {
    // Independent check written here: classic RK4 at 1e5 steps, the load on when vC ≥ U at the
    // start of each step (first-order in the switching instant, ~1e−5 relative on the peaks).
    const vs = 96;
    const R = 0.1;
    const L = 20e-6;
    const C = 220e-6;
    const Rd = 0.3;
    const Cd = 1e-3;
    const P = 1000;
    const U = 48;
    const T = 4e-3;
    const result = check({
      source: { voltage: vs, resistance: R, inductance: L },
      capacitor: { capacitance: C },
      damping: { resistance: Rd, capacitance: Cd },
      load: { kind: 'power', value: P, undervoltage: U },
      duration: T,
    });
    const f = (y: number[], on: boolean) => {
      const [i, v, vd] = y;
      const iD = (v - vd) / Rd;
      return [(vs - R * i - v) / L, (i - iD - (on ? P / v : 0)) / C, iD / Cd];
    };
    let y = [0, 0, 0];
    let peak = -Infinity;
    let peakI = 0;
    const n = 100_000;
    const h = T / n;
    for (let k = 0; k < n; k++) {
      const on = y[1] >= U;
      const k1 = f(y, on);
      const k2 = f(
        y.map((x, j) => x + (h / 2) * k1[j]),
        on,
      );
      const k3 = f(
        y.map((x, j) => x + (h / 2) * k2[j]),
        on,
      );
      const k4 = f(
        y.map((x, j) => x + h * k3[j]),
        on,
      );
      y = y.map((x, j) => x + (h / 6) * (k1[j] + 2 * k2[j] + 2 * k3[j] + k4[j]));
      peak = Math.max(peak, y[1]);
      peakI = Math.max(peakI, Math.abs(y[0]));
    }
    expectClose(result.metrics.peakCapacitorVoltage.value, peak, 2e-5);
    expectClose(result.metrics.peakCurrent.value, peakI, 2e-5);
    expectClose(result.metrics.finalCapacitorVoltage, y[1], 2e-5);
  });
});
