/**
 * Parts as CSV: the downloadable template, export, and import with per-row errors.
 *
 * One sheet for every kind: `kind`, the text columns, then one column per rating (PART_FIELDS),
 * headed with its SI unit ("capacitance (F)"). A rating that does not apply to a row's kind stays
 * empty. Export writes SI numbers (exact round trip); import also takes values with units
 * ("940 µF", "3 mΩ", "10 %").
 *
 * Import is all or nothing: when any row fails, nothing is imported and every failing row is
 * reported with its row number (as a spreadsheet shows it: the header is row 1) and column, unless
 * `validOnly` asks for the rows that pass. A header problem (unknown or missing column) fails the
 * whole file either way.
 *
 * Export guards against formula injection: a cell that starts with =, +, −, -, @, a tab or a carriage
 * return gets a leading apostrophe, so that a spreadsheet shows it as text instead of running it;
 * import takes that apostrophe off again.
 */
import Papa from 'papaparse';

import { captureText } from '../capture/bytes';
import { CaptureError } from '../capture/errors';
import {
  PART_FIELD_KEYS,
  PART_FIELDS,
  KIND_FIELDS,
  KIND_LABELS,
  PART_KINDS,
  safeParsePart,
  type Part,
  type PartField,
  type PartKind,
} from './schema';

const TEXT_COLUMNS = ['kind', 'partNumber', 'description', 'maker', 'notes'] as const;
/** Every column in order; `id` last (empty in the template, kept on export for a round trip). */
export const PARTS_CSV_COLUMNS = [...TEXT_COLUMNS, ...PART_FIELD_KEYS, 'id'] as const;
export type PartsCsvColumn = (typeof PARTS_CSV_COLUMNS)[number];

/** Parts files are small; a larger file is a mistake (or a capture in the wrong form). */
export const PARTS_CSV_MAX_BYTES = 2 * 1024 * 1024;

function headerOf(column: PartsCsvColumn): string {
  const info = (PART_FIELDS as Record<string, { unit: string }>)[column];
  return info && info.unit ? `${column} (${info.unit})` : column;
}

const DANGEROUS = /^'*[=+\-\u2212@\t\r]/;

/** A cell as it is safe to hand to a spreadsheet. */
export function escapeCell(cell: string): string {
  return DANGEROUS.test(cell) ? `'${cell}` : cell;
}

/** The inverse of escapeCell. */
export function unescapeCell(cell: string): string {
  return cell.startsWith("'") && DANGEROUS.test(cell) ? cell.slice(1) : cell;
}

function write(rows: string[][], bom: boolean): string {
  const body = Papa.unparse(
    rows.map((row) => row.map(escapeCell)),
    // A cell with ";" is quoted as well: spreadsheets whose list separator is ";" would split it there.
    { newline: '\r\n', quotes: (value: unknown) => typeof value === 'string' && value.includes(';'), escapeFormulae: false },
  );
  return `${bom ? '\uFEFF' : ''}${body}\r\n`;
}

function rowOf(part: Part): string[] {
  const record = part as unknown as Record<string, string | number | undefined>;
  return PARTS_CSV_COLUMNS.map((column) => {
    const value = record[column];
    return value === undefined ? '' : String(value);
  });
}

/** CSV of the parts, SI numbers, CRLF line ends; `bom` adds a UTF-8 BOM for spreadsheet programs. */
export function exportPartsCsv(parts: Part[], options: { bom?: boolean } = {}): string {
  return write([PARTS_CSV_COLUMNS.map(headerOf), ...parts.map(rowOf)], options.bom ?? false);
}

