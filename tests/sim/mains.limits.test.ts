/**
 * The mains engine against hand-checkable limits. Each case names where its value comes from:
 * REFERENCE.md sections with their tags ([der] derived, shown here; [pub] published), or common
 * practice.
 */
import { compareColdHot } from '@/sim/mains/coldHot';
import { mainsChecks } from '@/sim/mains/checks';
import { ntcResistance } from '@/sim/mains/ntc';
import { mainsPreset } from '@/sim/mains/preset';
import { parseMainsDesign, type MainsDesignInput } from '@/sim/mains/schema';
import { simulateMains } from '@/sim/mains/simulate';
import { sweepSwitchOnAngle } from '@/sim/mains/sweep';

import { expectClose } from '../helpers/expectClose';

const VRMS = 230;
const VPK = Math.SQRT2 * VRMS;

/** The limits need one solver; the solvers' agreement is tests/sim/mains.solvers.test.ts's. */
function run(input: MainsDesignInput, options: Parameters<typeof simulateMains>[1] = {}) {
  return simulateMains(parseMainsDesign(input), { crossCheck: false, ...options });
}

/** Resistor only, ideal diodes, no line inductance, capacitor empty. */
const resistive = (extra: Partial<MainsDesignInput['mains']> = {}, duration = 0.1): MainsDesignInput => ({
  mains: { voltage: VRMS, lineResistance: 10, ...extra },
  capacitor: { capacitance: '470 µF' },
  duration,
});

describe('peak inrush with only resistance in the loop', () => {
  it('is √2·Vrms/R when switched on at the mains peak (REFERENCE §7 [der])', () => {
    // Derivation: at θ = 90° the source is at its peak √2·V at t = 0 while C is empty; with L = 0
    // and ideal diodes i(0+) = √2·V/R, and i only falls after (C charges, the source falls).
    const result = run(resistive({ angle: 90 }));
    expectClose(result.metrics.peakCurrent.value, VPK / 10, 1e-12);
    expect(result.metrics.peakCurrent.time).toBe(0);
  });

  it('tends to √2·Vrms/R as the line inductance goes to 0 (REFERENCE §7 [der])', () => {
    const errors = [1e-4, 1e-5, 1e-6, 1e-7].map(
      (L) => 1 - run(resistive({ angle: 90, lineInductance: L }, 0.02)).metrics.peakCurrent.value / (VPK / 10),
    );
    for (let k = 1; k < errors.length; k++) expect(errors[k]).toBeLessThan(errors[k - 1]);
    expect(errors[0]).toBeGreaterThan(0);
    // The inductance delays the rise by about L/R, while C takes charge: an O(L) shortfall.
    expect(errors[3]).toBeLessThan(1e-4);
  });

  it('is smallest when switched on at a zero crossing and largest at the peak (sweep; REFERENCE §7 [der])', () => {
    // With the charge fast against the mains (ωRC = 0.15 here) the capacitor follows the source from
    // a zero crossing and draws about C·dv/dt; at the peak it takes the whole step √2·V. (With a slow
    // charge, ωRC ≈ 1.5, the smallest inrush moves to late in the half-cycle: the sweep finds it.)
    const design = parseMainsDesign(resistive({ lineResistance: 1 }));
    const sweep = sweepSwitchOnAngle(design, { from: 0, to: 180, step: 5 });
    expect(sweep.points).toHaveLength(37);
    const smallest = sweep.points.reduce((best, p) => (p.peakCurrent < best.peakCurrent ? p : best));
    // The smallest is at a zero crossing, to within the sweep's step (just before it the source is
    // already falling towards the crossing), and an order of magnitude below the worst.
    expect(Math.min(smallest.angle, 180 - smallest.angle)).toBeLessThanOrEqual(5);
    expect(sweep.points[0].peakCurrent).toBeLessThan(1.01 * smallest.peakCurrent);
    expectClose(sweep.points[36].peakCurrent, sweep.points[0].peakCurrent, 1e-9); // 180°: the falling zero crossing, the same by symmetry
    expect(sweep.points[0].peakCurrent).toBeLessThan(0.15 * sweep.worst.peakCurrent);
    expect(sweep.worst.refined).toBe(true);
    expectClose(sweep.worst.angle, 90, 0, 0.05);
    expectClose(sweep.worst.peakCurrent, VPK / 1, 1e-6);
  });

  it('three-phase: peaks at √2·V_LL/R at the worst angle (REFERENCE §7 [der], the largest line-to-line voltage drives the bridge)', () => {
    const design = parseMainsDesign({
      mains: { kind: 'three-phase', voltage: '400 V', limiter: { kind: 'resistor', resistance: '5 Ω' } },
      capacitor: { capacitance: '470 µF' },
      duration: '40 ms',
    });
    const sweep = sweepSwitchOnAngle(design);
    expectClose(sweep.worst.peakCurrent, (Math.SQRT2 * 400) / 5, 1e-6);
    // The line-to-line peaks repeat every 60°: with v_ab = √2·V·sin(ωt + θ), at θ = 30°, 90°, 150°.
    const offset = Math.min(...[30, 90, 150].map((a) => Math.abs(sweep.worst.angle - a)));
    expect(offset).toBeLessThan(0.05);
  });

  it('three-phase: two line resistances are in the loop', () => {
    const result = run({
      mains: { kind: 'three-phase', voltage: '400 V', angle: 90, lineResistance: '2 Ω' },
      capacitor: { capacitance: '470 µF' },
      duration: '20 ms',
    });
    expectClose(result.metrics.peakCurrent.value, (Math.SQRT2 * 400) / 4, 1e-12);
  });
});

