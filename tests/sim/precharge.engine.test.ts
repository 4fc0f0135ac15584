// The sizer and the bypass formulas against the real engine (sim/simulate.ts).
import { parseDesign } from '@/sim/design';
import { energyToFraction, sizePrecharge, stepChargeI2t, type PrechargeSizingInput } from '@/sim/precharge';
import { simulate } from '@/sim/simulate';

function expectClose(actual: number | null | undefined, expected: number, relTol: number, absTol = 0) {
  expect(actual).not.toBeNull();
  expect(actual).not.toBeUndefined();
  const error = Math.abs((actual as number) - expected);
  if (error > Math.max(absTol, relTol * Math.abs(expected))) {
    throw new Error(`expected ${actual} to be within ${relTol} (rel) / ${absTol} (abs) of ${expected}`);
  }
}

describe('closing the bypass', () => {
  it('adds the second inrush ½CΔV²/R_loop: 20 A²s after a 0.16 A²s precharge (400 V, 1 mF, 95 %, 10 mΩ)', () => {
    // REFERENCE §2 [der]: ΔV = 5 % of 400 V = 20 V; ½·1e-3·20²/0.01 = 20 A²s. The precharge I²t
    // C·V²(k − k²/2)/R = 79.8/500 = 0.16 A²s (R = 500 Ω chosen to match the reference's figure).
    const design = parseDesign({
      source: { voltage: '400 V', resistance: '10 mΩ', inductance: '1 µH' },
      precharge: { resistance: '500 Ω', bypass: { fraction: 0.95 } },
      capacitor: { capacitance: '1 mF' },
      duration: '1.6 s',
    });
    const { metrics } = simulate(design, { points: 200 });
    expectClose(metrics.residualStep, 20, 1e-6);
    expectClose(metrics.i2tAfterBypass, stepChargeI2t(20, 1e-3, 0.01), 2e-3);
    expectClose(metrics.i2tAfterBypass, 20, 2e-3);
    expectClose(metrics.prechargeEnergy / 500, 0.16, 3e-3);
    expectClose(metrics.prechargeEnergy, energyToFraction(1e-3, 400, 0.95), 1e-4);
  });
});

describe('sizing with the engine', () => {
  // The hand-worked depot charger example of precharge.test.ts, with 3 attempts, 10 µH and 10 mΩ.
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

  it('re-simulates every proposed value, and the engine agrees with the first-order figures', () => {
    const result = sizePrecharge(depot);
    expect(result.candidates.length).toBe(27);
    expect(result.simulations).toBe(27);
    for (const c of result.candidates) {
      const s = c.simulated!;
      expect(s).not.toBeNull();
      // L/R ≤ 0.2 µs against RC ≥ 50 ms: the RC formulas hold to well under 0.1 %.
      expectClose(s.prechargeTime, c.estimate.prechargeTime!, 1e-3);
      expectClose(s.peakCurrent, c.estimate.peakCurrent, 1e-3);
      expectClose(s.energyPerAttempt, c.estimate.energyPerAttempt!, 1e-3);
      expectClose(s.residualStep, c.estimate.residualStep!, 1e-6);
      expectClose(s.bypassI2t, c.estimate.bypassI2t!, 1e-3);
      expectClose(s.bypassInrushPeak, c.estimate.bypassInrushPeak!, 1e-3);
      expect(c.simulatedWithinLimits).toBe(true);
    }
  });

  it('re-simulates on a base design, keeping its bleeder, and counts its losses in the energy', () => {
    // The bleeder draws through the precharge resistor: the engine's resistor energy is higher than
    // C·V²(k − k²/2), which leaves the bleeder out.
    const base = {
      name: 'Depot charger DC link',
      source: { voltage: '800 V', resistance: '10 mΩ', inductance: '10 µH' },
      precharge: { resistance: '150 Ω', bypass: { fraction: 0.9 } },
      capacitor: { capacitance: '940 µF' },
      bleeder: { resistance: '4.7 kΩ' },
      duration: '1 s',
    };
    const result = sizePrecharge({ ...depot, design: base, chosenResistor: { resistance: '220 Ω', pulseEnergy: '2 kJ' } });
    expect(result.candidates.length).toBeGreaterThan(0);
    const c = result.candidates[0];
    expect(c.simulated!.energyPerAttempt).toBeGreaterThan(c.estimate.energyPerAttempt!);
    expect(result.chosen!.simulated).not.toBeNull();
    expect(result.chosen!.checks.find((x) => x.id === 'precharge-pulse-energy')!.status).toBe('pass');
  });

  it('names the base design field when it is not valid', () => {
    expect(() => sizePrecharge({ ...depot, design: { source: { voltage: 800 }, duration: 1 } })).toThrow(/design\.capacitor/);
  });
});
