import type { Design } from '@/sim/design';
import { DesignError } from '@/sim/errors';
import type { Metrics } from '@/sim/metrics';
import {
  E12,
  E24,
  energyToFraction,
  largestResistanceForTime,
  largestResistanceReachingThreshold,
  rcCharge,
  sizePrecharge,
  standardValuesBetween,
  stepChargeI2t,
  stepCurrentPeak,
  timeToFraction,
  type PrechargeSizingInput,
  type SimulateFn,
} from '@/sim/precharge';

function expectClose(actual: number | null | undefined, expected: number, relTol: number, absTol = 0) {
  expect(actual).not.toBeNull();
  expect(actual).not.toBeUndefined();
  const error = Math.abs((actual as number) - expected);
  if (error > Math.max(absTol, relTol * Math.abs(expected))) {
    throw new Error(`expected ${actual} to be within ${relTol} (rel) / ${absTol} (abs) of ${expected}`);
  }
}

/**
 * A stand-in for the engine: the first-order RC answer, so that these tests see exactly which design
 * the sizer asks for. The real engine is exercised in precharge.engine.test.ts.
 */
function fakeEngine() {
  const seen: Design[] = [];
  const simulate: SimulateFn = (design) => {
    seen.push(design);
    const r = design.precharge!.resistance;
    const v = design.source.voltage;
    const c = design.capacitor.capacitance;
    const k = design.precharge!.bypass!.fraction;
    const t = r * c * Math.log(1 / (1 - k)) + design.precharge!.bypass!.delay;
    const peak = { value: v, time: t };
    const metrics = {
      peakCapacitorVoltage: peak,
      minCapacitorVoltage: { value: 0, time: 0 },
      peakBusVoltage: peak,
      peakCurrent: { value: v / r, time: 0 },
      i2t: 0,
      prechargeEnergy: energyToFraction(c, v, k),
      prechargePeakPower: (v * v) / r,
      bypassTime: t,
      residualStep: (1 - k) * v,
      peakCurrentAfterBypass: 100,
      i2tAfterBypass: 10,
      finalCapacitorVoltage: v,
      steadyStateVoltage: v,
    } as unknown as Metrics;
    return { metrics, warnings: [] };
  };
  return { simulate, seen };
}