/** Example rows for the template: one per kind, values with units to show what is accepted. */
const TEMPLATE_ROWS: Record<PartKind, Partial<Record<PartsCsvColumn, string>>> = {
  capacitor: {
    partNumber: 'NF-CAP-940-900',
    description: 'DC-link film capacitor bank, 940 µF',
    capacitance: '940 µF',
    tolerance: '10 %',
    ratedVoltage: '900 V',
    surgeVoltage: '990 V',
    esr: '3 mΩ',
  },
  resistor: {
    partNumber: 'NF-RES-47R-PRE',
    description: 'Precharge resistor, wirewound, pulse rated',
    resistance: '47 Ω',
    tolerance: '5 %',
    pulseEnergy: '450 J',
    pulseDuration: '200 ms',
    continuousPower: '50 W',
  },
  inductor: {
    partNumber: 'NF-IND-22U-60A',
    description: 'Input filter choke',
    inductance: '22 µH',
    saturationCurrent: '60 A',
    dcr: '4 mΩ',
  },
  contactor: {
    partNumber: 'NF-CON-800-250',
    description: 'Bypass contactor, 800 V DC',
    makeCurrent: '600 A',
    carryCurrent: '250 A',
    ratedVoltage: '1000 V',
  },
  fuse: {
    partNumber: 'NF-FUS-250-1000',
    description: 'DC-link fuse',
    meltingI2t: '18 kA²s',
    ratedCurrent: '250 A',
    ratedVoltage: '1000 V',
  },
  semiconductor: {
    partNumber: 'NF-DIO-1200-300',
    description: 'Freewheel diode',
    blockingVoltage: '1200 V',
    surgeCurrent: '300 A',
    i2t: '450 A²s',
  },
};

/** The downloadable template: the header and one example row per kind. */
export function partsCsvTemplate(): string {
  const rows = PART_KINDS.map((kind) =>
    PARTS_CSV_COLUMNS.map((column) => (column === 'kind' ? kind : (TEMPLATE_ROWS[kind][column] ?? ''))),
  );
  return write([PARTS_CSV_COLUMNS.map(headerOf), ...rows], false);
}

export interface PartCsvError {
  /** Spreadsheet row: the header is row 1, the first part row 2. */
  row: number;
  /** The column name as the template heads it without its unit ("ratedVoltage"); null for the row. */
  column: PartsCsvColumn | string | null;
  message: string;
}

export interface PartsImport {
  /** The parts to store: all rows, or none when a row failed (unless validOnly). */
  parts: Part[];
  /** Every problem found; empty when the whole file is good. */
  errors: PartCsvError[];
  /** Part rows in the file (blank rows not counted). */
  rows: number;
  /** Rows that passed. */
  validRows: number;
}

/** The separator the header line uses most (the header is column names: no quotes, no data). */
function delimiterOf(text: string): ',' | ';' | '\t' {
  const header = text.split('\n').find((candidate) => candidate.trim() !== '') ?? '';
  const count = (mark: string) => header.split(mark).length - 1;
  const best = ([',', ';', '\t'] as const).map((mark) => ({ mark, n: count(mark) })).sort((a, b) => b.n - a.n)[0];
  return best.n > 0 ? best.mark : ',';
}

function normaliseHeader(cell: string): string {
  return cell
    .trim()
    .replace(/\s*\([^)]*\)\s*$/, '')
    .trim();
}

/**
 * Reads a parts CSV (comma, semicolon or tab separated). Never throws for content: problems come
 * back in `errors`. `validOnly`: import the rows that pass even if others fail.
 */
