// Preferred-number series for resistors: IEC 60063:2015, "Preferred number series for resistors and
// capacitors" (E12 and E24 tables). Every E12 value is also an E24 value; a value found in both is
// reported once, under E12, the coarser series that distributors stock most widely.

export type ESeriesName = 'E12' | 'E24';

/** Mantissas of one decade, 10 ≤ m < 100 (IEC 60063:2015, tables 1 and 2). */
export const E12 = [10, 12, 15, 18, 22, 27, 33, 39, 47, 56, 68, 82] as const;
export const E24 = [10, 11, 12, 13, 15, 16, 18, 20, 22, 24, 27, 30, 33, 36, 39, 43, 47, 51, 56, 62, 68, 75, 82, 91] as const;

export const E_SERIES: Record<ESeriesName, readonly number[]> = { E12, E24 };

export interface StandardValue {
  resistance: number;
  series: ESeriesName;
}

/** m·10^(e−1) computed so that 4.7 comes out as the double nearest 4.7, not 4.700000000000001. */
function scale(mantissa: number, decade: number): number {
  const exponent = decade - 1;
  return exponent >= 0 ? mantissa * 10 ** exponent : mantissa / 10 ** -exponent;
}

/**
 * Standard values r with low ≤ r ≤ high (both inclusive), ascending, each value once. `series` lists
 * the series to draw from; a value in several is labelled with the first of E12, E24 it belongs to.
 */
export function standardValuesBetween(
  low: number,
  high: number,
  series: readonly ESeriesName[] = ['E12', 'E24'],
): StandardValue[] {
  if (!(low > 0) || !Number.isFinite(high) || high < low) return [];
  const order: ESeriesName[] = (['E12', 'E24'] as const).filter((s) => series.includes(s));
  const found = new Map<number, ESeriesName>();
  const first = Math.floor(Math.log10(low)) - 1;
  const last = Math.ceil(Math.log10(high)) + 1;
  for (const name of order) {
    for (let decade = first; decade <= last; decade += 1) {
      for (const m of E_SERIES[name]) {
        const r = scale(m, decade);
        // A relative slack of 1e-9 keeps a window edge that is itself a standard value (47 Ω) inside.
        if (r >= low * (1 - 1e-9) && r <= high * (1 + 1e-9) && !found.has(r)) found.set(r, name);
      }
    }
  }
  return [...found.entries()].sort((a, b) => a[0] - b[0]).map(([resistance, s]) => ({ resistance, series: s }));
}
