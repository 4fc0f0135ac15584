/**
 * Numeric cells as scopes and loggers write them: "1.5e-06", "-0.0125", "+3", ".5", and with a
 * decimal comma "1,5E-06". No thousands separators, no units inside a cell, no NaN or infinity
 * (a clipped sample written as "inf" is a bad cell, reported with its line and column).
 */
export type DecimalMark = '.' | ',';

const POINT_NUMBER = /^[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?$/;
const COMMA_NUMBER = /^[+-]?(?:\d+(?:,\d*)?|,\d+)(?:[eE][+-]?\d+)?$/;

/** The cell's value, or NaN when it is not a number written with this decimal mark. */
export function parseCell(cell: string, decimal: DecimalMark): number {
  const text = cell.trim();
  if (decimal === '.') return POINT_NUMBER.test(text) ? Number(text) : NaN;
  return COMMA_NUMBER.test(text) ? Number(text.replace(',', '.')) : NaN;
}

export function isNumericCell(cell: string, decimal: DecimalMark): boolean {
  return !Number.isNaN(parseCell(cell, decimal));
}