describe('RC precharge formulas', () => {
  it('reach 95 % in 2.996 RC and 99.33 % in 5 RC', () => {
    // Standard circuit texts (REFERENCE §2 [pub]): t = RC·ln(1/(1−k)).
    expectClose(timeToFraction(1, 1, 0.95), 2.996, 2e-4);
    expectClose(1 - Math.exp(-5), 0.9933, 1e-4);
    expectClose(timeToFraction(47, 470e-6, 1 - Math.exp(-5)), 5 * 47 * 470e-6, 1e-12);
  });

  it('dissipate C·V²·(k − k²/2) in the resistor, ½CV² for a full charge', () => {
    // Derived (REFERENCE §2 [der]): ∫(V−v)²/R dt from 0 to t_k with v = V(1 − e^(−t/RC)).
    expectClose(energyToFraction(1e-3, 400, 1), 0.5 * 1e-3 * 400 * 400, 1e-12);
    // 400 V, 1 mF, 95 %: 160·(0.95 − 0.45125) = 79.8 J.
    expectClose(energyToFraction(1e-3, 400, 0.95), 79.8, 1e-12);
    // Numerical check of the same integral (trapezoid, 20 000 steps).
    const r = 47;
    const c = 1e-3;
    const tk = timeToFraction(r, c, 0.95);
    let sum = 0;
    const n = 20000;
    for (let j = 0; j < n; j += 1) {
      const p = (t: number) => (400 * Math.exp(-t / (r * c))) ** 2 / r;
      sum += ((p((j * tk) / n) + p(((j + 1) * tk) / n)) / 2) * (tk / n);
    }
    expectClose(sum, 79.8, 1e-6);
  });

  it('with a load current reach kV only if I_L·R < (1−k)V, after RC·ln[(V − I_L R)/(V − I_L R − kV)]', () => {
    // REFERENCE §2 [der]. 400 V, 47 Ω, 1 mF, 1 A: (400 − 47)/(400 − 47 − 380) < 0 → never; 0.2 A: ln(390.6/10.6).
    expect(rcCharge(47, 1e-3, 400, 0.95, { loadCurrent: 1 }).timeToThreshold).toBeNull();
    expectClose(
      rcCharge(47, 1e-3, 400, 0.95, { loadCurrent: 0.2 }).timeToThreshold,
      47e-3 * Math.log((400 - 9.4) / (400 - 9.4 - 380)),
      1e-12,
    );
    // Threshold reachable below (1−k)V/I_L = 20 Ω·… : 400·0.05/1 = 20 Ω.
    expectClose(largestResistanceReachingThreshold(400, 0.95, { loadCurrent: 1 }), 20, 1e-12);
    // A bleeder Rp alone: reachable below Rp(1−k)/k.
    expectClose(largestResistanceReachingThreshold(400, 0.95, { parallelResistance: 1900 }), 100, 1e-12);
  });

  it('solve the time limit for R with a load, and give the closed form without one', () => {
    expectClose(largestResistanceForTime(2, 1.128e-3, 880, 0.95), 2 / (1.128e-3 * Math.log(20)), 1e-12);
    // 0.5 A and a 10 kΩ bleeder: the threshold stays reachable below 74.6 Ω; 0.2 s lands near 58 Ω.
    const load = { loadCurrent: 0.5, parallelResistance: 10e3 };
    const r = largestResistanceForTime(0.2, 1e-3, 400, 0.9, load);
    expect(r).toBeGreaterThan(50);
    expect(r).toBeLessThan(largestResistanceReachingThreshold(400, 0.9, load));
    expectClose(rcCharge(r, 1e-3, 400, 0.9, load).timeToThreshold, 0.2, 1e-9);
  });

  it('put ½CΔV²/R_loop into the loop when the bypass closes: 20 A²s against 0.16 A²s', () => {
    // REFERENCE §2 [der]: 400 V, 1 mF, 95 %, 10 mΩ → ΔV = 20 V, ½·1e-3·400/0.01 = 20 A²s. The
    // precharge's own I²t is C·V²(k − k²/2)/R = 79.8/R: 0.16 A²s for R = 500 Ω (R derived, not given).
    expectClose(stepChargeI2t(20, 1e-3, 0.01), 20, 1e-12);
    expectClose(energyToFraction(1e-3, 400, 0.95) / 500, 0.16, 0.003);
  });

  it('peak the bypass inrush as the series RLC step response does', () => {
    // REFERENCE §1 case A (Nilsson & Riedel example values [mem], recomputed [der]): 48 V, 280 Ω,
    // 0.1 H, 0.4 µF from rest: i_pk = 65.96 mA.
    expectClose(stepCurrentPeak(48, 280, 0.1, 0.4e-6), 65.96e-3, 1e-4);
    // Critically damped (REFERENCE §1 [der]): 2Vs/(e·R). R = 2√(L/C) = 2·√(1e-5/1e-3) = 0.2 Ω.
    expectClose(stepCurrentPeak(20, 0.2, 1e-5, 1e-3), (2 * 20) / (Math.E * 0.2), 1e-9);
    // Undamped from rest (REFERENCE §1): Vs·√(C/L).
    expectClose(stepCurrentPeak(20, 0, 1e-5, 1e-3), 20 * Math.sqrt(1e-3 / 1e-5), 1e-12);
    // Heavily overdamped tends to ΔV/R; L = 0 is exactly ΔV/R.
    expectClose(stepCurrentPeak(20, 10, 1e-9, 1e-3), 2, 1e-6);
    expect(stepCurrentPeak(20, 10, 0, 1e-3)).toBe(2);
  });
});

describe('E-series', () => {
  it('holds the IEC 60063:2015 mantissas', () => {
    // IEC 60063:2015, E12 and E24 tables [pub].
    expect(E12).toEqual([10, 12, 15, 18, 22, 27, 33, 39, 47, 56, 68, 82]);
    expect(E24.length).toBe(24);
    expect(E24.filter((m) => (E12 as readonly number[]).includes(m)).length).toBe(12);
  });

  it('lists each value once, E12 where it is in both, and keeps window edges inclusive', () => {
    const values = standardValuesBetween(4.7, 10);
    expect(values.map((v) => v.resistance)).toEqual([4.7, 5.1, 5.6, 6.2, 6.8, 7.5, 8.2, 9.1, 10]);
    expect(values.map((v) => v.series)).toEqual(['E12', 'E24', 'E12', 'E24', 'E12', 'E24', 'E12', 'E24', 'E12']);
    expect(standardValuesBetween(1e3, 1.5e3, ['E12']).map((v) => v.resistance)).toEqual([1000, 1200, 1500]);
  });
});

