import { parseDesign, RATING_KEYS, type DesignInput } from '@/sim/design';
import { presets } from '@/sim/presets';
import { evaluateChecks, resolvePolicy } from '@/sim/ratings';
import { fastChecks, fastChecksAgree } from '@/sim/spread/checkValues';
import { evaluateRange, sampleMetrics } from '@/sim/spread/evaluate';
import { prepareSpread } from '@/sim/spread/run';

// The spread reads each sample's checks without their sentences (sim/spread/checkValues.ts). These
// tests hold it to evaluateChecks, value for value, on designs that take every branch of the checks.

/** A rating on every key, so that no check is skipped for want of one. */
const allRatings = Object.fromEntries(
  RATING_KEYS.map((key) => [key, key.endsWith('I2t') ? 50 : key.endsWith('Energy') ? 100 : 500]),
);

const designs: [string, DesignInput][] = [
  ...presets.map((p): [string, DesignInput] => [p.id, p.design]),
  ...presets.map((p): [string, DesignInput] => [`${p.id} with every rating`, { ...p.design, ratings: allRatings }]),
  [
    'precharge without a bypass',
    {
      source: { voltage: '400 V', inductance: '10 µH' },
      precharge: { resistance: '47 Ω' },
      capacitor: { capacitance: '1 mF' },
      duration: '0.5 s',
      ratings: allRatings,
    },
  ],
  [
    'a bypass that never closes (the load holds the bus below 95 %)',
    {
      source: { voltage: '400 V', inductance: '10 µH' },
      precharge: { resistance: '47 Ω', bypass: { fraction: 0.95 } },
      capacitor: { capacitance: '1 mF' },
      load: { kind: 'resistance', value: '200 Ω' },
      bleeder: { resistance: '10 kΩ' },
      duration: '0.5 s',
      ratings: allRatings,
    },
  ],
  [
    'a ringing hot-plug that reverses the capacitor',
    {
      source: { voltage: '48 V', inductance: '2 µH' },
      capacitor: { capacitance: '100 µF', esr: '1 mΩ' },
      initial: { capacitorVoltage: '40 V', inductorCurrent: '-80 A' },
      duration: '2 ms',
      ratings: allRatings,
    },
  ],
  [
    'a time-triggered bypass with a current load',
    {
      source: { voltage: '800 V', resistance: '20 mΩ', inductance: '5 µH' },
      precharge: { resistance: '33 Ω', bypass: { when: 'time', time: '150 ms' } },
      capacitor: { capacitance: '940 µF', esr: '25 mΩ' },
      load: { kind: 'current', value: '2 A', start: '200 ms' },
      duration: '300 ms',
      ratings: allRatings,
    },
  ],
];

describe('fast check values', () => {
  it.each(designs)('equal evaluateChecks for %s', (_name, input) => {
    const design = parseDesign(input);
    const policy = resolvePolicy(undefined, design.derating);
    const { metrics } = sampleMetrics(design);
    const full = evaluateChecks(design, metrics, policy);
    const fast = fastChecks(design, metrics, policy, full);
    expect(fast).toEqual(full.map((c) => ({ id: c.id, value: c.value, marginPercent: c.marginPercent, status: c.status })));
    expect(fastChecksAgree(design, metrics, policy, full, full)).toBe(true);
  });

  it('are what a spread uses, and give the same columns as evaluateChecks sample by sample', () => {
    const design = parseDesign({
      ...presets.find((p) => p.id === 'dc-link-precharge')!.design,
      bleeder: undefined,
      ratings: allRatings,
    });
    const { ctx } = prepareSpread(
      design,
      {
        'source.voltage': { percent: 10 },
        'capacitor.capacitance': { percent: 20, drift: -20 },
        'precharge.bypass.fraction': { min: 0.9, max: 0.99 },
      },
      { method: 'monte-carlo', samples: 200 },
    );
    expect(ctx.fastChecks).toBe(true);
    const fast = evaluateRange(ctx, 0, 200);
    const full = evaluateRange({ ...ctx, fastChecks: false }, 0, 200);
    expect(fast).toEqual(full);
  });

  it('notice a disagreement (a check that reads differently is caught before a run)', () => {
    const design = parseDesign({ ...presets.find((p) => p.id === 'hot-plug')!.design });
    const policy = resolvePolicy(undefined, design.derating);
    const { metrics } = sampleMetrics(design);
    const full = evaluateChecks(design, metrics, policy);
    const altered = full.map((c) => (c.id === 'switch-voltage' ? { ...c, value: (c.value ?? 0) + 1 } : c));
    expect(fastChecksAgree(design, metrics, policy, altered, full)).toBe(false);
    const unknown = [...full, { ...full[0], id: 'a-new-check' }];
    expect(fastChecksAgree(design, metrics, policy, unknown, unknown)).toBe(false);
  });
});
