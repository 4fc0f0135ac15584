/**
 * `parseCapture`: a bench capture file (CSV or TSV text exported by a scope or a data logger) to
 * columns of numbers, or a CaptureError that says what is wrong and on which line and column.
 *
 * The file may start with a few lines of scope metadata (the preamble), then an optional header
 * row, then one sample per line. Steps:
 *   1. bytes → text: size limit, binary test, UTF-8 (or Windows-1252), BOM dropped (bytes.ts);
 *   2. separator and decimal mark from the first lines (detect.ts);
 *   3. papaparse reads every row; the first row of numbers starts the data, the row before it is
 *      the header when it has as many cells, the rows before that are the preamble (skippedLines);
 *   4. every data row must have the same number of cells, every cell a number, and the time
 *      column must increase strictly.
 */
import Papa from 'papaparse';

import { DesignError } from '../errors';
import { captureText, DEFAULT_MAX_BYTES } from './bytes';
import { detectLayout, withoutTrailing, type Delimiter, type Layout } from './detect';
import { CaptureError } from './errors';
import { isNumericCell, parseCell, type DecimalMark } from './numbers';

export interface ParseCaptureOptions {
  delimiter?: 'auto' | Delimiter;
  decimal?: 'auto' | DecimalMark;
  /** 'auto': the row just before the first row of numbers is the header if it has as many cells. */
  hasHeader?: 'auto' | boolean;
  /** Added to every time value, in the file's own time unit (a pre-trigger offset). Default 0. */
  timeOffset?: number;
  /** Which column (0-based) holds the time; it must increase strictly. Default 0. */
  timeColumn?: number;
  /** Default 20 MB (20 × 1024 × 1024 bytes). */
  maxBytes?: number;
}

export interface CaptureColumn {
  /** 0-based position in the row. */
  index: number;
  /** From the header, or "Column 1", "Column 2", … without one. */
  name: string;
  /** The first few values, as numbers, for the mapping form. */
  sample: number[];
}

export interface ParsedCapture {
  columns: CaptureColumn[];
  /** Number of data rows (samples). */
  rows: number;
  /** The time column plus timeOffset, in the file's own unit. */
  time: Float64Array;
  /** Every other column, in file order. */
  channels: Float64Array[];
  /** Every column by index, as written (the time column without the offset). */
  values: Float64Array[];
  timeColumn: number;
  timeOffset: number;
  /** 1-based file line of each data row, for messages about a row found later (mapCapture). */
  rowLines: Int32Array;
  delimiter: Delimiter;
  decimal: DecimalMark;
  header: string[] | null;
  /** The first 10 data rows as written. */
  preview: string[][];
  /** 1-based lines before the data that are neither blank nor the header (scope metadata). */
  skippedLines: number[];
}

const PREVIEW_ROWS = 10;
const SAMPLE_VALUES = 5;
/** Lines read to detect the layout; a scope's preamble is a few dozen lines at most. */
const SAMPLE_LINES = 500;
/** A row of text this early in the data is a header after a numeric preamble line, not a bad row. */
const LATE_HEADER_ROWS = 5;

class ColumnBuffer {
  data = new Float64Array(1024);
  length = 0;

  push(value: number) {
    if (this.length === this.data.length) {
      const grown = new Float64Array(this.data.length * 2);
      grown.set(this.data);
      this.data = grown;
    }
    this.data[this.length++] = value;
  }

  done(): Float64Array {
    return this.data.slice(0, this.length);
  }
}

class LineBuffer {
  data = new Int32Array(1024);
  length = 0;

  push(value: number) {
    if (this.length === this.data.length) {
      const grown = new Int32Array(this.data.length * 2);
      grown.set(this.data);
      this.data = grown;
    }
    this.data[this.length++] = value;
  }
}

interface Row {
  line: number;
  cells: string[];
}

