import { parseDesign, type DesignInput } from '@/sim/design';
import { DesignError } from '@/sim/errors';
import { presets } from '@/sim/presets';
import { evaluateChecks } from '@/sim/ratings';
import { closedFormMetrics } from '@/sim/solvers/closedForm';
import { runSpread, type SpreadComplete, type SpreadResult, type TolerancesInput } from '@/sim/spread';
import { sampleStream } from '@/sim/spread/random';
import { drawSample, NORMAL_SIGMAS, type SamplePlan } from '@/sim/spread/sampling';
import { quantile, quantileInPlace } from '@/sim/spread/statistics';
import { resolveTolerances } from '@/sim/spread/tolerances';

function complete(result: SpreadResult): SpreadComplete {
  if (result.status !== 'complete') throw new Error(`expected a complete spread, got ${result.status}`);
  return result;
}

/** Everything but wall time and thread count. */
function comparable(result: SpreadResult) {
  const { run: _run, ...rest } = complete(result);
  return rest;
}

async function fieldOf(promise: Promise<unknown>): Promise<string[]> {
  try {
    await promise;
  } catch (error) {
    if (error instanceof DesignError) return error.issues.map((i) => i.path);
    throw error;
  }
  throw new Error('expected a DesignError');
}

/**
 * A precharge that stays in (no bypass), run for 21 RC: an overdamped series charge. Derived
 * (REFERENCE §1, §2): i_pk ≈ Vs/R, I²t = ½CVs²/R, precharge energy = Rpre·I²t, peak vC → Vs, and
 * ½C·vC,pk². Each is monotone in each of Vs, C and Rpre over the bands below, so its extremes over
 * the box are at corners: corners must enclose every Monte Carlo sample of these metrics.
 */
const charge: DesignInput = {
  name: 'Precharge, resistor stays in',
  source: { voltage: '400 V', resistance: '10 mΩ', inductance: '10 µH' },
  precharge: { resistance: '47 Ω' },
  capacitor: { capacitance: '1 mF', esr: '5 mΩ' },
  duration: '1 s',
  ratings: { capacitorVoltage: '450 V', fuseMeltingI2t: '20 A²s', prechargePulseEnergy: '160 J' },
};
const chargeTolerances: TolerancesInput = {
  'source.voltage': { min: '380 V', max: '420 V' },
  'capacitor.capacitance': { percent: 20, drift: -20 },
  'precharge.resistance': { percent: 5 },
};
const MONOTONE = ['peakCurrent', 'i2t', 'prechargeEnergy', 'peakCapacitorVoltage', 'storedEnergyAtPeak', 'steadyStateVoltage'];