// Hand-worked example (derived): 800 V ±10 %, 940 µF ±20 %, 20 A, 2 s, k = 0.95, no delay.
//   Vmax = 880 V, Vmin = 720 V, Cmax = 1.128 mF.
//   Rmin = Vmax/Imax = 880/20 = 44 Ω.
//   Rmax = tmax/(Cmax·ln(1/(1−k))) = 2/(1.128e-3 · ln 20) = 2/(1.128e-3 · 2.995732) = 591.86 Ω.
//   With a 5 % resistor a value R fits if 0.95R ≥ 44 and 1.05R ≤ 591.86: 46.3 Ω ≤ R ≤ 563.7 Ω,
//   i.e. the E24 values 47 … 560 Ω: 27 of them (14 of which are E12).
//   Most room to both: R ≈ √(44·591.86/(0.95·1.05)) = 161.6 Ω → 160 Ω with 152/44 = 3.45× and
//   591.86/168 = 3.52×, so the current limit is the nearer one.
//   At 160 Ω (stress corner 880 V, 1.128 mF): 5.5 A, 4.84 kW, 1.128e-3·880²·0.49875 = 435.7 J per
//   attempt, 1307 J for 3, residual 44 V, t = 160·1.128e-3·ln 20 = 0.5407 s,
//   bypass I²t = ½·1.128e-3·44²/0.01 = 109.2 A²s.
const depot: PrechargeSizingInput = {
  busVoltage: '800 V',
  busVoltageTolerance: '±10 %',
  capacitance: '940 µF',
  capacitanceTolerance: '20 %',
  maxInrushCurrent: '20 A',
  maxPrechargeTime: '2 s',
  bypassThreshold: '95 %',
  attempts: 3,
  seriesInductance: '10 µH',
  loopResistance: '10 mΩ',
};

