// CSV that a spreadsheet opens safely: RFC 4180 quoting, and any text cell a spreadsheet would run
// as a formula (starting with = + - − @, a tab or a carriage return) gets a leading apostrophe.
// Plain numbers (-12.5, 1e-6) are data, not formulas, and are written as they are. A cell with a
// semicolon is quoted too: spreadsheets in locales whose list separator is ";" split an unquoted
// cell there, and the part after it could start a formula (`Bus A;=cmd|…`).
const FORMULA_START = /^[=+\-−@\t\r]/;
const PLAIN_NUMBER = /^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$/;

export function csvCell(value: string | number | null | undefined): string {
  if (value === null || value === undefined) return '';
  if (typeof value === 'number') return Number.isFinite(value) ? String(value) : '';
  let text = value;
  if (FORMULA_START.test(text) && !PLAIN_NUMBER.test(text)) text = `'${text}`;
  return /[",;\r\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

export function csvRow(cells: (string | number | null | undefined)[]): string {
  return cells.map(csvCell).join(',');
}