describe('corners', () => {
  it('run all 2ⁿ extreme combinations, and enclose every Monte Carlo sample of monotone metrics', async () => {
    const design = parseDesign(charge);
    const corners = complete(await runSpread(design, chargeTolerances, { method: 'corners' }));
    expect(corners.samples).toBe(8);
    expect(corners.solver).toEqual({ used: 'closed-form', closedForm: 8, engine: 0, invalid: 0, checks: 'fast' });
    for (const distribution of ['uniform', 'normal'] as const) {
      const mc = complete(await runSpread(design, chargeTolerances, { method: 'monte-carlo', samples: 400, distribution }));
      for (const key of MONOTONE) {
        const c = corners.metrics.find((m) => m.key === key)!;
        const m = mc.metrics.find((x) => x.key === key)!;
        expect(m.count).toBe(400);
        expect(m.min!).toBeGreaterThanOrEqual(c.min! * (1 - 1e-12));
        expect(m.max!).toBeLessThanOrEqual(c.max! * (1 + 1e-12));
      }
    }
  });

  it('put each parameter at an end of its band, and the worst case opens as a design that reproduces it', async () => {
    const design = parseDesign(charge);
    const result = complete(await runSpread(design, chargeTolerances, { method: 'corners' }));
    const bands = resolveTolerances(design, chargeTolerances);
    const worst = result.worstCase!;
    expect(worst).not.toBeNull();
    for (const band of bands) expect([band.min, band.max]).toContain(worst.values[band.path]);
    // The highest voltage and the largest (new) capacitance give the highest stored energy.
    const energy = result.metrics.find((m) => m.key === 'storedEnergyAtPeak')!;
    expect(energy.atMax!.values['source.voltage']).toBe(420);
    expect(energy.atMax!.values['capacitor.capacitance']).toBeCloseTo(1.2e-3, 15);
    // Open the worst corner as a design and check it: same margin, same check.
    const reopened = parseDesign(worst.design);
    const check = evaluateChecks(reopened, closedFormMetrics(reopened)!).find((c) => c.id === worst.checkId)!;
    expect(check.marginPercent).toBeCloseTo(worst.marginPercent, 9);
    expect(check.status).toBe(worst.status);
  });

  it("give nominal, min, max and percentiles per metric, with the nominal run's value", async () => {
    const design = parseDesign(charge);
    const result = complete(await runSpread(design, chargeTolerances, { method: 'corners' }));
    const nominal = closedFormMetrics(design)!;
    const peak = result.metrics.find((m) => m.key === 'peakCurrent')!;
    expect(peak.nominal).toBe(nominal.peakCurrent.value);
    expect(peak.min!).toBeLessThan(peak.nominal!);
    expect(peak.max!).toBeGreaterThan(peak.nominal!);
    expect(peak.p1!).toBeGreaterThanOrEqual(peak.min!);
    expect(peak.p99!).toBeLessThanOrEqual(peak.max!);
    // I²t = ½CVs²/R (derived, REFERENCE §1): largest at 1.2 mF, 420 V, 44.65 Ω (+ 15 mΩ of loop).
    const i2t = result.metrics.find((m) => m.key === 'i2t')!;
    expect(i2t.max!).toBeCloseTo((0.5 * 1.2e-3 * 420 ** 2) / (47 * 0.95 + 0.015), 4);
    // Metrics that do not apply (no bypass) have no values.
    expect(result.metrics.find((m) => m.key === 'bypassTime')).toMatchObject({ count: 0, min: null, nominal: null });
  });

  it('refuse more than 10 toleranced values, naming the 11th', async () => {
    const design = parseDesign({
      source: { voltage: '400 V', resistance: '10 mΩ', inductance: '10 µH' },
      precharge: { resistance: '47 Ω', bypass: { fraction: 0.95, delay: '20 ms' } },
      filter: { inductance: '5 µH', resistance: '5 mΩ' },
      capacitor: { capacitance: '1 mF', esr: '5 mΩ' },
      bleeder: { resistance: '10 kΩ' },
      duration: '1 s',
    });
    const eleven: TolerancesInput = {
      'source.voltage': { percent: 5 },
      'source.resistance': { percent: 5 },
      'source.inductance': { percent: 5 },
      'precharge.resistance': { percent: 5 },
      'precharge.bypass.fraction': { min: 0.9, max: 0.96 },
      'precharge.bypass.delay': { min: '10 ms', max: '30 ms' },
      'filter.inductance': { percent: 5 },
      'filter.resistance': { percent: 5 },
      'capacitor.capacitance': { percent: 5 },
      'capacitor.esr': { percent: 5 },
      'bleeder.resistance': { percent: 5 },
    };
    expect(await fieldOf(runSpread(design, eleven, { method: 'corners' }))).toEqual(['tolerances.bleeder.resistance']);
    // Monte Carlo takes any number of them.
    expect(complete(await runSpread(design, eleven, { method: 'monte-carlo', samples: 20 })).parameters).toHaveLength(11);
  });
});