describe('charge and energy', () => {
  it('charges the capacitor to about √2·Vrms − 2·Vf after a few cycles, never above it (L = 0) (REFERENCE §7 [der])', () => {
    // Derivation: conduction stops when the current returns to 0, i.e. when vC meets |v_s| − 2·Vf,
    // whose largest value is √2·V − 2·Vf; a light load (100 kΩ) then only adds a ripple of
    // I/(2fC) ≈ 3.2 mA/(100 Hz · 470 µF) ≈ 0.07 V.
    const target = VPK - 2 * 1;
    const result = run({
      mains: { voltage: VRMS, lineResistance: 1, diode: { forwardVoltage: '1 V' } },
      capacitor: { capacitance: '470 µF' },
      load: { kind: 'resistance', value: '100 kΩ' },
    });
    expect(result.metrics.peakCapacitorVoltage.value).toBeLessThanOrEqual(target * (1 + 1e-12));
    expectClose(result.metrics.finalCapacitorVoltage, target, 2e-3);
    expect(result.metrics.steadyStateVoltage).toBe(target);
  });

  it('a charge at the mains peak through R lets through ½·C·V²/R, to O((ωRC)²) (REFERENCE §1 [der])', () => {
    // REFERENCE §1: any step charge through a series R has ∫i² dt = ½·C·ΔV²/R and dissipates ½·C·ΔV².
    // At θ = 90° the source is a step to √2·V that then falls as cos ωt: the charge ends a few RC
    // later, when the source has fallen by about (ωt)²/2, so the error is of order (ωRC)².
    const omega = 2 * Math.PI * 50;
    for (const C of [100e-6, 10e-6]) {
      const result = run({
        mains: { voltage: VRMS, angle: 90, limiter: { kind: 'resistor', resistance: '1 Ω' } },
        capacitor: { capacitance: C },
        duration: '5 ms',
      });
      const half = 0.5 * C * VPK * VPK;
      const bound = 3 * (omega * C) ** 2;
      expectClose(result.metrics.diodePulseI2t, half, bound);
      // The limiter is the whole loop: it absorbs the loop's ½·C·V².
      expectClose(result.metrics.limiterEnergy, half, bound);
      expectClose(result.metrics.prechargeEnergy, result.metrics.limiterEnergy, 0);
    }
  });

  it('gives each diode its own half-cycles: D1 = D4, D2 = D3, and the two pairs add up to the line (derived)', () => {
    const result = run({
      mains: { voltage: VRMS, angle: 30, lineResistance: '0.5 Ω', lineInductance: '0.2 mH' },
      capacitor: { capacitance: '470 µF' },
      load: { kind: 'resistance', value: '500 Ω' },
    });
    const [d1, d2, d3, d4] = result.metrics.diodes;
    expect(result.metrics.diodes.map((d) => d.name)).toEqual(['D1', 'D2', 'D3', 'D4']);
    expectClose(d1.i2t, d4.i2t, 1e-15);
    expectClose(d2.i2t, d3.i2t, 1e-15);
    expectClose(d1.i2t + d2.i2t, result.metrics.i2t, 1e-12);
    expect(d1.pulses + d2.pulses).toBe(result.metrics.conductionPulses);
    expect(result.metrics.diodeI2t).toBe(Math.max(d1.i2t, d2.i2t));
    // Half-sine equivalence for IFSM: I²t = I²·t/2 over t = 10 ms at 50 Hz (REFERENCE §5 [der]).
    expectClose(result.metrics.surgeEquivalentCurrent, Math.sqrt((2 * result.metrics.diodePulseI2t) / 0.01), 1e-15);
  });

  it('three-phase: each diode conducts 120° in two pairs; a line carries its upper and lower diode (derived)', () => {
    const result = run({
      mains: { kind: 'three-phase', voltage: '400 V', angle: 10, lineResistance: '0.2 Ω', lineInductance: '50 µH' },
      capacitor: { capacitance: '470 µF' },
      load: { kind: 'resistance', value: '100 Ω' },
      duration: '60 ms',
    });
    const byName = Object.fromEntries(result.metrics.diodes.map((d) => [d.name, d.i2t]));
    const upper = byName['Da+'] + byName['Db+'] + byName['Dc+'];
    const lower = byName['Da−'] + byName['Db−'] + byName['Dc−'];
    expectClose(upper, result.metrics.dcI2t, 1e-12);
    expectClose(lower, result.metrics.dcI2t, 1e-12);
    for (const [k, phase] of ['a', 'b', 'c'].entries()) {
      expectClose(result.metrics.lineI2t[k].i2t, byName[`D${phase}+`] + byName[`D${phase}−`], 1e-12);
    }
    expect(result.metrics.i2t).toBe(Math.max(...result.metrics.lineI2t.map((l) => l.i2t)));
  });
});