export function importPartsCsv(input: string | Uint8Array, options: { validOnly?: boolean } = {}): PartsImport {
  const fail = (error: PartCsvError): PartsImport => ({ parts: [], errors: [error], rows: 0, validRows: 0 });
  let text: string;
  try {
    text = captureText(input, PARTS_CSV_MAX_BYTES);
  } catch (error) {
    if (error instanceof CaptureError) return fail({ row: 0, column: null, message: error.message });
    throw error;
  }
  const normalised = text.replace(/\r\n?/g, '\n');
  const records = Papa.parse<string[]>(normalised, {
    delimiter: delimiterOf(normalised),
    skipEmptyLines: false,
    newline: '\n',
  }).data;
  const isBlank = (record: string[]) => record.every((cell) => cell.trim() === '');
  const headerIndex = records.findIndex((record) => !isBlank(record));
  if (headerIndex === -1) return fail({ row: 1, column: null, message: 'the file is empty; start from the template' });

  const headerRow = headerIndex + 1;
  const header = records[headerIndex].map(normaliseHeader);
  const lower = new Map(PARTS_CSV_COLUMNS.map((column) => [column.toLowerCase(), column]));
  const columns: (PartsCsvColumn | null)[] = [];
  const headerErrors: PartCsvError[] = [];
  header.forEach((name, k) => {
    const column = lower.get(name.toLowerCase()) ?? null;
    if (name === '' && k === header.length - 1) {
      columns.push(null);
      return;
    }
    if (!column)
      headerErrors.push({ row: headerRow, column: name, message: `unknown column "${name}"; the template lists the columns` });
    else if (columns.includes(column))
      headerErrors.push({ row: headerRow, column: name, message: `column "${name}" appears twice` });
    columns.push(column);
  });
  for (const required of ['kind', 'partNumber'] as const) {
    if (!columns.includes(required))
      headerErrors.push({ row: headerRow, column: required, message: `the "${required}" column is missing` });
  }
  if (headerErrors.length) return { parts: [], errors: headerErrors, rows: 0, validRows: 0 };

  const parts: Part[] = [];
  const errors: PartCsvError[] = [];
  const seen = new Map<string, number>();
  let rows = 0;
  for (let r = headerIndex + 1; r < records.length; r++) {
    const record = records[r];
    if (isBlank(record)) continue;
    rows++;
    const row = r + 1;
    const rowErrors: PartCsvError[] = [];
    if (record.length > columns.length && record.slice(columns.length).some((cell) => cell.trim() !== '')) {
      rowErrors.push({ row, column: null, message: `has ${record.length} cells; the header has ${columns.length} columns` });
    }
    const cells: Partial<Record<PartsCsvColumn, string>> = {};
    columns.forEach((column, k) => {
      const cell = unescapeCell((record[k] ?? '').trim());
      if (column && cell !== '') cells[column] = cell;
    });
    const kind = cells.kind?.toLowerCase() as PartKind | undefined;
    const input: Record<string, string> = {};
    for (const [column, cell] of Object.entries(cells) as [PartsCsvColumn, string][])
      input[column] = column === 'kind' ? cell.toLowerCase() : cell;
    if (kind && (PART_KINDS as readonly string[]).includes(kind)) {
      const allowed: readonly PartField[] = [...KIND_FIELDS[kind].required, ...KIND_FIELDS[kind].optional];
      for (const field of PART_FIELD_KEYS) {
        if (input[field] !== undefined && !allowed.includes(field)) {
          rowErrors.push({ row, column: field, message: `does not apply to ${KIND_LABELS[kind]}; leave it empty` });
          delete input[field];
        }
      }
    }
    const result = safeParsePart(input);
    if (!result.ok) {
      for (const issue of result.issues) {
        const column = issue.path.split('.')[0] || null;
        rowErrors.push({ row, column, message: issue.message });
      }
    }
    const number = cells.partNumber?.toLowerCase();
    if (number) {
      const earlier = seen.get(number);
      if (earlier !== undefined)
        rowErrors.push({ row, column: 'partNumber', message: `"${cells.partNumber}" is already on row ${earlier}` });
      else seen.set(number, row);
    }
    if (rowErrors.length) errors.push(...rowErrors);
    else if (result.ok) parts.push(result.part);
  }
  if (rows === 0) errors.push({ row: headerRow, column: null, message: 'the file has a header but no parts' });
  const validRows = parts.length;
  return { parts: errors.length && !options.validOnly ? [] : parts, errors, rows, validRows };
}