describe('precharge window', () => {
  it('is [44 Ω, 591.9 Ω] for the hand-worked depot charger example', () => {
    const { simulate } = fakeEngine();
    const result = sizePrecharge(depot, simulate);
    expectClose(result.window?.min, 44, 1e-12);
    expectClose(result.window?.max, 591.86, 1e-5);
    expect(result.corners.busVoltage).toEqual({ nominal: 800, min: 720, max: 880 });
    expectClose(result.corners.capacitance.max, 1.128e-3, 1e-12);
    expect(result.limits.current.explanation).toMatch(/at least 44 Ω \(880 V at the top of the bus tolerance \/ 20 A\)/);
    expect(result.limits.time.explanation).toMatch(/at most 592 Ω/);
  });

  it('proposes the 27 standard values from 47 Ω to 560 Ω, each re-simulated at 880 V and 1.128 mF', () => {
    const { simulate, seen } = fakeEngine();
    const result = sizePrecharge(depot, simulate);
    expect(result.candidates.map((c) => c.resistance)).toEqual([
      47, 51, 56, 62, 68, 75, 82, 91, 100, 110, 120, 130, 150, 160, 180, 200, 220, 240, 270, 300, 330, 360, 390, 430, 470, 510,
      560,
    ]);
    expect(result.candidates.filter((c) => c.series === 'E12').length).toBe(14);
    expect(result.simulations).toBe(27);
    expect(seen.map((d) => d.precharge!.resistance)).toEqual(result.candidates.map((c) => c.resistance));
    for (const d of seen) {
      expect(d.source.voltage).toBe(880);
      expectClose(d.capacitor.capacitance, 1.128e-3, 1e-12);
      expect(d.precharge!.bypass).toMatchObject({ when: 'voltage', fraction: 0.95, delay: 0 });
    }
    for (const c of result.candidates) {
      expect(c.simulated).not.toBeNull();
      expect(c.simulatedWithinLimits).toBe(true);
    }
  });

  it('gives first-order figures per value and recommends 160 Ω, nearer the current limit', () => {
    const { simulate } = fakeEngine();
    const result = sizePrecharge(depot, simulate);
    expect(result.recommended).toBe(160);
    expect(result.binding).toBe('current');
    const c = result.candidates.find((x) => x.resistance === 160)!;
    expectClose(c.estimate.peakCurrent, 5.5, 1e-12);
    expectClose(c.estimate.peakPower, 4840, 1e-12);
    expectClose(c.estimate.energyPerAttempt, 435.67, 1e-4);
    expectClose(c.estimate.energyForAttempts, 3 * 435.67, 1e-4);
    expectClose(c.estimate.residualStep, 44, 1e-9);
    expectClose(c.estimate.prechargeTime, 0.5407, 1e-3);
    expectClose(c.estimate.bypassI2t, 109.2, 1e-3);
    expectClose(c.headroom.current, 3.4545, 1e-4);
    expectClose(c.headroom.time, 3.523, 1e-3);
    // One attempt into a shorted link for the whole 2 s: 4840 W · 2 s.
    expectClose(c.estimate.energyIntoShortPerAttempt, 9680, 1e-12);
  });

  it('adds the contactor delay to the precharge time', () => {
    // 0.5 s delay leaves 1.5 s: Rmax = 1.5/(1.128e-3·ln 20) = 443.9 Ω.
    const { simulate } = fakeEngine();
    const result = sizePrecharge({ ...depot, contactorDelay: '500 ms' }, simulate);
    expectClose(result.window?.max, 1.5 / (1.128e-3 * Math.log(20)), 1e-9);
    expect(Math.max(...result.candidates.map((c) => c.resistance))).toBe(390);
  });

  it('says why nothing fits when the time limit needs less than the current limit allows', () => {
    // Derived: 400 V, 1 mF, 20 A → Rmin = 20 Ω; 36 ms to 95 % → Rmax = 0.036/(1e-3·ln 20) = 12.02 Ω.
    const { simulate, seen } = fakeEngine();
    const result = sizePrecharge(
      {
        busVoltage: 400,
        capacitance: '1 mF',
        maxInrushCurrent: 20,
        maxPrechargeTime: '36 ms',
        bypassThreshold: 0.95,
        seriesInductance: '5 µH',
      },
      simulate,
    );
    expect(result.window).toBeNull();
    expect(result.candidates).toEqual([]);
    expect(result.binding).toBe('both');
    expect(result.reason).toBe(
      'The time limit needs ≤ 12 Ω but the current limit needs ≥ 20 Ω: raise the time limit, lower C, allow more inrush, or use an active precharge.',
    );
    expect(seen.length).toBe(0);
  });

  it('says so when a load keeps the threshold out of reach of every resistance the current limit allows', () => {
    // 5 A drawn through R: 95 % of 400 V is reachable only below 0.05·400/5 = 4 Ω (REFERENCE §2); Rmin = 20 Ω.
    const { simulate } = fakeEngine();
    const result = sizePrecharge(
      {
        busVoltage: 400,
        capacitance: '1 mF',
        maxInrushCurrent: 20,
        maxPrechargeTime: '1 s',
        bypassThreshold: 0.95,
        seriesInductance: '5 µH',
        load: { kind: 'current', value: '5 A' },
      },
      simulate,
    );
    expect(result.binding).toBe('threshold');
    expectClose(result.limits.threshold.maxResistance, 4, 1e-12);
    expect(result.reason).toMatch(/only below 4 Ω, but the current limit needs ≥ 20 Ω/);
  });

  it('treats a zero load current as no load', () => {
    const { simulate } = fakeEngine();
    const a = sizePrecharge(depot, simulate);
    const b = sizePrecharge({ ...depot, load: { kind: 'current', value: 0 } }, simulate);
    expect(b.window).toEqual(a.window);
  });

  it('says when the contactor delay alone uses the time limit', () => {
    const { simulate } = fakeEngine();
    const result = sizePrecharge({ ...depot, contactorDelay: '2 s' }, simulate);
    expect(result.binding).toBe('delay');
    expect(result.reason).toMatch(/contactor delay alone/);
  });

  it('says when the window holds no standard value for the resistor tolerance', () => {
    // 45–47.5 Ω: 47 Ω fits with 0 % but not with 5 % (44.65 Ω < 45 Ω).
    const { simulate } = fakeEngine();
    const base = {
      busVoltage: 900,
      capacitance: '1 mF',
      maxInrushCurrent: 20,
      maxPrechargeTime: 47.5e-3 * Math.log(20),
      bypassThreshold: 0.95,
      seriesInductance: '5 µH',
    };
    expect(sizePrecharge(base, simulate).reason).toMatch(/No E12 or E24 value fits between 45 Ω and 47\.5 Ω with a 5 % resistor/);
    expect(sizePrecharge({ ...base, resistorTolerance: 0 }, simulate).candidates.map((c) => c.resistance)).toEqual([47]);
  });

  it('keeps to 30 simulations on a wide window', () => {
    const { simulate } = fakeEngine();
    const result = sizePrecharge({ ...depot, maxInrushCurrent: '200 A', maxPrechargeTime: '60 s' }, simulate);
    expect(result.simulations).toBeLessThanOrEqual(30);
    expect(result.notes.join(' ')).toMatch(/E12/);
  });
});