describe('Monte Carlo', () => {
  it('is reproducible: the same seed gives the identical result, another seed other samples', async () => {
    const design = parseDesign(charge);
    const options = { method: 'monte-carlo' as const, samples: 300, seed: 12345 };
    const a = await runSpread(design, chargeTolerances, options);
    const b = await runSpread(design, chargeTolerances, options);
    expect(comparable(b)).toEqual(comparable(a));
    expect(complete(a).seed).toBe(12345);
    expect(complete(a).prng).toMatch(/mulberry32/);
    const c = complete(await runSpread(design, chargeTolerances, { ...options, seed: 54321 }));
    expect(c.worstCase!.values).not.toEqual(complete(a).worstCase!.values);
    expect(c.metrics.find((m) => m.key === 'i2t')!.mean).not.toBe(complete(a).metrics.find((m) => m.key === 'i2t')!.mean);
    // The default seed is fixed and reported.
    const d = complete(await runSpread(design, chargeTolerances, { method: 'monte-carlo', samples: 50 }));
    expect(typeof d.seed).toBe('number');
    expect(comparable(await runSpread(design, chargeTolerances, { method: 'monte-carlo', samples: 50, seed: d.seed! }))).toEqual(
      comparable(d),
    );
  });

  it('draws sample k the same whatever the run length (samples are a function of the index)', () => {
    const design = parseDesign(charge);
    const parameters = resolveTolerances(design, chargeTolerances);
    const plan = (total: number): SamplePlan => ({
      design,
      parameters,
      method: 'monte-carlo',
      distribution: 'normal',
      seed: 7,
      total,
    });
    const a = new Float64Array(3);
    const b = new Float64Array(3);
    for (const k of [0, 1, 99, 1234]) {
      drawSample(plan(100), k, a);
      drawSample(plan(100_000), k, b);
      expect(Array.from(a)).toEqual(Array.from(b));
    }
    drawSample(plan(100), 0, a);
    drawSample(plan(100), 1, b);
    expect(Array.from(a)).not.toEqual(Array.from(b));
  });

  it.each(['uniform', 'normal'] as const)('stays inside each band with the %s distribution', (distribution) => {
    const design = parseDesign(charge);
    const parameters = resolveTolerances(design, chargeTolerances);
    const plan: SamplePlan = { design, parameters, method: 'monte-carlo', distribution, seed: 99, total: 20_000 };
    const values = new Float64Array(3);
    const sums = [0, 0, 0];
    const squares = [0, 0, 0];
    let outside = 0;
    for (let k = 0; k < plan.total; k++) {
      drawSample(plan, k, values);
      parameters.forEach((p, j) => {
        if (!(values[j] >= p.min && values[j] <= p.max)) outside++;
        const x = (values[j] - 0.5 * (p.min + p.max)) / (p.max - p.min); // −½ … ½
        sums[j] += x;
        squares[j] += x * x;
      });
    }
    expect(outside).toBe(0);
    for (let j = 0; j < 3; j++) {
      const mean = sums[j] / plan.total;
      const sd = Math.sqrt(squares[j] / plan.total - mean * mean);
      expect(Math.abs(mean)).toBeLessThan(0.01);
      // Uniform on a unit band: 1/√12. Normal with the band = ±3σ: σ = 1/6, truncated at ±3σ
      // (the truncation lowers it by 1.35 %: √(1 − 6φ(3)/(1 − 2Φ(−3))) = 0.9865).
      const expected = distribution === 'uniform' ? 1 / Math.sqrt(12) : (1 / (2 * NORMAL_SIGMAS)) * 0.9865;
      expect(Math.abs(sd / expected - 1)).toBeLessThan(0.02);
    }
  });

  it('uses a well-mixed stream per sample (mulberry32): uniform in [0, 1), no two streams alike', () => {
    const first = new Set<number>();
    let sum = 0;
    let outside = 0;
    for (let k = 0; k < 10_000; k++) {
      const x = sampleStream(1, k)();
      if (!(x >= 0 && x < 1)) outside++;
      first.add(x);
      sum += x;
    }
    expect(outside).toBe(0);
    expect(first.size).toBe(10_000);
    expect(Math.abs(sum / 10_000 - 0.5)).toBeLessThan(0.01);
  });

  it('refuses bad options, naming them', async () => {
    const design = parseDesign(charge);
    expect(await fieldOf(runSpread(design, chargeTolerances, { method: 'monte-carlo', samples: 100_001 }))).toEqual(['samples']);
    expect(await fieldOf(runSpread(design, chargeTolerances, { method: 'monte-carlo', samples: 0 }))).toEqual(['samples']);
    expect(await fieldOf(runSpread(design, chargeTolerances, { method: 'monte-carlo', seed: -1 }))).toEqual(['seed']);
    expect(await fieldOf(runSpread(design, chargeTolerances, { method: 'sobol' as 'corners' }))).toEqual(['method']);
    expect(await fieldOf(runSpread(design, { 'capacitor.capacitence': { percent: 5 } }, { method: 'corners' }))).toEqual([
      'tolerances.capacitor.capacitence',
    ]);
  });
});