describe('the NTC limiter', () => {
  it('follows the β-law at two temperatures (β-parameter model, standard thermistor texts; REFERENCE §7 [pub])', () => {
    // R(T) = R25·exp[β(1/T − 1/298.15 K)], R25 = 10 Ω, β = 3435 K:
    //  100 °C: 1/373.15 − 1/298.15 = −6.74130e−4 K⁻¹; × 3435 K = −2.31564; e^−2.31564 = 0.098704 → 0.98704 Ω
    //    0 °C: 1/273.15 − 1/298.15 = +3.06976e−4 K⁻¹; × 3435 K = +1.05446; e^1.05446 = 2.87043 → 28.704 Ω
    expectClose(ntcResistance(10, 3435, 373.15), 0.98704, 2e-5);
    expectClose(ntcResistance(10, 3435, 273.15), 28.704, 2e-5);
    expect(ntcResistance(10, 3435, 298.15)).toBe(10);
  });

  it('sets the inrush of a fixed-temperature NTC through that resistance', () => {
    const result = run({
      mains: { voltage: VRMS, angle: 90, limiter: { kind: 'ntc', r25: '10 Ω', beta: '3435 K', startTemperature: '100 °C' } },
      capacitor: { capacitance: '470 µF' },
      duration: '20 ms',
    });
    const r = ntcResistance(10, 3435, 373.15);
    expectClose(result.metrics.limiterStartResistance, r, 1e-15);
    expectClose(result.metrics.peakCurrent.value, VPK / r, 1e-12);
    expectClose(result.metrics.prechargePeakPower, (VPK * VPK) / r, 1e-12);
  });

  it('hot restart gives a larger inrush than a cold start (REFERENCE §7 [pub]: a hot NTC limits little)', () => {
    const design = parseMainsDesign({
      mains: {
        voltage: VRMS,
        lineResistance: '0.3 Ω',
        lineInductance: '50 µH',
        limiter: { kind: 'ntc', r25: '10 Ω', beta: '3500 K' },
      },
      capacitor: { capacitance: '470 µF' },
      duration: '60 ms',
    });
    const comparison = compareColdHot(design, { hot: '110 °C', sweep: { step: 15 } });
    expectClose(comparison.cold.startTemperature, 298.15, 1e-15);
    expectClose(comparison.hot.startTemperature, 383.15, 1e-15);
    expectClose(comparison.hot.limiterResistance, ntcResistance(10, 3500, 383.15), 1e-15);
    expect(comparison.hot.result.metrics.peakCurrent.value).toBeGreaterThan(3 * comparison.cold.result.metrics.peakCurrent.value);
    expect(comparison.hot.result.metrics.i2t).toBeGreaterThan(comparison.cold.result.metrics.i2t);
    // Each full run is at its own worst angle, and repeats the sweep's value there.
    for (const side of [comparison.cold, comparison.hot]) {
      expect(side.angle).toBe(side.sweep.worst.angle);
      expectClose(side.result.metrics.peakCurrent.value, side.sweep.worst.peakCurrent, 1e-12);
    }
  });

  it('with its thermal model, heats by the energy it absorbs: C_th·ΔT = E when it loses no heat (derived)', () => {
    // Derivation: C_th·dT/dt = i²R − δ(T − T_amb); with δ → 0, C_th·(T_end − T_start) = ∫i²R dt = E.
    const base: MainsDesignInput = {
      mains: {
        voltage: VRMS,
        angle: 90,
        lineResistance: '0.2 Ω',
        lineInductance: '0.5 mH',
        limiter: {
          kind: 'ntc',
          r25: '10 Ω',
          beta: '3500 K',
          thermal: { heatCapacity: '0.5 J/K', dissipationConstant: '1 nW/K' },
        },
      },
      capacitor: { capacitance: '470 µF', esr: '0.1 Ω' },
      duration: '60 ms',
    };
    const result = run(base);
    expect(result.solvers.waveformFrom).toBe('odex');
    const m = result.metrics;
    expectClose(0.5 * ((m.finalLimiterTemperature ?? 0) - 298.15), m.limiterEnergy, 1e-6);
    expect(m.finalLimiterTemperature).toBeGreaterThan(320);
    // Its resistance only falls as it heats, so it lets more through than one held at 25 °C.
    const fixed = run({ ...base, mains: { ...base.mains, limiter: { kind: 'ntc', r25: '10 Ω', beta: '3500 K' } } });
    expect(m.peakCurrent.value).toBeGreaterThanOrEqual(fixed.metrics.peakCurrent.value * (1 - 1e-9));
    expect(m.i2t).toBeGreaterThan(fixed.metrics.i2t);
    expect(result.waveform.limiterTemperature?.[result.waveform.t.length - 1]).toBeCloseTo(m.finalLimiterTemperature ?? 0, 6);
  });
});