describe('a chosen resistor', () => {
  it('is checked against its pulse-energy rating with the policy derating, per attempt and for all attempts', () => {
    // 160 Ω at the stress corner: 435.7 J per attempt (derived above), 1307 J for 3.
    // Rating 600 J × 0.5 (default derating) = 300 J: per attempt past the derated limit, inside the
    // rating → warn; three back to back exceed it → fail.
    const { simulate } = fakeEngine();
    const result = sizePrecharge({ ...depot, chosenResistor: { resistance: '160 Ω', pulseEnergy: '600 J' } }, simulate);
    const chosen = result.chosen!;
    expect(chosen.inWindow).toBe(true);
    const byId = (id: string) => chosen.checks.find((c) => c.id === id)!;
    expect(byId('precharge-pulse-energy').status).toBe('warn');
    expectClose(byId('precharge-pulse-energy').value, 435.67, 1e-4);
    expect(byId('precharge-pulse-energy-attempts').status).toBe('fail');
    expect(byId('precharge-peak-power').status).toBe('not-checked');
    expect(byId('chosen-inrush-current').status).toBe('pass');
    expect(byId('chosen-precharge-time').status).toBe('pass');
    expect(result.simulations).toBe(28);
  });

  it('fails the current check for a resistor below the window', () => {
    const { simulate } = fakeEngine();
    const chosen = sizePrecharge({ ...depot, chosenResistor: { resistance: 39 } }, simulate).chosen!;
    expect(chosen.inWindow).toBe(false);
    expect(chosen.checks.find((c) => c.id === 'chosen-inrush-current')!.status).toBe('fail');
  });
});

describe('invalid sizing input', () => {
  const attempt = (over: Partial<PrechargeSizingInput>) => {
    try {
      sizePrecharge({ ...depot, ...over }, fakeEngine().simulate);
    } catch (error) {
      expect(error).toBeInstanceOf(DesignError);
      return (error as DesignError).issues.map((i) => i.path);
    }
    return [];
  };

  it.each([
    [{ bypassThreshold: 1 }, 'bypassThreshold'],
    [{ bypassThreshold: '100 %' }, 'bypassThreshold'],
    [{ bypassThreshold: 0 }, 'bypassThreshold'],
    [{ maxInrushCurrent: 0 }, 'maxInrushCurrent'],
    [{ maxInrushCurrent: '-3 A' }, 'maxInrushCurrent'],
    [{ capacitance: '5 V' }, 'capacitance'],
    [{ attempts: 0 }, 'attempts'],
    [{ busVoltageTolerance: '10 %', busVoltageMax: 900 }, 'busVoltageTolerance'],
    [{ load: { kind: 'current' } }, 'load.value'],
    [{ seriesInductance: 0, loopResistance: undefined }, 'loopResistance'],
  ] as [Partial<PrechargeSizingInput>, string][])('rejects %j naming %s', (over, path) => {
    expect(attempt(over)).toContain(path);
  });
});
