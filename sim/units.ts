/**
 * Quantities as engineers type them ("470 µF", "20 mΩ", "4k7", "300 ms", "1.5e-3") to SI numbers,
 * and SI numbers back to engineering notation ("470 µF").
 *
 * mathjs does the unit algebra; before handing a string to it we normalise what it does not know:
 * µ/μ → u, Ω/Ohm → ohm, ² → ^2, "4k7" → "4.7k", and a bare SI prefix ("470µ", "20m") whose unit is
 * implied by the field.
 */
import type { Unit } from 'mathjs';

import { DesignError } from './errors';

// mathjs builds its whole function table when loaded (hundreds of ms): load it on first use, which
// is only for units beyond the field's own symbol ("1 min", "2 kWh", "25 °C", or a wrong dimension).
let mathjs: { unit: (text: string) => unknown } | null = null;
function mathUnit(text: string): Unit {
  // eslint-disable-next-line @typescript-eslint/no-require-imports
  mathjs ??= require('mathjs') as { unit: (text: string) => unknown };
  return mathjs.unit(text) as Unit;
}

export type Dimension =
  | 'voltage'
  | 'current'
  | 'resistance'
  | 'inductance'
  | 'capacitance'
  | 'time'
  | 'power'
  | 'energy'
  | 'i2t'
  | 'frequency'
  | 'charge'
  | 'temperature'
  /** Dimensionless: a plain number or a percentage. */
  | 'ratio';

interface DimensionInfo {
  /** Reference unit in mathjs syntax; values are returned in it (it is the SI unit). */
  reference: string;
  /** The symbol engineers write, for messages and for case-insensitive matching ("uf" → "uF"). */
  symbol: string;
  /** "a capacitance", for messages. */
  noun: string;
  example: string;
}

export const DIMENSIONS: Record<Dimension, DimensionInfo> = {
  voltage: { reference: 'V', symbol: 'V', noun: 'a voltage', example: '48 V' },
  current: { reference: 'A', symbol: 'A', noun: 'a current', example: '40 A' },
  resistance: { reference: 'ohm', symbol: 'Ω', noun: 'a resistance', example: '20 mΩ' },
  inductance: { reference: 'H', symbol: 'H', noun: 'an inductance', example: '2.2 mH' },
  capacitance: { reference: 'F', symbol: 'F', noun: 'a capacitance', example: '470 µF' },
  time: { reference: 's', symbol: 's', noun: 'a time', example: '300 ms' },
  power: { reference: 'W', symbol: 'W', noun: 'a power', example: '1.2 kW' },
  energy: { reference: 'J', symbol: 'J', noun: 'an energy', example: '50 J' },
  i2t: { reference: 'A^2 s', symbol: 'A²s', noun: 'an I²t (A²s)', example: '20 A²s' },
  frequency: { reference: 'Hz', symbol: 'Hz', noun: 'a frequency', example: '35 MHz' },
  charge: { reference: 'C', symbol: 'C', noun: 'a charge', example: '60 µC' },
  temperature: { reference: 'K', symbol: 'K', noun: 'a temperature', example: '25 °C' },
  ratio: { reference: '', symbol: '', noun: 'a plain number or percentage', example: '0.95 or 95 %' },
};

/** SI prefixes accepted on their own ("470µ", "20m") and inside "4k7". */
const PREFIX_FACTORS: Record<string, number> = {
  f: 1e-15,
  p: 1e-12,
  n: 1e-9,
  u: 1e-6,
  m: 1e-3,
  k: 1e3,
  K: 1e3,
  M: 1e6,
  G: 1e9,
  T: 1e12,
};