describe('the bypass relay', () => {
  it('takes the limiter out at its delay: the limiter absorbs only what it did before (derived)', () => {
    const limiter = { kind: 'resistor' as const, resistance: '22 Ω' };
    const mains = { voltage: VRMS, angle: 90, lineResistance: '0.3 Ω', lineInductance: '0.1 mH' };
    const withRelay = run({
      mains: { ...mains, limiter: { ...limiter, bypass: { delay: '30 ms' } } },
      capacitor: { capacitance: '470 µF' },
      load: { kind: 'resistance', value: '300 Ω' },
      duration: '80 ms',
    });
    const upToDelay = run({
      mains: { ...mains, limiter },
      capacitor: { capacitance: '470 µF' },
      load: { kind: 'resistance', value: '300 Ω' },
      duration: '30 ms',
    });
    expect(withRelay.metrics.bypassTime).toBe(0.03);
    expectClose(withRelay.metrics.limiterEnergy, upToDelay.metrics.limiterEnergy, 1e-12);
    expect(withRelay.metrics.peakCurrentAfterBypass).toBeGreaterThan(0);
    expect(withRelay.events.some((e) => e.kind === 'bypass' && e.time === 0.03)).toBe(true);
    const checks = mainsChecks(
      parseMainsDesign({
        mains: { ...mains, limiter: { ...limiter, bypass: { delay: '30 ms' } } },
        capacitor: { capacitance: '470 µF' },
        duration: '80 ms',
      }),
      withRelay,
    );
    expect(checks.find((c) => c.id === 'precharge-continuous-power')?.message).toContain('relay bypasses the limiter');
  });
});

describe('ratings mapping', () => {
  const design = parseMainsDesign(mainsPreset);
  const result = simulateMains(design, { crossCheck: false });
  const checks = mainsChecks(design, result);
  const byId = Object.fromEntries(checks.map((c) => [c.id, c]));

  it("feeds the diode checks the half-sine-equivalent surge current and the worst diode's I²t", () => {
    expect(byId['diode-surge-current'].value).toBe(result.metrics.surgeEquivalentCurrent);
    expect(byId['diode-surge-current'].basis).toContain('10 ms half-sine');
    expect(byId['diode-i2t'].value).toBe(result.metrics.diodeI2t);
    expect(result.metrics.diodeI2t).toBeLessThan(result.metrics.i2t);
  });

  it('reads the limiter as the precharge resistor, and the line I²t for the fuse', () => {
    expect(byId['precharge-pulse-energy'].value).toBe(result.metrics.limiterEnergy);
    expect(byId['precharge-peak-power'].value).toBe(result.metrics.limiterPeakPower?.value);
    expect(byId['precharge-continuous-power'].value).toBe(result.metrics.limiterContinuousPower);
    expect(byId['fuse-i2t'].value).toBe(result.metrics.i2t);
    expect(byId['capacitor-voltage'].value).toBe(result.metrics.peakCapacitorVoltage.value);
    expect(byId.discharge).toBeDefined();
    expect(checks.every((c) => ['pass', 'warn', 'fail', 'not-checked'].includes(c.status))).toBe(true);
  });

  it('says the limiter checks do not apply without a limiter', () => {
    const plain = parseMainsDesign({ ...resistive(), ratings: { prechargePulseEnergy: '10 J' } });
    const plainChecks = mainsChecks(plain, simulateMains(plain, { crossCheck: false }));
    const pulse = plainChecks.find((c) => c.id === 'precharge-pulse-energy');
    expect(pulse?.status).toBe('not-checked');
    expect(pulse?.message).toContain('no inrush limiter');
  });
});
