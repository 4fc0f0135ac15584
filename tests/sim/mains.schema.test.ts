import { readFileSync } from 'fs';
import path from 'path';

import { DesignError } from '@/sim/errors';
import { parseAngle, parseMainsDesign, parseTemperature, safeParseMainsDesign, type MainsDesignInput } from '@/sim/mains/schema';
import { mainsPreset } from '@/sim/mains/preset';

import { expectClose } from '../helpers/expectClose';

const minimal: MainsDesignInput = {
  mains: { voltage: '230 V', lineResistance: '1 Ω' },
  capacitor: { capacitance: '470 µF' },
};

function issuesOf(input: unknown) {
  const result = safeParseMainsDesign(input);
  if (result.ok) throw new Error('expected the design to be rejected');
  return result.issues;
}

function withMains(mains: Record<string, unknown>): unknown {
  return { ...minimal, mains: { ...minimal.mains, ...mains } };
}

describe('parseMainsDesign', () => {
  it('fills the defaults: single-phase 50 Hz at the mains peak, ideal diodes, no limiter, ten cycles', () => {
    const design = parseMainsDesign(minimal);
    expect(design.mains).toEqual({
      kind: 'single-phase',
      voltage: 230,
      frequency: 50,
      angle: 90,
      lineResistance: 1,
      lineInductance: 0,
      diode: { forwardVoltage: 0, slopeResistance: 0, surgePulseDuration: 0.01 },
      limiter: { kind: 'none' },
    });
    expectClose(design.duration, 0.2, 1e-15);
    expect(design.points).toBe(2000);
    expect(design.capacitor).toEqual({ capacitance: 470e-6, esr: 0 });
    expect(design.initial).toEqual({ capacitorVoltage: 0, inductorCurrent: 0, dampingVoltage: 0 });
  });

  it('takes the IFSM half-sine as half a mains cycle: 10 ms at 50 Hz, 8.33 ms at 60 Hz (REFERENCE §5)', () => {
    expectClose(parseMainsDesign(withMains({ frequency: '60 Hz' })).mains.diode.surgePulseDuration, 1 / 120, 1e-15);
    expectClose(parseMainsDesign(withMains({ frequency: 60 })).duration, 10 / 60, 1e-15);
  });

  it('reads an NTC limiter with a thermal model, a relay bypass and temperatures in °C or K', () => {
    const design = parseMainsDesign(
      withMains({
        limiter: {
          kind: 'ntc',
          r25: '10 Ω',
          beta: '3435 K',
          startTemperature: '110 °C',
          thermal: { heatCapacity: '600 mJ/K', dissipationConstant: '15 mW/K', ambientTemperature: '313.15 K' },
          bypass: { delay: '150 ms' },
        },
      }),
    );
    expect(design.mains.limiter.kind).toBe('ntc');
    if (design.mains.limiter.kind !== 'ntc') return;
    expect(design.mains.limiter.r25).toBe(10);
    expect(design.mains.limiter.beta).toBe(3435);
    expectClose(design.mains.limiter.startTemperature, 383.15, 1e-15);
    expectClose(design.mains.limiter.thermal?.heatCapacity, 0.6, 1e-15);
    expectClose(design.mains.limiter.thermal?.dissipationConstant, 0.015, 1e-15);
    expectClose(design.mains.limiter.thermal?.ambientTemperature, 313.15, 1e-15);
    expectClose(design.mains.limiter.bypass?.delay, 0.15, 1e-15);
  });

  it('starts an NTC cold (25 °C) and its thermal model at a 25 °C ambient unless told otherwise', () => {
    const design = parseMainsDesign(
      withMains({ limiter: { kind: 'ntc', r25: 10, beta: 3500, thermal: { heatCapacity: 1, dissipationConstant: 0.01 } } }),
    );
    if (design.mains.limiter.kind !== 'ntc') throw new Error('expected an NTC');
    expect(design.mains.limiter.startTemperature).toBe(298.15);
    expect(design.mains.limiter.thermal?.ambientTemperature).toBe(298.15);
  });

  it.each([
    ['298.15 K', 298.15],
    ['3435 K', 3435],
    ['25 °C', 298.15],
    ['25°C', 298.15],
    ['110 degC', 383.15],
    [373.15, 373.15],
  ])('reads the temperature %p as %p K (a bare K is kelvin, not the kilo prefix)', (input, kelvin) => {
    expectClose(parseTemperature(input), kelvin, 1e-15);
  });

  it.each([
    [90, 90],
    ['45', 45],
    ['30°', 30],
    ['135 deg', 135],
    [`${Math.PI / 2} rad`, 90],
  ])('reads the angle %p as %p degrees', (input, degrees) => {
    expectClose(parseAngle(input), degrees, 1e-12);
  });

  it.each([
    ['mains.voltage', withMains({ voltage: '-230 V' }), 'must not be negative'],
    ['mains.kind', withMains({ kind: 'two-phase' }), 'must be "single-phase" or "three-phase"'],
    ['mains.angle', withMains({ angle: 'north' }), 'could not read "north" as an angle'],
    ['mains.frequency', withMains({ frequency: '5 kHz' }), 'must be at most 1 kHz'],
    ['mains.lineInductance', withMains({ lineInductance: '5 V' }), 'expected an inductance'],
    ['mains.diode.forwardVoltage', withMains({ diode: { forwardVoltage: '-1 V' } }), 'must not be negative'],
    ['mains.limiter.resistance', withMains({ limiter: { kind: 'resistor' } }), 'is required for a resistor limiter'],
    ['mains.limiter.r25', withMains({ limiter: { kind: 'ntc', beta: 3500 } }), 'is required for an NTC limiter'],
    ['mains.limiter.beta', withMains({ limiter: { kind: 'ntc', r25: 10 } }), 'is required for an NTC limiter'],
    [
      'mains.limiter.resistance',
      withMains({ limiter: { kind: 'ntc', r25: 10, beta: 3500, resistance: 5 } }),
      'give its resistance at 25 °C as "r25"',
    ],
    [
      'mains.limiter.beta',
      withMains({ limiter: { kind: 'resistor', resistance: 5, beta: 3500 } }),
      'applies to an NTC limiter only',
    ],
    ['mains.limiter.bypass', withMains({ limiter: { kind: 'none', bypass: { delay: 0.1 } } }), 'does not apply'],
    [
      'mains.limiter.startTemperature',
      withMains({ limiter: { kind: 'ntc', r25: 10, beta: 3500, startTemperature: 25 } }),
      'a bare number is in kelvin',
    ],
    [
      'mains.limiter.thermal.heatCapacity',
      withMains({ limiter: { kind: 'ntc', r25: 10, beta: 3500, thermal: { heatCapacity: '1 W/K', dissipationConstant: 0.01 } } }),
      'expected J/K',
    ],
    ['mains.lineResistance', withMains({ lineResistance: 0 }), 'zero series impedance'],
    ['capacitor.capacitance', { ...minimal, capacitor: { capacitance: '-1 µF' } }, 'must not be negative'],
    ['initial.capacitorVoltage', { ...minimal, initial: { capacitorVoltage: '-5 V' } }, 'must not be negative'],
    ['initial.inductorCurrent', { ...minimal, initial: { inductorCurrent: '1 A' } }, 'must be 0 for a mains switch-on'],
    ['load.value', { ...minimal, load: { kind: 'resistance' } }, 'is required for a load'],
  ])('names %s when it is wrong', (field, input, message) => {
    const issues = issuesOf(input);
    const issue = issues.find((i) => i.path === field);
    expect(issue).toBeDefined();
    expect(issue?.message).toContain(message);
  });

  it("refuses unknown fields with a hint, in its own sections and in the engine's", () => {
    expect(issuesOf(withMains({ voltag: '230 V' }))).toContainEqual({
      path: 'mains.voltag',
      message: 'unknown field "voltag" (did you mean "voltage"?)',
    });
    expect(issuesOf({ ...minimal, capacitor: { capacitence: '1 mF' } })).toContainEqual({
      path: 'capacitor.capacitence',
      message: 'unknown field "capacitence" (did you mean "capacitance"?)',
    });
    expect(issuesOf({ ...minimal, source: { voltage: 400 } })[0].path).toBe('source');
  });

  it('throws a DesignError that names every field', () => {
    expect(() => parseMainsDesign(withMains({ voltage: 0, frequency: -50 }))).toThrow(DesignError);
    try {
      parseMainsDesign(withMains({ voltage: 0, frequency: -50 }));
    } catch (error) {
      expect((error as DesignError).issues.map((i) => i.path).sort()).toEqual(['mains.frequency', 'mains.voltage']);
    }
  });

  it('keeps examples/mains-wall-charger.json in step with the preset, and both parse', () => {
    const file = JSON.parse(readFileSync(path.join(__dirname, '../../examples/mains-wall-charger.json'), 'utf8'));
    expect(file).toEqual(mainsPreset);
    const design = parseMainsDesign(file);
    expect(design.mains.limiter.kind).toBe('ntc');
    expect(design.capacitor.capacitance).toBeCloseTo(470e-6, 15);
  });
});