function readOptions(options: ParseCaptureOptions) {
  const delimiter = options.delimiter ?? 'auto';
  const decimal = options.decimal ?? 'auto';
  const issues: { path: string; message: string }[] = [];
  if (!['auto', ',', ';', '\t'].includes(delimiter))
    issues.push({ path: 'delimiter', message: 'must be "auto", ",", ";" or a tab' });
  if (!['auto', '.', ','].includes(decimal)) issues.push({ path: 'decimal', message: 'must be "auto", "." or ","' });
  if (delimiter === ',' && decimal === ',')
    issues.push({ path: 'decimal', message: 'a comma cannot be both the separator and the decimal mark' });
  const timeOffset = options.timeOffset ?? 0;
  if (!Number.isFinite(timeOffset)) issues.push({ path: 'timeOffset', message: 'must be a finite number' });
  const timeColumn = options.timeColumn ?? 0;
  if (!Number.isInteger(timeColumn) || timeColumn < 0)
    issues.push({ path: 'timeColumn', message: 'must be a column index (0 or more)' });
  const maxBytes = options.maxBytes ?? DEFAULT_MAX_BYTES;
  if (!(maxBytes > 0)) issues.push({ path: 'maxBytes', message: 'must be greater than 0' });
  if (issues.length) throw new DesignError(issues);
  return { delimiter, decimal, hasHeader: options.hasHeader ?? 'auto', timeOffset, timeColumn, maxBytes };
}

function sampleLines(text: string): string[] {
  const lines: string[] = [];
  let start = 0;
  while (lines.length < SAMPLE_LINES && start <= text.length) {
    const end = text.indexOf('\n', start);
    lines.push(text.slice(start, end === -1 ? text.length : end));
    if (end === -1) break;
    start = end + 1;
  }
  return lines;
}

function noRowsError(lines: string[]): CaptureError {
  const single = lines.some((line) => line.trim() !== '' && (isNumericCell(line, '.') || isNumericCell(line, ',')));
  if (single) {
    return new CaptureError(
      'too-few-columns',
      'each line holds a single value; a capture needs a time column and at least one channel',
    );
  }
  return new CaptureError(
    'no-numeric-rows',
    'no rows of numbers found; a capture needs a time column and at least one channel, one sample per line, separated by commas, semicolons or tabs',
  );
}

function describeColumn(index: number, header: string[] | null): string {
  const name = header?.[index]?.trim();
  return name ? `column ${index + 1} ("${name}")` : `column ${index + 1}`;
}

function badCellError(row: Row, index: number, header: string[] | null, decimal: DecimalMark): CaptureError {
  const cell = row.cells[index].trim();
  const where = `line ${row.line}, ${describeColumn(index, header)}`;
  let message: string;
  if (cell === '') message = `${where} is empty; every data row needs a number in every column`;
  else {
    const other: DecimalMark = decimal === '.' ? ',' : '.';
    const hint = isNumericCell(cell, other) ? ` (the file's numbers use a decimal ${decimal === '.' ? 'point' : 'comma'})` : '';
    message = `${where}: "${cell.length > 40 ? `${cell.slice(0, 40)}…` : cell}" is not a number${hint}`;
  }
  return new CaptureError('non-numeric-cell', message, { line: row.line, column: index + 1 });
}

export function nonMonotonicError(line: number, previousLine: number, value: string, previous: string): CaptureError {
  return new CaptureError(
    'non-monotonic-time',
    `time does not increase at line ${line}: ${value} follows ${previous} on line ${previousLine}; the time column must increase from row to row`,
    { line },
  );
}

/**
 * Reads a bench capture file. Throws CaptureError for a file it cannot use (see errors.ts for the
 * classes), DesignError for invalid options.
 */
