import { alignCapture, type Capture } from '@/sim/capture';
import { fitCapture, FitError, levenbergMarquardt, refineFit, solveLinear } from '@/sim/fit';
import { parseDesign, type DesignInput } from '@/sim';

import { boxMuller, mulberry32, syntheticCapture } from '../fixtures/captures/synthetic';
import { expectClose } from '../helpers/expectClose';

function fitErrorOf(run: () => unknown): FitError {
  try {
    run();
  } catch (error) {
    if (error instanceof FitError) return error;
    throw error;
  }
  throw new Error('expected a FitError');
}

// REFERENCE §1 case A (true L = 0.1 H, R = 280 Ω), 5 ms from rest.
const caseA: DesignInput = {
  source: { voltage: '48 V', resistance: '280 Ω', inductance: '0.1 H' },
  capacitor: { capacitance: '0.4 µF' },
  duration: '5 ms',
};

// Depot charger DC link after the bypass closes: 800 V onto 940 µF sitting at 760 V (95 %), through
// 12 µH of loop inductance and 25 mΩ, with 3 mΩ of ESR (ζ ≈ 0.12, fd ≈ 1.49 kHz).
const dcLink: DesignInput = {
  source: { voltage: '800 V', resistance: '25 mΩ', inductance: '12 µH' },
  capacitor: { capacitance: '940 µF', esr: '3 mΩ' },
  initial: { capacitorVoltage: '760 V' },
  duration: '12 ms',
};

/** The same design with the values to be fitted replaced by poor guesses. */
function guessed(design: DesignInput, inductance: string, resistance: string): DesignInput {
  return { ...design, source: { ...design.source, inductance, resistance } };
}

describe('fitCapture on synthetic captures made by the engine (noise from mulberry32 + Box–Muller)', () => {
  it('recovers case A’s 0.1 H and 280 Ω within 2 % from a noisy capacitor voltage', () => {
    // Noise 0.2 V rms (0.4 % of the step), 20 000 samples, 0.5 ms of pre-trigger record.
    const capture = syntheticCapture(caseA, {
      quantity: 'capacitorVoltage',
      noise: 0.2,
      seed: 8,
      samples: 20_000,
      preTrigger: 0.5e-3,
    });
    const fit = fitCapture(capture, guessed(caseA, '1 mH', '1 Ω'), { quantity: 'capacitorVoltage' });
    // The log-decrement estimate alone …
    expectClose(fit.series.inductance, 0.1, 0.02);
    expectClose(fit.series.resistance, 280, 0.02);
    expectClose(fit.ringing.zeta, 0.28, 0.02);
    expectClose(fit.ringing.fd, 763.94, 0.01);
    // … and the least-squares refinement from it.
    expect(fit.refined?.converged).toBe(true);
    expectClose(fit.values['source.inductance'], 0.1, 0.02);
    expectClose(fit.values['source.resistance'], 280, 0.02);
    // The refinement is much closer than 2 %, and its residual is the noise.
    expectClose(fit.values['source.inductance'], 0.1, 0.002);
    expectClose(fit.values['source.resistance'], 280, 0.005);
    expectClose(fit.residualRms, 0.2, 0.05);
    expect(fit.refined!.residualRms).toBeLessThan(fit.refined!.initialResidualRms);
  });

  it('recovers the 800 V DC link’s 12 µH and 25 mΩ within 2 % from a noisy capacitor voltage, ESR known', () => {
    // Noise 0.4 V rms: 1 % of the 40 V step.
    const capture = syntheticCapture(dcLink, {
      quantity: 'capacitorVoltage',
      noise: 0.4,
      seed: 800,
      samples: 12_000,
      preTrigger: 1e-3,
    });
    const fit = fitCapture(capture, guessed(dcLink, '50 µH', '100 mΩ'), { quantity: 'capacitorVoltage' });
    // The estimate is the whole loop, 25 mΩ + 3 mΩ of ESR; the fitted source resistance is the rest.
    expectClose(fit.series.inductance, 12e-6, 0.02);
    expectClose(fit.series.resistance, 0.028, 0.02);
    expectClose(fit.estimate['source.resistance'], 0.025, 0.03);
    expect(fit.refined?.converged).toBe(true);
    expectClose(fit.values['source.inductance'], 12e-6, 0.02);
    expectClose(fit.values['source.resistance'], 0.025, 0.02);
  });

  it('still lands within 2 % at 4 % noise, where the log-decrement estimate alone is rough', () => {
    const capture = syntheticCapture(dcLink, {
      quantity: 'capacitorVoltage',
      noise: 1.5,
      seed: 802,
      samples: 12_000,
      preTrigger: 1e-3,
    });
    const fit = fitCapture(capture, guessed(dcLink, '50 µH', '100 mΩ'), { quantity: 'capacitorVoltage' });
    expectClose(fit.values['source.inductance'], 12e-6, 0.02);
    expectClose(fit.values['source.resistance'], 0.025, 0.02);
  });

  it('recovers the DC link’s loop from a noisy current channel too', () => {
    const capture = syntheticCapture(dcLink, { quantity: 'current', noise: 15, seed: 9, samples: 12_000 });
    const fit = fitCapture(capture, guessed(dcLink, '5 µH', '10 mΩ'), {
      quantity: 'current',
      mode: 'half-period',
      finalValue: 0,
    });
    expectClose(fit.values['source.inductance'], 12e-6, 0.02);
    expectClose(fit.values['source.resistance'], 0.025, 0.02);
  });

  it('gives values that write straight into the design', () => {
    const capture = syntheticCapture(caseA, { quantity: 'capacitorVoltage', noise: 0.1, seed: 3, samples: 5000 });
    const design = guessed(caseA, '1 mH', '1 Ω');
    const fit = fitCapture(capture, design, { quantity: 'capacitorVoltage', refine: false });
    expect(fit.refined).toBeNull();
    expect(Object.keys(fit.apply)).toEqual(['source']);
    const applied = parseDesign({ ...design, ...fit.apply });
    expect(applied.source.voltage).toBe(48); // the section's other fields are kept
    expect(applied.source.inductance).toBe(fit.values['source.inductance']);
    expectClose(applied.source.resistance, 280, 0.02);
  });

  it('needs the right alignment: a capture 0.1 ms late fits with the offset and not without', () => {
    const capture = syntheticCapture(caseA, {
      quantity: 'capacitorVoltage',
      noise: 0.1,
      seed: 5,
      samples: 8000,
      preTrigger: 0.5e-3,
    });
    const late: Capture = alignCapture(capture, 1e-4);
    const aligned = fitCapture(late, caseA, { quantity: 'capacitorVoltage', offset: -1e-4 });
    expectClose(aligned.values['source.inductance'], 0.1, 0.01);
    expectClose(aligned.residualRms, 0.1, 0.1);
    const misaligned = refineFit(late, caseA, {
      quantity: 'capacitorVoltage',
      params: ['source.inductance', 'source.resistance'],
    });
    expect(misaligned.residualRms).toBeGreaterThan(5 * aligned.residualRms);
  });

  it('uses the design’s capacitance: 10 % too much gives about 10 % too little inductance (L·C holds)', () => {
    const capture = syntheticCapture(caseA, { quantity: 'capacitorVoltage', noise: 0.1, seed: 11, samples: 5000 });
    const wrongC = { ...caseA, capacitor: { capacitance: '0.44 µF' } };
    const fit = fitCapture(capture, wrongC, { quantity: 'capacitorVoltage', refine: false });
    expectClose(fit.series.inductance * 0.44e-6, 0.1 * 0.4e-6, 0.02);
    expect(Math.abs(fit.series.inductance / 0.1 - 1)).toBeGreaterThan(0.05);
  });
});

