/**
 * Temperatures for the mains schema and the spread's tolerance bands. Kept apart from schema.ts,
 * which imports sim/design.ts: sim/design.ts imports sim/spread/tolerances.ts, which needs this.
 */
import { parseQuantity } from '../units';

export const NUMBER = '[+-]?(?:\\d+\\.?\\d*|\\.\\d+)(?:[eE][+-]?\\d+)?';
const KELVIN = new RegExp(`^\\s*(${NUMBER})\\s*K\\s*$`);
const CELSIUS = new RegExp(`^\\s*(${NUMBER})\\s*(?:°\\s*C|℃|degC)\\s*$`);

/**
 * A temperature in K: a number (K), "298.15 K", "25 °C". Kelvin and Celsius are read here (Celsius
 * also to spare a browser mathjs's first-use load); anything else ("77 degF") goes to parseQuantity.
 */
export function parseTemperature(input: number | string, field?: string): number {
  if (typeof input === 'string') {
    const kelvin = KELVIN.exec(input);
    if (kelvin) return Number(kelvin[1]);
    const celsius = CELSIUS.exec(input);
    if (celsius) return Number(celsius[1]) + 273.15;
  }
  return parseQuantity(input, 'temperature', field);
}