export function parseCapture(input: string | Uint8Array, options: ParseCaptureOptions = {}): ParsedCapture {
  const opts = readOptions(options);
  const raw = captureText(input, opts.maxBytes);
  if (raw.trim() === '') throw new CaptureError('empty', 'the file is empty');
  const text = raw.indexOf('\r') === -1 ? raw : raw.replace(/\r\n?/g, '\n');

  const sample = sampleLines(text);
  const layout: Layout = detectLayout(sample, { delimiter: opts.delimiter, decimal: opts.decimal });
  if (layout.numericRows === 0) throw noRowsError(sample);
  const { decimal, columns: width } = layout;
  if (opts.timeColumn >= width) {
    throw new DesignError([
      { path: 'timeColumn', message: `the file has ${width} columns; the time column must be 0 to ${width - 1}` },
    ]);
  }

  let pre: Row[] = [];
  let header: Row | null = null;
  let inData = false;
  let early: Row[] = [];
  let buffers: ColumnBuffer[] = [];
  let lines = new LineBuffer();
  let preview: string[][] = [];
  let previousTime: Row | null = null;
  let failure: CaptureError | null = null;

  const startData = (row: Row): boolean => {
    if (opts.hasHeader !== false && pre.length > 0) {
      const candidate = pre[pre.length - 1];
      if (opts.hasHeader === true || candidate.cells.length === width) header = pre.pop() ?? null;
    } else if (opts.hasHeader === true && pre.length === 0 && header === null) {
      // Told there is a header, and the first row is numbers: it is the header all the same.
      header = row;
      return false;
    }
    inData = true;
    buffers = Array.from({ length: width }, () => new ColumnBuffer());
    lines = new LineBuffer();
    preview = [];
    early = [];
    previousTime = null;
    return true;
  };

  const isNumericRow = (cells: string[]) => cells.length >= 2 && cells.every((cell) => isNumericCell(cell, decimal));

  const takeRow = (row: Row): CaptureError | null => {
    if (row.cells.every((cell) => cell.trim() === '')) return null;
    if (!inData) {
      if (!isNumericRow(row.cells)) {
        pre.push(row);
        return null;
      }
      if (!startData(row)) return null;
    } else if (
      early.length < LATE_HEADER_ROWS &&
      row.cells.length === width &&
      row.cells.every((cell) => !isNumericCell(cell, decimal))
    ) {
      // A text row right after the first few rows of numbers: those were preamble after all.
      pre = [...pre, ...(header ? [header] : []), ...early, row];
      header = null;
      inData = false;
      return null;
    }
    if (row.cells.length !== width) {
      return new CaptureError(
        'mixed-column-counts',
        `line ${row.line} has ${row.cells.length} ${row.cells.length === 1 ? 'column' : 'columns'}, but the data rows have ${width}`,
        { line: row.line },
      );
    }
    for (let j = 0; j < width; j++) {
      const value = parseCell(row.cells[j], decimal);
      if (Number.isNaN(value)) return badCellError(row, j, header?.cells ?? null, decimal);
      buffers[j].push(value);
    }
    const time = buffers[opts.timeColumn];
    if (previousTime && !(time.data[time.length - 1] > time.data[time.length - 2])) {
      return nonMonotonicError(
        row.line,
        previousTime.line,
        row.cells[opts.timeColumn].trim(),
        previousTime.cells[opts.timeColumn].trim(),
      );
    }
    previousTime = row;
    lines.push(row.line);
    if (early.length < LATE_HEADER_ROWS) early.push(row);
    if (preview.length < PREVIEW_ROWS) preview.push(row.cells.map((cell) => cell.trim()));
    return null;
  };

  let line = 1;
  let cursor = 0;
  Papa.parse<string[]>(text, {
    delimiter: layout.delimiter,
    newline: '\n',
    quoteChar: '"',
    skipEmptyLines: false,
    step: (result, parser) => {
      const rowLine = line;
      const end = result.meta.cursor;
      for (let k = text.indexOf('\n', cursor); k !== -1 && k < end; k = text.indexOf('\n', k + 1)) line++;
      cursor = end;
      const cells = withoutTrailing(result.data, layout.trailingSeparator);
      failure = takeRow({ line: rowLine, cells });
      if (failure) parser.abort();
    },
  });
  if (failure) throw failure;
  if (!inData) throw noRowsError(sample);

  const values = buffers.map((buffer) => buffer.done());
  const names = Array.from({ length: width }, (_, j) => (header as Row | null)?.cells[j]?.trim() || `Column ${j + 1}`);
  const timeRaw = values[opts.timeColumn];
  const time = opts.timeOffset === 0 ? timeRaw : timeRaw.map((t) => t + opts.timeOffset);
  return {
    columns: names.map((name, index) => ({ index, name, sample: Array.from(values[index].subarray(0, SAMPLE_VALUES)) })),
    rows: timeRaw.length,
    time,
    channels: values.filter((_, j) => j !== opts.timeColumn),
    values,
    timeColumn: opts.timeColumn,
    timeOffset: opts.timeOffset,
    rowLines: lines.data.slice(0, lines.length),
    delimiter: layout.delimiter,
    decimal,
    header: header ? (header as Row).cells.map((cell) => cell.trim()) : null,
    preview,
    skippedLines: pre.map((row) => row.line),
  };
}
