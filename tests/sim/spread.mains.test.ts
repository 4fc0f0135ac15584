import { parseDesign } from '@/sim/design';
import { DesignError } from '@/sim/errors';
import { mainsChecks, mainsPreset, parseMainsDesign, simulateMains, sweepSwitchOnAngle, withAngle, type MainsDesignInput } from '@/sim/mains';
import { prepareSpread, runSpread, toMainsDesignInput, type SpreadComplete, type SpreadResult, type TolerancesInput } from '@/sim/spread';
import { closeSpreadWorkers, runSpreadParallel } from '@/sim/spread/parallel';

// Mains designs through the spread: each sample runs the mains engine at its worst switch-on angle
// (corners re-search it per corner; Monte Carlo holds the nominal's and checks that afterwards).

jest.setTimeout(120_000);
afterAll(() => closeSpreadWorkers());

// The wall charger preset, shortened to three mains cycles so that the sweeps stay quick.
const charger: MainsDesignInput = { ...mainsPreset, duration: '60 ms' };
const design = parseMainsDesign(charger);

const lineTolerances: TolerancesInput = {
  // ±10 %: the usual supply tolerance on a 230 V low-voltage network (common practice).
  'mains.voltage': { percent: 10 },
  'mains.limiter.r25': { percent: 20 },
  'capacitor.capacitance': { percent: 20, drift: -20 },
};

function complete(result: SpreadResult): SpreadComplete {
  if (result.status !== 'complete') throw new Error(`expected a complete spread, got ${result.status}`);
  return result;
}

function metric(result: SpreadComplete, key: string) {
  const m = result.metrics.find((x) => x.key === key);
  if (!m) throw new Error(`no metric ${key}`);
  return m;
}

function issuesOf(fn: () => unknown): { path: string; message: string }[] {
  try {
    fn();
  } catch (error) {
    if (error instanceof DesignError) return error.issues;
    throw error;
  }
  throw new Error('expected a DesignError');
}

describe('a mains spread by corners', () => {
  let corners: SpreadComplete;
  beforeAll(async () => {
    corners = complete(await runSpread(design, lineTolerances, { method: 'corners' }));
  });

  it('runs the mains engine and reports the mains metrics, each corner at its own worst angle', () => {
    expect(corners.subject).toBe('mains');
    expect(corners.samples).toBe(8);
    expect(corners.mains?.angleMode).toBe('search');
    expect(corners.mains?.angleCheck).toEqual([]);
    for (const key of ['peakCurrent', 'diodeI2t', 'surgeEquivalentCurrent', 'limiterEnergy', 'peakCapacitorVoltage', 'switchOnAngle'])
      expect(metric(corners, key).count).toBe(8);
    // The nominal runs at the angle the engine's own sweep finds for it.
    const sweep = sweepSwitchOnAngle(design);
    expect(corners.mains?.nominalAngle).toBeCloseTo(sweep.worst.angle, 1);
    expect(metric(corners, 'peakCurrent').nominal).toBeCloseTo(sweep.worst.peakCurrent, 6);
    // Re-searched: the corners' worst angles are not all the nominal's.
    const angles = metric(corners, 'switchOnAngle');
    expect(angles.max! - angles.min!).toBeGreaterThan(0.01);
  });

  it('brackets the nominal value of every inrush metric between the corners', () => {
    for (const key of ['peakCurrent', 'i2t', 'diodeI2t', 'surgeEquivalentCurrent', 'limiterEnergy', 'peakCapacitorVoltage']) {
      const m = metric(corners, key);
      expect(m.min!).toBeLessThan(m.nominal!);
      expect(m.max!).toBeGreaterThan(m.nominal!);
    }
  });

  it('finds the largest inrush at high line, least NTC resistance and most capacitance', () => {
    const peak = metric(corners, 'peakCurrent');
    expect(peak.atMax?.values['mains.voltage']).toBeCloseTo(253, 9);
    expect(peak.atMax?.values['mains.limiter.r25']).toBeCloseTo(8, 9);
    // The band of C with its −20 % drift: 0.64·470 µF … 1.2·470 µF.
    expect(peak.atMax?.values['capacitor.capacitance']).toBeCloseTo(564e-6, 12);
  });

  it('judges each corner by the mains checks (half-sine-equivalent surge against IFSM, the worst diode, the limiter)', () => {
    const nominal = corners.nominal;
    const expected = mainsChecks(withAngle(design, corners.mains!.nominalAngle), { metrics: nominal.metrics as never });
    expect(nominal.checks.map((c) => [c.id, c.value])).toEqual(expected.map((c) => [c.id, c.value]));
    const surge = corners.checks.find((c) => c.id === 'diode-surge-current')!;
    expect(surge.label).toBe('Diode surge current');
    expect(surge.value!.max).toBeCloseTo(metric(corners, 'surgeEquivalentCurrent').max!, 9);
    const diodeI2t = corners.checks.find((c) => c.id === 'diode-i2t')!;
    expect(diodeI2t.value!.max).toBeCloseTo(metric(corners, 'diodeI2t').max!, 9);
    expect(corners.checks.find((c) => c.id === 'precharge-pulse-energy')?.label).toBe('Limiter pulse energy');
    const surgeHistogram = corners.histograms.find((h) => h.key === 'surgeEquivalentCurrent')!;
    expect(surgeHistogram.ratings.map((r) => r.checkId)).toEqual(['diode-surge-current']);
  });

  it('opens the worst corner as a mains design at the angle it was judged at', () => {
    const worst = metric(corners, 'peakCurrent').atMax!;
    const opened = parseMainsDesign(worst.design);
    expect(opened.mains.voltage).toBeCloseTo(253, 9);
    const run = simulateMains(opened, { crossCheck: false, waveform: false });
    expect(run.metrics.peakCurrent.value).toBeCloseTo(metric(corners, 'peakCurrent').max!, 6);
  });
});

