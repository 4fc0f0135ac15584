import { parseDesign, type DesignInput } from '@/sim/design';
import { presets } from '@/sim/presets';
import { runSpread, type SpreadResult, type TolerancesInput } from '@/sim/spread';
import { closeSpreadWorkers, runSpreadParallel } from '@/sim/spread/parallel';

// Worker threads start under Node with tsx's CommonJS hook (sim/spread/worker.js), not through
// Jest's Babel transform: this file checks that path works where the tests run.

jest.setTimeout(60_000);
afterAll(() => closeSpreadWorkers());

function comparable(result: SpreadResult) {
  if (result.status !== 'complete') throw new Error(`expected a complete spread, got ${result.status}`);
  const { run, ...rest } = result;
  return { rest, run };
}

const charge: DesignInput = {
  source: { voltage: '400 V', resistance: '10 mΩ', inductance: '10 µH' },
  precharge: { resistance: '47 Ω', bypass: { fraction: 0.95, delay: '20 ms' } },
  capacitor: { capacitance: '1 mF', esr: '5 mΩ' },
  duration: '1 s',
  ratings: { capacitorVoltage: '450 V', contactorMakeCurrent: '150 A', prechargePulseEnergy: '160 J' },
};
const chargeTolerances: TolerancesInput = {
  'source.voltage': { min: '380 V', max: '420 V' },
  'capacitor.capacitance': { percent: 20, drift: -20 },
  'precharge.resistance': { percent: 5 },
  'precharge.bypass.delay': { min: '10 ms', max: '30 ms' },
};

describe('the parallel spread', () => {
  it('gives the identical result to the single-thread run for the same seed (closed form, Monte Carlo)', async () => {
    const design = parseDesign(charge);
    const options = { method: 'monte-carlo' as const, samples: 600, seed: 4242, distribution: 'normal' as const };
    const serial = comparable(await runSpread(design, chargeTolerances, options));
    const parallel = comparable(await runSpreadParallel(design, chargeTolerances, { ...options, workers: 2 }));
    expect(parallel.rest).toEqual(serial.rest);
    expect(parallel.run.workers).toBe(2);
    expect(serial.run.workers).toBe(1);
    // And a different split (three workers, so other ranges per thread) changes nothing either.
    expect(comparable(await runSpreadParallel(design, chargeTolerances, { ...options, workers: 3 })).rest).toEqual(serial.rest);
  });

  it('gives the identical result on the engine path (constant-power load, odex in the workers)', async () => {
    const design = parseDesign({ ...presets.find((p) => p.id === 'lc-filter')!.design, duration: '4 ms' });
    const tolerances: TolerancesInput = {
      'capacitor.capacitance': { percent: 10, drift: -20 },
      'load.value': { percent: 10 },
      'source.voltage': { percent: 5 },
    };
    const serial = comparable(await runSpread(design, tolerances, { method: 'corners' }));
    const parallel = comparable(await runSpreadParallel(design, tolerances, { method: 'corners' }));
    expect(serial.rest.solver.used).toBe('engine');
    expect(parallel.rest).toEqual(serial.rest);
  });

  it('reports progress from the workers, at least every 1 %, ending at the total', async () => {
    const design = parseDesign(charge);
    const calls: number[] = [];
    await runSpreadParallel(design, chargeTolerances, {
      method: 'monte-carlo',
      samples: 500,
      onProgress: (done) => calls.push(done),
    });
    expect(calls[0]).toBe(0);
    expect(calls[calls.length - 1]).toBe(500);
    for (let k = 1; k < calls.length; k++) expect(calls[k] - calls[k - 1]).toBeLessThanOrEqual(5);
  });

  it('stops the workers when cancelled, and the next run starts fresh ones', async () => {
    const design = parseDesign(charge);
    const controller = new AbortController();
    const result = await runSpreadParallel(design, chargeTolerances, {
      method: 'monte-carlo',
      samples: 100_000,
      signal: controller.signal,
      onProgress: (done) => done >= 2000 && controller.abort(),
    });
    expect(result.status).toBe('cancelled');
    if (result.status === 'cancelled') {
      expect(result.done).toBeGreaterThanOrEqual(2000);
      expect(result.done).toBeLessThan(100_000);
    }
    const again = await runSpreadParallel(design, chargeTolerances, { method: 'corners' });
    expect(again.status).toBe('complete');
  });

  it('serves two runs at once; cancelling one leaves the other to finish unchanged', async () => {
    const design = parseDesign(charge);
    const options = { method: 'monte-carlo' as const, samples: 400, seed: 77 };
    const serial = comparable(await runSpread(design, chargeTolerances, options));
    const controller = new AbortController();
    const [kept, dropped] = await Promise.all([
      runSpreadParallel(design, chargeTolerances, options),
      runSpreadParallel(design, chargeTolerances, {
        ...options,
        samples: 50_000,
        signal: controller.signal,
        onProgress: (done) => done >= 1000 && controller.abort(),
      }),
    ]);
    expect(dropped.status).toBe('cancelled');
    expect(comparable(kept).rest).toEqual(serial.rest);
  });
});