describe('refineFit set-up errors name the option at fault', () => {
  const capture = syntheticCapture(caseA, { quantity: 'capacitorVoltage', noise: 0.05, seed: 1, samples: 500 });

  it.each<[string, Parameters<typeof refineFit>[2], string, string]>([
    ['a channel the capture does not have', { quantity: 'current', params: ['source.inductance'] }, 'no-channel', 'quantity'],
    [
      'no overlap after alignment',
      { quantity: 'capacitorVoltage', params: ['source.inductance'], offset: -1 },
      'no-overlap',
      'offset',
    ],
    ['an unknown value', { quantity: 'capacitorVoltage', params: ['source.colour' as never] }, 'bad-parameter', 'params.0'],
    [
      'a value listed twice',
      { quantity: 'capacitorVoltage', params: ['source.inductance', 'source.inductance'] },
      'bad-parameter',
      'params.1',
    ],
    ['a section the design lacks', { quantity: 'capacitorVoltage', params: ['damping.resistance'] }, 'bad-parameter', 'params.0'],
    ['no values at all', { quantity: 'capacitorVoltage', params: [] }, 'bad-parameter', 'params'],
    [
      'a starting value of zero',
      { quantity: 'capacitorVoltage', params: ['filter.resistance'] },
      'bad-parameter',
      'initial.filter.resistance',
    ],
  ])('refuses %s', (_label, options, code, path) => {
    const error = fitErrorOf(() => refineFit(capture, caseA, options));
    expect(error.code).toBe(code);
    expect(error.path).toBe(path);
  });
});

describe('the least-squares core', () => {
  it('Levenberg–Marquardt fits y = a·e^(−b·t) exactly from a poor start, and stops on its tolerance', () => {
    const t = Array.from({ length: 50 }, (_, k) => k * 0.1);
    const y = t.map((x) => 3 * Math.exp(-0.7 * x));
    const result = levenbergMarquardt(([a, b]) => Float64Array.from(t, (x, k) => a * Math.exp(-b * x) - y[k]), [1, 2], {
      maxIterations: 100,
      costTolerance: 1e-14,
      stepTolerance: 1e-12,
      maxStep: 1,
      differenceStep: 1e-7,
    });
    expect(result.converged).toBe(true);
    expectClose(result.x[0], 3, 1e-6);
    expectClose(result.x[1], 0.7, 1e-6);
    expect(result.iterations).toBeLessThan(100);
  });

  it('reports no convergence when the iteration limit stops it', () => {
    const normal = boxMuller(mulberry32(4));
    const t = Array.from({ length: 50 }, (_, k) => k * 0.1);
    const y = t.map((x) => 3 * Math.exp(-0.7 * x) + 0.01 * normal());
    const result = levenbergMarquardt(([a, b]) => Float64Array.from(t, (x, k) => a * Math.exp(-b * x) - y[k]), [0.1, 5], {
      maxIterations: 1,
      costTolerance: 1e-14,
      stepTolerance: 1e-14,
      maxStep: 0.1,
      differenceStep: 1e-7,
    });
    expect(result.converged).toBe(false);
    expect(result.reason).toBe('max-iterations');
  });

  it('solveLinear solves a pivoting case and returns null for a singular matrix', () => {
    expect(
      solveLinear(
        [
          [0, 1],
          [2, 0],
        ],
        [3, 4],
      ),
    ).toEqual([2, 3]);
    expect(
      solveLinear(
        [
          [1, 2],
          [2, 4],
        ],
        [1, 2],
      ),
    ).toBeNull();
  });
});