describe('checks, histograms and percentiles', () => {
  it('give each rating check its nominal, spread of margins, worst case and counts', async () => {
    const design = parseDesign(charge);
    const result = complete(await runSpread(design, chargeTolerances, { method: 'monte-carlo', samples: 300, seed: 3 }));
    const energy = result.checks.find((c) => c.id === 'precharge-pulse-energy')!;
    // Nominal ½·1 mF·(400 V)² = 80 J against 160 J derated to 80 J: right at the line.
    expect(energy.nominal.value).toBeCloseTo(80 * (47 / 47.015), 6);
    expect(energy.counts.pass + energy.counts.warn + energy.counts.fail).toBe(300);
    expect(energy.counts.warn).toBeGreaterThan(0);
    expect(energy.worstStatus).toBe('warn');
    expect(energy.marginPercent!.min).toBe(energy.worst!.marginPercent);
    expect(energy.marginPercent!.min).toBeLessThan(energy.nominal.marginPercent!);
    // A check with no rating is not checked in every sample, and has no worst case.
    const diode = result.checks.find((c) => c.id === 'diode-i2t')!;
    expect(diode.counts.notChecked).toBe(300);
    expect(diode.worst).toBeNull();
    expect(diode.worstStatus).toBe('not-checked');
    // The overall worst case is the smallest margin over every check.
    const smallest = Math.min(...result.checks.filter((c) => c.marginPercent).map((c) => c.marginPercent!.min));
    expect(result.worstCase!.marginPercent).toBe(smallest);
  });

  it('give 30-bin histograms of the key metrics with the rating lines to draw', async () => {
    const design = parseDesign(charge);
    const result = complete(await runSpread(design, chargeTolerances, { method: 'monte-carlo', samples: 500 }));
    expect(result.histograms.map((h) => h.key)).toEqual([
      'peakCapacitorVoltage',
      'peakCurrent',
      'i2t',
      'prechargeEnergy',
      'peakBusVoltage',
    ]);
    for (const h of result.histograms) {
      expect(h.bins).toHaveLength(30);
      expect(h.bins.reduce((s, b) => s + b.count, 0)).toBe(500);
      for (let k = 1; k < h.bins.length; k++) expect(h.bins[k].from).toBe(h.bins[k - 1].to);
      const m = result.metrics.find((x) => x.key === h.key)!;
      expect(h.bins[0].from).toBe(m.min);
      expect(h.bins[29].to).toBe(m.max);
    }
    const vc = result.histograms.find((h) => h.key === 'peakCapacitorVoltage')!;
    expect(vc.ratings).toEqual([
      { checkId: 'capacitor-voltage', label: 'Capacitor voltage', limit: 450, deratedLimit: expect.any(Number) },
    ]);
  });

  it('percentiles interpolate between order statistics (Hyndman & Fan type 7)', () => {
    const values = Array.from({ length: 100 }, (_, k) => k + 1);
    expect(quantile(values, 0.01)).toBeCloseTo(1.99, 12);
    expect(quantile(values, 0.99)).toBeCloseTo(99.01, 12);
    expect(quantile([5], 0.99)).toBe(5);
  });

  it('by selection give exactly the sorted-array percentiles, ties and constant runs included', () => {
    const next = sampleStream(5, 0);
    const cases = [
      Array.from({ length: 1001 }, () => next()),
      Array.from({ length: 500 }, () => Math.floor(next() * 7)), // many ties
      Array.from({ length: 300 }, () => 2.5), // constant
      Array.from({ length: 257 }, (_, k) => k), // already sorted
      [3, 1],
      [4],
    ];
    for (const values of cases) {
      const sorted = [...values].sort((a, b) => a - b);
      for (const p of [0, 0.01, 0.5, 0.99, 1]) expect(quantileInPlace(Float64Array.from(values), p)).toBe(quantile(sorted, p));
    }
  });
});