describe('a mains spread of the line voltage alone', () => {
  it('gives more peak inrush at the high-line corner than at nominal, about in proportion to the line voltage', async () => {
    const result = complete(await runSpread(design, { 'mains.voltage': { percent: 10 } }, { method: 'corners' }));
    const peak = metric(result, 'peakCurrent');
    // Sample 1 is the high-line corner (bit 0 set: the parameter at its max).
    expect(peak.atMax?.sample).toBe(1);
    expect(peak.max!).toBeGreaterThan(peak.nominal!);
    expect(peak.min!).toBeLessThan(peak.nominal!);
    // With the capacitor empty at the peak (33 µs in), i ≈ (√2·V − 2·Vf)/R: the ratio of the drives.
    const drive = (v: number) => Math.SQRT2 * v - 2 * 0.9;
    expect(peak.max! / peak.nominal!).toBeGreaterThan(0.98 * (drive(253) / drive(230)));
    expect(peak.max! / peak.nominal!).toBeLessThan(1.02 * (drive(253) / drive(230)));
  });
});

describe('a mains spread by Monte Carlo', () => {
  const options = { method: 'monte-carlo' as const, samples: 24, seed: 90210 };

  it('is deterministic under a seed, and a different seed draws different samples', async () => {
    const a = complete(await runSpread(design, lineTolerances, options));
    const b = complete(await runSpread(design, lineTolerances, options));
    expect({ ...a, run: null }).toEqual({ ...b, run: null });
    const c = complete(await runSpread(design, lineTolerances, { ...options, seed: 1 }));
    expect(metric(c, 'peakCurrent').max).not.toBe(metric(a, 'peakCurrent').max);
  });

  it('holds the nominal worst angle and shows that the largest inrush moves by a negligible amount when re-searched', async () => {
    const result = complete(await runSpread(design, lineTolerances, options));
    expect(result.mains?.angleMode).toBe('fixed');
    const angles = metric(result, 'switchOnAngle');
    expect(angles.min).toBe(result.mains!.nominalAngle);
    expect(angles.max).toBe(result.mains!.nominalAngle);
    const check = result.mains!.angleCheck;
    expect(check.length).toBeGreaterThan(0);
    expect(check[0].sample).toBe(metric(result, 'peakCurrent').atMax!.sample);
    // The peak is flat at its maximum: holding the angle misses the searched peak by far less than 0.1 %.
    for (const c of check) {
      expect(c.differencePercent).toBeGreaterThanOrEqual(-1e-6);
      expect(c.differencePercent).toBeLessThan(0.1);
    }
  });

  it('gives the identical result on worker threads and on this thread', async () => {
    const serial = complete(await runSpread(design, lineTolerances, options));
    const parallel = complete(await runSpreadParallel(design, lineTolerances, { ...options, workers: 2 }));
    expect({ ...parallel, run: null }).toEqual({ ...serial, run: null });
    expect(parallel.run.workers).toBe(2);
  });
});

