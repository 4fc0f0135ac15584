import { parseDesign, type DesignInput } from '@/sim/design';
import { DesignError } from '@/sim/errors';
import { presets } from '@/sim/presets';
import { parseTolerances, resolveTolerances, tolerancesSchema, toDesignInput, TOLERANCE_PATHS } from '@/sim/spread';

function issuesOf(fn: () => unknown): { path: string; message: string }[] {
  try {
    fn();
  } catch (error) {
    if (error instanceof DesignError) return error.issues;
    throw error;
  }
  throw new Error('expected a DesignError');
}

const precharge: DesignInput = {
  source: { voltage: '400 V', resistance: '10 mΩ', inductance: '10 µH' },
  precharge: { resistance: '47 Ω', bypass: { fraction: 0.95, delay: '20 ms' } },
  capacitor: { capacitance: '1 mF', esr: '5 mΩ' },
  duration: '1 s',
};

describe('the tolerances schema', () => {
  it('reads ± percent and min/max with units into SI, in the canonical path order', () => {
    const parsed = tolerancesSchema.parse({
      'source.voltage': { min: '380 V', max: '420 V' },
      'capacitor.capacitance': { percent: '20 %', drift: '-20 %' },
      'capacitor.esr': { percent: 10, drift: 100 },
      'precharge.resistance': { percent: '±5' },
    });
    expect(Object.keys(parsed)).toEqual(['source.voltage', 'precharge.resistance', 'capacitor.capacitance', 'capacitor.esr']);
    expect(parsed['source.voltage']).toEqual({ min: 380, max: 420, drift: 0, dimension: null });
    expect(parsed['capacitor.capacitance']).toEqual({ percent: 20, drift: -20 });
    expect(parsed['capacitor.esr']).toEqual({ percent: 10, drift: 100 });
    expect(parsed['precharge.resistance']).toEqual({ percent: 5, drift: 0 });
    expect(
      tolerancesSchema.parse({ 'capacitor.capacitance': { min: '900 µF', max: '1.1 mF' } })['capacitor.capacitance'],
    ).toMatchObject({
      min: 9e-4,
      max: 1.1e-3,
    });
  });

  it.each([
    [{ 'capacitor.capacitence': { percent: 10 } }, 'tolerances.capacitor.capacitence', /unknown design path/],
    [{ 'source.voltage': { min: '420 V', max: '380 V' } }, 'tolerances.source.voltage.min', /greater than max/],
    [{ 'capacitor.capacitance': { percent: -10 } }, 'tolerances.capacitor.capacitance.percent', /negative/],
    [{ 'capacitor.capacitance': { percent: '-10 %' } }, 'tolerances.capacitor.capacitance.percent', /negative/],
    [{ 'source.voltage': { percent: 5, drift: -10 } }, 'tolerances.source.voltage.drift', /only to a capacitor/],
    [{ 'capacitor.capacitance': { percent: 5, drift: -100 } }, 'tolerances.capacitor.capacitance.drift', /above −100/],
    [{ 'source.voltage': { percent: 5, min: '1 V', max: '2 V' } }, 'tolerances.source.voltage.percent', /not both/],
    [{ 'source.voltage': { min: '380 V' } }, 'tolerances.source.voltage.max', /required/],
    [{ 'source.voltage': { min: '380 µF', max: '420 V' } }, 'tolerances.source.voltage.min', /voltage/],
    [{ 'source.voltage': { percent: 5, sigma: 1 } }, 'tolerances.source.voltage.sigma', /unknown field/],
    [{ 'source.voltage': 5 }, 'tolerances.source.voltage', /must be an object/],
  ])('refuses %j, naming %s', (input, path, message) => {
    const issues = issuesOf(() => parseTolerances(input));
    expect(issues.map((i) => i.path)).toContain(path);
    expect(issues.find((i) => i.path === path)!.message).toMatch(message);
  });

  it('parses its own output to the same thing (idempotent), so parsed tolerances can be passed again', () => {
    const once = parseTolerances({
      'load.value': { min: '1 kW', max: '1.4 kW' },
      'capacitor.capacitance': { percent: 10, drift: -20 },
    });
    expect(once['load.value']).toMatchObject({ dimension: 'power' });
    expect(parseTolerances(once)).toEqual(once);
  });

  it('knows every component value and the source voltage', () => {
    for (const path of [
      'source.voltage',
      'source.resistance',
      'source.inductance',
      'precharge.resistance',
      'filter.inductance',
      'filter.resistance',
      'capacitor.capacitance',
      'capacitor.esr',
      'damping.resistance',
      'damping.capacitance',
      'bleeder.resistance',
      'load.value',
    ]) {
      expect(TOLERANCE_PATHS).toContain(path);
    }
  });
});

