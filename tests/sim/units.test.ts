import { DesignError } from '@/sim/errors';
import { formatEng, parseQuantity, type Dimension } from '@/sim/units';

import { expectClose } from '../helpers/expectClose';

// SI prefixes and units: BIPM, The International System of Units (SI Brochure), 9th ed., 2019, §3.
describe('parseQuantity reads what engineers type', () => {
  it.each<[string | number, Dimension, number]>([
    ['470 uF', 'capacitance', 470e-6],
    ['470µF', 'capacitance', 470e-6],
    ['470μF', 'capacitance', 470e-6],
    ['470µ', 'capacitance', 470e-6],
    ['470 uf', 'capacitance', 470e-6],
    ['1.5 mF', 'capacitance', 1.5e-3],
    ['300 pF', 'capacitance', 300e-12],
    ['20 mΩ', 'resistance', 0.02],
    ['20 mOhm', 'resistance', 0.02],
    ['20 mohm', 'resistance', 0.02],
    ['20m', 'resistance', 0.02],
    ['4k7', 'resistance', 4700],
    ['4k7 Ω', 'resistance', 4700],
    ['4R7', 'resistance', 4.7],
    ['R47', 'resistance', 0.47],
    ['2.2 kΩ', 'resistance', 2200],
    ['47 kOhm', 'resistance', 47000],
    ['1 MΩ', 'resistance', 1e6],
    ['2.2 mH', 'inductance', 2.2e-3],
    ['25 nH', 'inductance', 25e-9],
    ['5 kW', 'power', 5000],
    ['1.2 kW', 'power', 1200],
    ['300 ms', 'time', 0.3],
    ['100 ns', 'time', 100e-9],
    ['1 min', 'time', 60],
    ['1.5e-3', 'time', 1.5e-3],
    [0.25, 'capacitance', 0.25],
    ['800 V', 'voltage', 800],
    ['-12 V', 'voltage', -12],
    ['1 kV', 'voltage', 1000],
    ['40 A', 'current', 40],
    ['500 mA', 'current', 0.5],
    ['20 A²s', 'i2t', 20],
    ['20 A^2s', 'i2t', 20],
    ['20 A^2 s', 'i2t', 20],
    ['50 J', 'energy', 50],
    ['1 Wh', 'energy', 3600],
    ['35.6 MHz', 'frequency', 35.6e6],
    ['60 µC', 'charge', 60e-6],
    ['25 °C', 'temperature', 298.15],
    ['298.15 K', 'temperature', 298.15], // kelvin, not a kilo prefix
    ['300K', 'temperature', 300],
    ['95 %', 'ratio', 0.95],
    ['0.95', 'ratio', 0.95],
  ])('"%s" as %s is %d (SI)', (input, dimension, expected) => {
    expectClose(parseQuantity(input, dimension, 'field'), expected, 1e-12);
  });

  it.each<[string, Dimension, RegExp]>([
    ['5 V', 'capacitance', /expected a capacitance.*"5 V" is a voltage/],
    ['10 mH', 'resistance', /expected a resistance.*is an inductance/],
    ['abc', 'voltage', /could not read "abc"/],
    ['5 furlongs', 'voltage', /5 furlongs/],
    ['', 'time', /is empty/],
    ['95 V', 'ratio', /expected a plain number or percentage/],
  ])('rejects "%s" for %s with a message naming the field', (input, dimension, message) => {
    let caught: unknown;
    try {
      parseQuantity(input, dimension, 'capacitor.capacitance');
    } catch (error) {
      caught = error;
    }
    expect(caught).toBeInstanceOf(DesignError);
    const error = caught as DesignError;
    expect(error.issues[0].path).toBe('capacitor.capacitance');
    expect(error.issues[0].message).toMatch(message);
    expect(error.message).toContain('capacitor.capacitance');
  });

  it('rejects a non-finite number', () => {
    expect(() => parseQuantity(Number.NaN, 'voltage', 'source.voltage')).toThrow(/finite/);
    expect(() => parseQuantity(Infinity, 'voltage', 'source.voltage')).toThrow(DesignError);
  });
});

describe('formatEng writes engineering notation with SI prefixes', () => {
  it.each<[number, string, string]>([
    [4.7e-4, 'F', '470 µF'],
    [0.02, 'Ω', '20 mΩ'],
    [4700, 'Ω', '4.7 kΩ'],
    [612.4, 'V', '612 V'],
    [-612.4, 'V', '-612 V'],
    [2.3e-3, 's', '2.3 ms'],
    [999.96, 'V', '1 kV'],
    [36e-9, 's', '36 ns'],
    [35.6e6, 'Hz', '35.6 MHz'],
    [0.16, 'A²s', '0.16 A²s'],
    [20.004, 'A²s', '20 A²s'],
    [12.79, '%', '12.8 %'],
    [0, 'V', '0 V'],
  ])('%d %s → "%s"', (value, unit, text) => {
    expect(formatEng(value, unit)).toBe(text);
  });

  it('honours the number of significant digits', () => {
    expect(formatEng(4.7e-4, 'F', 2)).toBe('470 µF');
    expect(formatEng(1234.6, 'W', 4)).toBe('1.235 kW');
  });
});