describe('tolerances on a mains design', () => {
  it('reads an NTC β band in kelvin (not kilo) and a start temperature in °C', async () => {
    const result = complete(
      await runSpread(
        design,
        { 'mains.limiter.beta': { min: '3400 K', max: '3600 K' }, 'mains.limiter.startTemperature': { min: '0 °C', max: '40 °C' } },
        { method: 'corners' },
      ),
    );
    const beta = result.parameters.find((p) => p.path === 'mains.limiter.beta')!;
    expect([beta.min, beta.max]).toEqual([3400, 3600]);
    const start = result.parameters.find((p) => p.path === 'mains.limiter.startTemperature')!;
    expect(start.min).toBeCloseTo(273.15, 9);
    expect(start.max).toBeCloseTo(313.15, 9);
    // A warmer NTC has less resistance, so lets more through.
    expect(metric(result, 'peakCurrent').atMax?.values['mains.limiter.startTemperature']).toBeCloseTo(313.15, 9);
  });

  it.each([
    ['source.voltage', { percent: 10 }, /mains\.voltage/],
    ['precharge.resistance', { percent: 5 }, /mains\.limiter/],
    ['initial.inductorCurrent', { min: '0 A', max: '1 A' }, /no current/],
    ['mains.limiter.resistance', { percent: 5 }, /no resistor limiter/],
    ['mains.limiter.bypass.delay', { percent: 5 }, /no bypass relay/],
    ['mains.limiter.startTemperature', { min: '-150 °C', max: '40 °C' }, /150 K/],
  ])('refuses %s on the NTC wall charger, naming the field', async (path, spec, message) => {
    const issues = issuesOf(() => prepareSpread(design, { [path]: spec }, { method: 'corners' }));
    const issue = issues.find((i) => i.path === `tolerances.${path}` || i.path.startsWith(`tolerances.${path}.`));
    expect(issue?.message).toMatch(message);
  });

  it('counts a sample left with no series impedance as invalid (a fail), naming why', async () => {
    const bare = parseMainsDesign({
      ...charger,
      mains: { voltage: '230 V', lineResistance: '0.3 Ω', lineInductance: '0 H', limiter: { kind: 'none' } },
    });
    const result = complete(await runSpread(bare, { 'mains.lineResistance': { min: '0 Ω', max: '0.5 Ω' } }, { method: 'corners' }));
    expect(result.invalid.count).toBe(1);
    expect(result.invalid.samples[0].sample).toBe(0);
    expect(result.invalid.samples[0].message).toMatch(/zero series impedance/);
    expect(result.worstStatus).toBe('fail');
    expect(metric(result, 'peakCurrent').count).toBe(1);
  });

  it('refuses a mains path on a DC design', () => {
    const dc = parseDesign({ source: { voltage: '48 V', resistance: '10 mΩ' }, capacitor: { capacitance: '1 mF' }, duration: '10 ms' });
    const issues = issuesOf(() => prepareSpread(dc, { 'mains.voltage': { percent: 10 } }, { method: 'corners' }));
    expect(issues[0]).toEqual({ path: 'tolerances.mains.voltage', message: expect.stringMatching(/mains designs only/) });
  });

  it('writes a mains design back as a file that parses to the same design', () => {
    expect(parseMainsDesign(toMainsDesignInput(design))).toEqual(design);
    const withRelay = parseMainsDesign({
      ...charger,
      mains: {
        ...charger.mains,
        kind: 'three-phase',
        voltage: '400 V',
        limiter: { kind: 'resistor', resistance: '22 Ω', bypass: { delay: '40 ms' } },
      },
    });
    expect(parseMainsDesign(toMainsDesignInput(withRelay))).toEqual(withRelay);
    expect(parseMainsDesign(toMainsDesignInput(withRelay, 61.5)).mains.angle).toBe(61.5);
  });
});