const NUMBER_AND_REST = /^([+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)\s*(.*)$/;
/** "4k7" (RKM code): the prefix stands in for the decimal point. */
const RKM = /^([+-]?\d+)([fpnumkKMGT])(\d+)\s*(.*)$/;
/** "4R7", "R47": the resistor form of the same code. */
const RKM_OHMS = /^([+-]?\d*)[Rr](\d+)$/;

function fail(field: string | undefined, message: string): never {
  throw new DesignError([{ path: field ?? '', message }]);
}

function normalise(text: string): string {
  return text
    .trim()
    .replace(/[\u00B5\u03BC]/g, 'u')
    .replace(/[\u03A9\u2126]/g, 'ohm')
    .replace(/ohms?/gi, 'ohm')
    .replace(/\u00B2/g, '^2')
    .replace(/\u00B0\s*C|\u2103/g, 'degC')
    .replace(/A\^?2\s*[·*]?\s*s$/, 'A^2 s')
    .replace(/\s+/g, ' ');
}

/** Names the dimension a mathjs unit has, if it is one of ours; for error messages. */
function describeUnit(parsed: Unit): string | null {
  for (const info of Object.values(DIMENSIONS)) {
    if (!info.reference) continue;
    if (parsed.equalBase(mathUnit(`1 ${info.reference}`))) return info.noun;
  }
  return null;
}

/** Applies an SI prefix; sub-unity prefixes divide so that "60 µC" is exactly 6e-5. */
function applyPrefix(magnitude: number, prefix: string): number {
  const factor = PREFIX_FACTORS[prefix];
  return factor < 1 ? magnitude / Math.round(1 / factor) : magnitude * factor;
}

/**
 * "uF", "mH", "kV", and the same in any case ("uf" → "uF"): the dimension's own symbol with an
 * optional prefix, read without mathjs. Returns the prefix ('' for none) or null.
 */
function ownSymbolPrefix(rest: string, info: DimensionInfo): string | null {
  const symbols = info.reference === 'ohm' ? ['ohm'] : [info.symbol, info.reference];
  for (const exactCase of [true, false]) {
    for (const symbol of symbols) {
      if (!symbol) continue;
      const text = exactCase ? rest : rest.toLowerCase();
      const sym = exactCase ? symbol : symbol.toLowerCase();
      if (!text.endsWith(sym)) continue;
      const prefix = rest.slice(0, rest.length - sym.length).trim();
      if (prefix === '' || prefix in PREFIX_FACTORS) return prefix;
    }
  }
  return null;
}

/**
 * A quantity in SI units. Numbers are taken as SI already; strings may carry a unit, a bare prefix,
 * or an RKM code. A wrong dimension ("5 V" for a capacitance), a non-finite value or an unreadable
 * string throws a DesignError naming `field`.
 */
export function parseQuantity(input: number | string, dimension: Dimension, field?: string): number {
  const info = DIMENSIONS[dimension];
  const name = field ? `${field}` : 'value';
  if (typeof input === 'number') {
    if (!Number.isFinite(input)) fail(field, `must be a finite number, got ${String(input)}`);
    return input;
  }
  if (typeof input !== 'string') fail(field, `must be a number or a string with units, like "${info.example}"`);
  let text = normalise(input);
  if (text === '') fail(field, `is empty; give ${info.noun}, like "${info.example}"`);

  const ohms = dimension === 'resistance' ? RKM_OHMS.exec(text) : null;
  if (ohms) text = `${ohms[1] === '' || ohms[1] === '+' || ohms[1] === '-' ? `${ohms[1]}0` : ohms[1]}.${ohms[2]}`;
  const rkm = RKM.exec(text);
  if (rkm) text = `${rkm[1]}.${rkm[3]}${rkm[2]}${rkm[4]}`;

  const match = NUMBER_AND_REST.exec(text);
  if (!match) fail(field, `could not read "${input}" as ${info.noun}, like "${info.example}"`);
  const magnitude = Number(match[1]);
  const rest = match[2].trim();
  let value: number;

  if (rest === '') {
    value = magnitude;
  } else if (rest in PREFIX_FACTORS && rest !== info.symbol) {
    // A bare prefix (but "300 K" is kelvin, not kilo): the unit is the field's own ("470µ" in a capacitance field is 470 µF).
    value = applyPrefix(magnitude, rest);
  } else if (dimension === 'ratio') {
    if (rest !== '%') fail(field, `expected ${info.noun}, got "${input}"`);
    value = magnitude / 100;
  } else {
    const prefix = ownSymbolPrefix(rest, info);
    if (prefix !== null) {
      value = prefix === '' ? magnitude : applyPrefix(magnitude, prefix);
    } else {
      // Anything else (min, h, Wh, degC, kohm spelt another way) goes to mathjs, which also tells us
      // what dimension a wrong unit has.
      let parsed: Unit | null = null;
      try {
        parsed = mathUnit(`${match[1]} ${rest}`);
      } catch {
        parsed = null;
      }
      if (parsed && parsed.equalBase(mathUnit(`1 ${info.reference}`))) {
        value = parsed.toNumber(info.reference);
      } else if (parsed) {
        const actual = describeUnit(parsed);
        fail(field, `expected ${info.noun} (like "${info.example}"), but "${input}" is ${actual ?? 'in another unit'}`);
      } else {
        fail(field, `could not read the unit in "${input}"; give ${info.noun}, like "${info.example}"`);
      }
    }
  }
  if (!Number.isFinite(value)) fail(field, `${name} "${input}" is not a finite number`);
  return value;
}

const ENG_PREFIXES: [number, string][] = [
  [-15, 'f'],
  [-12, 'p'],
  [-9, 'n'],
  [-6, 'µ'],
  [-3, 'm'],
  [0, ''],
  [3, 'k'],
  [6, 'M'],
  [9, 'G'],
  [12, 'T'],
];

/** Units that read badly with a prefix ("160 mA²s"): shown as plain significant figures. */
const PLAIN_UNITS = new Set(['A²s', '%', '°C', 'K', 'dB', '×']);

function joinUnit(number: string, unitText: string): string {
  return unitText ? `${number} ${unitText}` : number;
}

/** Engineering notation with an SI prefix: formatEng(4.7e-4, 'F') → "470 µF"; formatEng(0.02, 'Ω') → "20 mΩ". */
export function formatEng(value: number, unitText: string, digits = 3): string {
  if (!Number.isFinite(value)) return joinUnit(Number.isNaN(value) ? 'NaN' : value > 0 ? '∞' : '-∞', unitText);
  if (value === 0) return joinUnit('0', unitText);
  const magnitude = Math.abs(value);
  if (PLAIN_UNITS.has(unitText)) {
    const text =
      magnitude >= 1e-3 && magnitude < 1e6 ? String(Number(value.toPrecision(digits))) : value.toExponential(digits - 1);
    return joinUnit(text, unitText);
  }
  if (magnitude < 1e-15 || magnitude >= 1e15) return joinUnit(value.toExponential(digits - 1), unitText);
  let exponent = Math.floor(Math.log10(magnitude) / 3) * 3;
  exponent = Math.min(12, Math.max(-15, exponent));
  let mantissa = Number((value / 10 ** exponent).toPrecision(digits));
  if (Math.abs(mantissa) >= 1000 && exponent < 12) {
    exponent += 3;
    mantissa = Number((value / 10 ** exponent).toPrecision(digits));
  }
  const prefix = ENG_PREFIXES.find(([e]) => e === exponent)?.[1] ?? '';
  return joinUnit(String(mantissa), `${prefix}${unitText}`);
}