describe('resolving tolerances against a design', () => {
  it('gives each band in SI, and an end-of-life drift widens it to cover the part new and aged', () => {
    const design = parseDesign(precharge);
    const [resistance, capacitance, esr] = resolveTolerances(design, {
      'capacitor.capacitance': { percent: 10, drift: -20 },
      'capacitor.esr': { percent: 10, drift: 100 },
      'precharge.resistance': { percent: 5 },
    });
    expect(resistance).toMatchObject({ path: 'precharge.resistance', nominal: 47, drift: 0 });
    expect(resistance.min).toBeCloseTo(44.65, 12);
    expect(resistance.max).toBeCloseTo(49.35, 12);
    // New 0.9 … 1.1 mF; aged by −20 %: 0.72 … 0.88 mF; together 0.72 … 1.1 mF.
    expect(capacitance.min).toBeCloseTo(0.72e-3, 15);
    expect(capacitance.max).toBeCloseTo(1.1e-3, 15);
    expect(capacitance.basis).toBe('±10 %, end-of-life drift −20 %');
    // ESR 4.5 … 5.5 mΩ new, doubled at end of life: 4.5 … 11 mΩ.
    expect(esr.min).toBeCloseTo(4.5e-3, 15);
    expect(esr.max).toBeCloseTo(11e-3, 15);
  });

  it.each([
    [{ 'damping.resistance': { percent: 10 } }, 'tolerances.damping.resistance', /no damping branch/],
    [{ 'capacitor.capacitance': { percent: 100 } }, 'tolerances.capacitor.capacitance.percent', /above 0/],
    [{ 'source.inductance': { min: '-1 µH', max: '1 µH' } }, 'tolerances.source.inductance.min', /negative/],
    [{ 'precharge.bypass.fraction': { min: 0.9, max: 1.05 } }, 'tolerances.precharge.bypass.fraction.min', /at most 1/],
    [{ 'filter.inductance': { percent: 10 } }, 'tolerances.filter.inductance', /no input filter/],
    [{}, 'tolerances', /nothing to spread/],
  ])('refuses %j for the precharge design, naming %s', (tolerances, path, message) => {
    const issues = issuesOf(() => resolveTolerances(parseDesign(precharge), tolerances));
    expect(issues.map((i) => i.path)).toContain(path);
    expect(issues.find((i) => i.path === path)!.message).toMatch(message);
  });

  it('refuses a percent tolerance on a nominal 0 (it would not spread)', () => {
    const design = parseDesign({ ...precharge, capacitor: { capacitance: '1 mF' } });
    expect(issuesOf(() => resolveTolerances(design, { 'capacitor.esr': { percent: 20 } }))[0].path).toBe(
      'tolerances.capacitor.esr.percent',
    );
    expect(resolveTolerances(design, { 'capacitor.esr': { min: 0, max: '10 mΩ' } })[0]).toMatchObject({ min: 0, max: 0.01 });
  });

  it("reads a load band in the load's own unit, and refuses another", () => {
    const design = parseDesign(presets.find((p) => p.id === 'lc-filter')!.design);
    expect(resolveTolerances(design, { 'load.value': { min: '1 kW', max: '1.4 kW' } })[0]).toMatchObject({
      min: 1000,
      max: 1400,
      unit: 'W',
    });
    expect(issuesOf(() => resolveTolerances(design, { 'load.value': { min: '10 Ω', max: '12 Ω' } }))[0].path).toBe(
      'tolerances.load.value.min',
    );
  });
});

describe('a parsed design written back as a design file', () => {
  it.each(presets.map((p) => [p.id, p.design] as const))('round-trips for the %s preset', (_id, input) => {
    const design = parseDesign(input);
    expect(parseDesign(toDesignInput(design))).toEqual(design);
  });

  it('round-trips a time-triggered bypass and a changed damping voltage', () => {
    const design = parseDesign({
      ...precharge,
      precharge: { resistance: '47 Ω', bypass: { when: 'time', time: '200 ms' } },
      damping: { resistance: '1 Ω', capacitance: '1 mF' },
      initial: { capacitorVoltage: '10 V', dampingVoltage: '5 V' },
    });
    expect(parseDesign(toDesignInput(design))).toEqual(design);
  });
});
