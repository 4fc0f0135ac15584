/**
 * Which separator and decimal mark a capture file uses, read from its first lines (split by
 * papaparse under each separator, so that quoted cells count as one).
 *
 * Every plausible pair is tried on a sample of lines and scored by how many lines come out as rows of
 * two or more numbers. A comma-separated file with decimal points, a semicolon file with decimal
 * commas ("0,5;12,25") and a tab file of either kind each win only under their own pair: under the
 * wrong one a cell is not a number or a row has a single cell. Ties go to tab, then semicolon, then
 * comma, and to the decimal point.
 */
import Papa from 'papaparse';

import { isNumericCell, type DecimalMark } from './numbers';

export type Delimiter = ',' | ';' | '\t';

export interface Layout {
  delimiter: Delimiter;
  decimal: DecimalMark;
  /** Most common number of cells in a numeric row: the expected column count. */
  columns: number;
  /** Numeric rows end with an empty cell (a separator at the end of every line). */
  trailingSeparator: boolean;
  /** Numeric rows found in the sample under this layout; 0 means none. */
  numericRows: number;
}

const CANDIDATES: { delimiter: Delimiter; decimal: DecimalMark }[] = [
  { delimiter: '\t', decimal: '.' },
  { delimiter: '\t', decimal: ',' },
  { delimiter: ';', decimal: '.' },
  { delimiter: ';', decimal: ',' },
  { delimiter: ',', decimal: '.' },
];

/** Cells of a row with one empty cell at the end removed, when the file writes a trailing separator. */
export function withoutTrailing(cells: string[], trailingSeparator: boolean): string[] {
  return trailingSeparator && cells.length > 1 && cells[cells.length - 1].trim() === '' ? cells.slice(0, -1) : cells;
}

function score(rows: string[][], delimiter: Delimiter, decimal: DecimalMark): Layout {
  const counts = new Map<number, number>();
  let numericRows = 0;
  let trailing = 0;
  for (const row of rows) {
    let cells = row.map((cell) => cell.trim());
    const endsEmpty = cells.length > 2 && cells[cells.length - 1] === '';
    if (endsEmpty) cells = cells.slice(0, -1);
    if (cells.length < 2 || !cells.every((cell) => isNumericCell(cell, decimal))) continue;
    numericRows++;
    if (endsEmpty) trailing++;
    counts.set(cells.length, (counts.get(cells.length) ?? 0) + 1);
  }
  let columns = 0;
  let best = 0;
  for (const [count, times] of counts) {
    if (times > best || (times === best && count > columns)) {
      columns = count;
      best = times;
    }
  }
  return { delimiter, decimal, columns, trailingSeparator: numericRows > 0 && trailing * 2 > numericRows, numericRows };
}

export function detectLayout(
  sampleLines: string[],
  wanted: { delimiter: 'auto' | Delimiter; decimal: 'auto' | DecimalMark },
): Layout {
  const text = sampleLines.filter((line) => line.trim() !== '').join('\n');
  const rowsBy = new Map<Delimiter, string[][]>();
  const rowsFor = (delimiter: Delimiter) => {
    let rows = rowsBy.get(delimiter);
    if (!rows) {
      rows = Papa.parse<string[]>(text, { delimiter, newline: '\n', quoteChar: '"' }).data;
      rowsBy.set(delimiter, rows);
    }
    return rows;
  };
  const candidates = CANDIDATES.filter(
    (c) =>
      (wanted.delimiter === 'auto' || c.delimiter === wanted.delimiter) &&
      (wanted.decimal === 'auto' || c.decimal === wanted.decimal),
  );
  let best: Layout | null = null;
  for (const candidate of candidates) {
    const layout = score(rowsFor(candidate.delimiter), candidate.delimiter, candidate.decimal);
    if (!best || layout.numericRows > best.numericRows) best = layout;
  }
  return best ?? { delimiter: ',', decimal: '.', columns: 0, trailingSeparator: false, numericRows: 0 };
}