describe('the engine path, progress and cancelling', () => {
  it('uses the engine where the closed form does not apply, and counts samples that cannot run', async () => {
    const design = parseDesign({ ...presets.find((p) => p.id === 'lc-filter')!.design, duration: '4 ms' });
    // At 12 V the source cannot deliver 1.2 kW through 80 mΩ (at most 450 W): no operating point.
    const result = complete(await runSpread(design, { 'source.voltage': { min: '12 V', max: '96 V' } }, { method: 'corners' }));
    expect(result.solver).toMatchObject({ used: 'engine', closedForm: 0, engine: 1, invalid: 1 });
    expect(result.nominal.solver).toBe('engine');
    expect(result.invalid.count).toBe(1);
    expect(result.invalid.samples[0].values['source.voltage']).toBe(12);
    expect(result.invalid.samples[0].message).toMatch(/operating point/);
    expect(result.worstStatus).toBe('fail');
    expect(result.checks.find((c) => c.id === 'capacitor-voltage')!.counts.invalid).toBe(1);
  });

  it('reports progress at least every 1 %, ending at the total', async () => {
    const design = parseDesign(charge);
    const calls: [number, number][] = [];
    complete(
      await runSpread(design, chargeTolerances, {
        method: 'monte-carlo',
        samples: 1000,
        onProgress: (d, t) => calls.push([d, t]),
      }),
    );
    expect(calls[0]).toEqual([0, 1000]);
    expect(calls[calls.length - 1]).toEqual([1000, 1000]);
    for (let k = 1; k < calls.length; k++) {
      expect(calls[k][0]).toBeGreaterThan(calls[k - 1][0]);
      expect(calls[k][0] - calls[k - 1][0]).toBeLessThanOrEqual(10);
    }
  });

  it('stops when cancelled, returning a cancelled outcome', async () => {
    const design = parseDesign(charge);
    const controller = new AbortController();
    const result = await runSpread(design, chargeTolerances, {
      method: 'monte-carlo',
      samples: 5000,
      signal: controller.signal,
      onProgress: (done) => done >= 500 && controller.abort(),
    });
    expect(result).toEqual({ status: 'cancelled', method: 'monte-carlo', seed: expect.any(Number), done: 500, total: 5000 });
  });

  it('sees an abort from a timer promptly (it yields to the event loop)', async () => {
    const design = parseDesign(charge);
    const controller = new AbortController();
    setTimeout(() => controller.abort(), 30);
    const result = await runSpread(design, chargeTolerances, {
      method: 'monte-carlo',
      samples: 100_000,
      signal: controller.signal,
    });
    expect(result.status).toBe('cancelled');
    if (result.status === 'cancelled') expect(result.done).toBeLessThan(100_000);
  });
});
