import { DesignError } from '@/sim/errors';
import { parseDesign, safeParseDesign, type DesignInput } from '@/sim/design';

const minimal: DesignInput = {
  source: { voltage: '48 V', resistance: '15 mΩ', inductance: '0.5 µH' },
  capacitor: { capacitance: '1.5 mF' },
  duration: '1 ms',
};

function issuesOf(input: unknown) {
  const result = safeParseDesign(input);
  if (result.ok) throw new Error('expected the design to be rejected');
  return result.issues;
}

describe('parseDesign', () => {
  it('normalises quantities to SI and fills defaults', () => {
    const design = parseDesign({ ...minimal, initial: { capacitorVoltage: '12 V' } });
    expect(design.source).toEqual({ voltage: 48, resistance: 0.015, inductance: 0.5e-6, riseTime: 0 });
    expect(design.capacitor).toEqual({ capacitance: 1.5e-3, esr: 0 });
    expect(design.duration).toBeCloseTo(1e-3, 15);
    expect(design.points).toBe(2000);
    expect(design.settleFraction).toBe(0.95);
    expect(design.precharge).toBeNull();
    expect(design.load).toBeNull();
    // vD defaults to vC's initial value (issue 3).
    expect(design.initial).toEqual({ capacitorVoltage: 12, inductorCurrent: 0, dampingVoltage: 12 });
  });

  it('fills a bypass with the usual 95 % voltage trigger and no delay', () => {
    const design = parseDesign({ ...minimal, precharge: { resistance: '47 Ω', bypass: {} } });
    expect(design.precharge).toEqual({ resistance: 47, bypass: { when: 'voltage', fraction: 0.95, time: null, delay: 0 } });
  });

  it('gives a constant-power load an undervoltage threshold of half the source voltage', () => {
    const design = parseDesign({ ...minimal, load: { kind: 'power', value: '100 W' } });
    expect(design.load).toEqual({ kind: 'power', value: 100, start: 0, undervoltage: 24 });
  });

  it('reads ratings and derating factors with units', () => {
    const design = parseDesign({
      ...minimal,
      ratings: { capacitorVoltage: '63 V', fuseMeltingI2t: '400 A²s' },
      derating: { capacitorVoltage: 0.8 },
    });
    expect(design.ratings).toEqual({ capacitorVoltage: 63, fuseMeltingI2t: 400 });
    expect(design.derating).toEqual({ capacitorVoltage: 0.8 });
  });

  it.each<[string, unknown, string, RegExp]>([
    [
      'negative capacitance',
      { ...minimal, capacitor: { capacitance: '-470 uF' } },
      'capacitor.capacitance',
      /must not be negative/,
    ],
    ['zero capacitance', { ...minimal, capacitor: { capacitance: 0 } }, 'capacitor.capacitance', /greater than 0/],
    ['zero duration', { ...minimal, duration: 0 }, 'duration', /greater than 0/],
    ['negative duration', { ...minimal, duration: '-1 ms' }, 'duration', /must not be negative/],
    ['too many points', { ...minimal, points: 200_001 }, 'points', /at most 200 000/],
    ['fractional points', { ...minimal, points: 10.5 }, 'points', /whole number/],
    ['a voltage for a capacitance', { ...minimal, capacitor: { capacitance: '5 V' } }, 'capacitor.capacitance', /is a voltage/],
    [
      'a misspelt field',
      { ...minimal, capacitor: { capacitence: '1 mF', capacitance: '1 mF' } },
      'capacitor.capacitence',
      /unknown field.*did you mean "capacitance"/,
    ],
    ['an unknown section', { ...minimal, tolerance: {} }, 'tolerance', /unknown field/],
    // Found by the nightly fuzz: an empty key must still be named (a bare "" path reads as the root).
    ['an empty key', { ...minimal, '': 1 }, '""', /unknown field ""/],
    ['an empty key in a section', { ...minimal, capacitor: { capacitance: '1 mF', '': 1 } }, 'capacitor.""', /unknown field ""/],
    ['a missing section', { source: { voltage: 1 }, duration: 1 }, 'capacitor', /is required/],
    ['a missing source voltage', { ...minimal, source: {} }, 'source.voltage', /is required/],
    ['an unknown load kind', { ...minimal, load: { kind: 'motor', value: 1 } }, 'load.kind', /must be "none"/],
    [
      'a bypass fraction above 1',
      { ...minimal, precharge: { resistance: 10, bypass: { fraction: 1.2 } } },
      'precharge.bypass.fraction',
      /at most 1/,
    ],
    [
      'a bypass by time without a time',
      { ...minimal, precharge: { resistance: 10, bypass: { when: 'time' } } },
      'precharge.bypass.time',
      /required/,
    ],
    ['a derating factor above 1', { ...minimal, derating: { switchVoltage: 1.5 } }, 'derating.switchVoltage', /at most 1/],
  ])('rejects %s, naming the field', (_label, input, path, message) => {
    const issues = issuesOf(input);
    const issue = issues.find((i) => i.path === path);
    expect(issue).toBeDefined();
    expect(issue?.message).toMatch(message);
  });

  it('rejects zero series impedance with no inductance', () => {
    const issues = issuesOf({ source: { voltage: 48 }, capacitor: { capacitance: '1 mF' }, duration: 1 });
    expect(issues).toEqual([
      { path: 'source.resistance', message: expect.stringMatching(/zero series impedance with no inductance/) },
    ]);
  });

  it('rejects a precharge whose bypass would leave no series impedance and no inductance', () => {
    const issues = issuesOf({
      source: { voltage: 48 },
      precharge: { resistance: 10, bypass: {} },
      capacitor: { capacitance: '1 mF' },
      duration: 1,
    });
    expect(issues[0].path).toBe('source.resistance');
  });

  it('accepts a precharge without a bypass on an ideal source (the resistor is always in)', () => {
    expect(
      safeParseDesign({ source: { voltage: 48 }, precharge: { resistance: 10 }, capacitor: { capacitance: '1 mF' }, duration: 1 })
        .ok,
    ).toBe(true);
  });

  it('rejects a constant-power load the source cannot supply (no DC operating point)', () => {
    // Vs²/(4R) = 48²/(4·1 Ω) = 576 W is the most a 48 V source can deliver through 1 Ω.
    const issues = issuesOf({
      ...minimal,
      source: { voltage: 48, resistance: 1, inductance: '1 uH' },
      load: { kind: 'power', value: '600 W' },
    });
    expect(issues[0].path).toBe('load.value');
    expect(issues[0].message).toMatch(/no DC operating point.*576 W/);
  });

  it('throws a DesignError carrying every issue', () => {
    expect.assertions(3);
    try {
      parseDesign({ source: { voltage: 'x' }, capacitor: { capacitance: -1 }, duration: -1 });
    } catch (error) {
      expect(error).toBeInstanceOf(DesignError);
      const paths = (error as DesignError).issues.map((i) => i.path).sort();
      expect(paths).toEqual(['capacitor.capacitance', 'duration', 'source.voltage']);
      expect((error as DesignError).message).toContain('capacitor.capacitance: must not be negative');
    }
  });

  it('rejects what is not an object', () => {
    expect(issuesOf(42)[0].message).toMatch(/JSON object/);
    expect(issuesOf(null)[0].message).toMatch(/JSON object/);
  });
});
