import { readFileSync } from 'fs';
import { join } from 'path';

import * as fc from 'fast-check';

import { CaptureError, DEFAULT_MAX_BYTES, parseCapture, type CaptureErrorCode } from '@/sim/capture';
import { DesignError } from '@/sim';

const fixture = (name: string) => new Uint8Array(readFileSync(join(__dirname, '..', 'fixtures', 'captures', name)));

/** The CaptureError a call throws (fails the test if it throws nothing or something else). */
function captureErrorOf(run: () => unknown): CaptureError {
  try {
    run();
  } catch (error) {
    if (error instanceof CaptureError) return error;
    throw error;
  }
  throw new Error('expected a CaptureError, but the file was accepted');
}

describe('parseCapture: separators and decimal marks', () => {
  // Same three samples, written five ways.
  it.each([
    ['comma, decimal point', 'time,v\n0,1.5\n0.001,2.25\n0.002,-3e-1\n', ',', '.'],
    ['semicolon, decimal comma', 'time;v\n0;1,5\n0,001;2,25\n0,002;-3e-1\n', ';', ','],
    ['semicolon, decimal point', 'time;v\n0;1.5\n0.001;2.25\n0.002;-3e-1\n', ';', '.'],
    ['tab, decimal point', 'time\tv\n0\t1.5\n0.001\t2.25\n0.002\t-3e-1\n', '\t', '.'],
    ['tab, decimal comma', 'time\tv\n0\t1,5\n0,001\t2,25\n0,002\t-3e-1\n', '\t', ','],
  ])('reads %s', (_label, text, delimiter, decimal) => {
    const parsed = parseCapture(text);
    expect(parsed.delimiter).toBe(delimiter);
    expect(parsed.decimal).toBe(decimal);
    expect(parsed.header).toEqual(['time', 'v']);
    expect(Array.from(parsed.time)).toEqual([0, 0.001, 0.002]);
    expect(parsed.channels).toHaveLength(1);
    expect(Array.from(parsed.channels[0])).toEqual([1.5, 2.25, -0.3]);
    expect(parsed.rows).toBe(3);
  });

  it('takes the separator and decimal mark it is told instead of guessing', () => {
    // Integers only: "1;2" could be either decimal mark; told ',' it reads the same numbers.
    const parsed = parseCapture('0;10\n1;20\n', { delimiter: ';', decimal: ',' });
    expect(parsed.decimal).toBe(',');
    expect(Array.from(parsed.channels[0])).toEqual([10, 20]);
  });

  it('refuses a comma as both separator and decimal mark, naming the option', () => {
    expect(() => parseCapture('0,1\n', { delimiter: ',', decimal: ',' })).toThrow(DesignError);
  });

  it('reads scientific notation in either case and with a sign', () => {
    const parsed = parseCapture('t,x\n1E-06,+2.5e+02\n2e-6,-.5E1\n3.E-6,7\n');
    expect(Array.from(parsed.time)).toEqual([1e-6, 2e-6, 3e-6]);
    expect(Array.from(parsed.channels[0])).toEqual([250, -5, 7]);
  });
});

describe('parseCapture: headers, preamble, BOM, line endings, offsets', () => {
  it('reads a scope export with a BOM, CRLF, four preamble lines and a pre-trigger record', () => {
    const parsed = parseCapture(fixture('scope-preamble.csv'));
    expect(parsed.header).toEqual(['Time', 'CH1', 'CH2']);
    expect(parsed.skippedLines).toEqual([1, 2, 3, 4]); // line 5 is blank, line 6 the header
    expect(parsed.rows).toBe(6);
    expect(parsed.rowLines[0]).toBe(7);
    expect(parsed.time[0]).toBe(-4e-6);
    expect(parsed.time[2]).toBe(0);
    expect(parsed.channels[1][5]).toBe(0.72);
    expect(parsed.columns.map((c) => c.name)).toEqual(['Time', 'CH1', 'CH2']);
    expect(parsed.columns[1].sample).toEqual([0.0125, -0.008, 0.021, 1.52, 3.01]);
    expect(parsed.preview[0]).toEqual(['-4.0E-06', '0.0125', '0.0']);
  });

  it('reads a logger file with semicolons and decimal commas', () => {
    const parsed = parseCapture(fixture('logger-semicolon.csv'));
    expect(parsed.delimiter).toBe(';');
    expect(parsed.decimal).toBe(',');
    expect(parsed.header).toEqual(['Zeit [ms]', 'U_C [V]', 'I [A]']);
    expect(Array.from(parsed.time)).toEqual([0, 0.5, 1, 1.5, 2]);
    expect(Array.from(parsed.channels[1])).toEqual([0, 1.75, 3.125, 2.875, 1.25]);
  });

  it('reads a TSV export', () => {
    const parsed = parseCapture(fixture('bench.tsv'));
    expect(parsed.delimiter).toBe('\t');
    expect(Array.from(parsed.channels[0])).toEqual([400, 401.5, 402.25, 401]);
  });

  it('reads a file without a header and names the columns by number', () => {
    const parsed = parseCapture(fixture('no-header.csv'));
    expect(parsed.header).toBeNull();
    expect(parsed.columns.map((c) => c.name)).toEqual(['Column 1', 'Column 2']);
    expect(parsed.rows).toBe(4);
    expect(parsed.skippedLines).toEqual([]);
  });

  it('with hasHeader false, a text line before the data is preamble, not a header', () => {
    const parsed = parseCapture('Time,CH1\n0,1\n1,2\n', { hasHeader: false });
    expect(parsed.header).toBeNull();
    expect(parsed.skippedLines).toEqual([1]);
  });

  it('with hasHeader true, the first row is the header even when it is numbers', () => {
    const parsed = parseCapture('1,2\n0,5\n1,6\n', { hasHeader: true });
    expect(parsed.header).toEqual(['1', '2']);
    expect(Array.from(parsed.channels[0])).toEqual([5, 6]);
  });

  it('treats a header that follows a numeric preamble line as the header', () => {
    const parsed = parseCapture('2500,1e-6\nTime,CH1\n0,1\n1,2\n');
    expect(parsed.header).toEqual(['Time', 'CH1']);
    expect(parsed.skippedLines).toEqual([1]);
    expect(parsed.rows).toBe(2);
  });

  it('handles lone CR line ends, blank lines in the data, and a separator at the end of every line', () => {
    const parsed = parseCapture('t,a,b,\r0,1,2,\r\r1,3,4,\r');
    expect(parsed.columns).toHaveLength(3);
    expect(Array.from(parsed.time)).toEqual([0, 1]);
    expect(parsed.rowLines[1]).toBe(4);
  });

  it('adds the time offset to the time column, so a pre-trigger record starts below zero', () => {
    const parsed = parseCapture('t,v\n0,1\n0.5,2\n1,3\n', { timeOffset: -0.25 });
    expect(Array.from(parsed.time)).toEqual([-0.25, 0.25, 0.75]);
    expect(Array.from(parsed.values[0])).toEqual([0, 0.5, 1]); // as written
    expect(parsed.timeOffset).toBe(-0.25);
  });

  it('reads quoted cells and an 8-bit (Windows-1252) header with µ', () => {
    const bytes = new Uint8Array([
      ...Buffer.from('"Time (', 'latin1'),
      0xb5,
      ...Buffer.from('s)","CH1"\n"0","1.5"\n"1","2.5"\n', 'latin1'),
    ]);
    const parsed = parseCapture(bytes);
    expect(parsed.header).toEqual(['Time (µs)', 'CH1']);
    expect(Array.from(parsed.channels[0])).toEqual([1.5, 2.5]);
  });

  it('reads quoted decimal-comma cells in a semicolon file', () => {
    const parsed = parseCapture('"t";"v"\n"0";"1,5"\n"0,5";"2,5"\n');
    expect(parsed.decimal).toBe(',');
    expect(Array.from(parsed.time)).toEqual([0, 0.5]);
  });
});

describe('parseCapture: bad files say what and where', () => {
  const binaryWaveform = () => {
    // A Float32 waveform dump renamed .csv: full of NUL and control bytes.
    const samples = new Float32Array(256).map((_, k) => Math.sin(k / 10));
    return new Uint8Array(samples.buffer);
  };
  const controlNoise = () => {
    // Binary without a single NUL: mostly control bytes.
    const bytes = new Uint8Array(4096);
    for (let k = 0; k < bytes.length; k++) bytes[k] = k % 3 === 0 ? 0x41 : 1 + (k % 30);
    return bytes;
  };
  const overLimit = () => new Uint8Array(DEFAULT_MAX_BYTES + 1).fill(0x31);

  it.each<[string, () => string | Uint8Array, CaptureErrorCode, number | undefined, number | undefined, RegExp]>([
    ['an empty file', () => '', 'empty', undefined, undefined, /empty/],
    ['a file of blank lines', () => '\r\n \r\n\t\r\n', 'empty', undefined, undefined, /empty/],
    [
      'a header and no numbers',
      () => fixture('bad-header-only.csv'),
      'no-numeric-rows',
      undefined,
      undefined,
      /no rows of numbers/,
    ],
    ['prose', () => 'Dear bench team,\nhere is the capture.\n', 'no-numeric-rows', undefined, undefined, /no rows of numbers/],
    ['one value per line', () => '0\n1\n2\n', 'too-few-columns', undefined, undefined, /single value/],
    [
      'time going backwards',
      () => fixture('bad-time-backwards.csv'),
      'non-monotonic-time',
      5,
      undefined,
      /line 5: 0\.0015 follows 0\.002 on line 4/,
    ],
    ['a repeated time', () => 't,v\n0,1\n1,2\n1,3\n', 'non-monotonic-time', 4, undefined, /does not increase at line 4/],
    [
      'mixed column counts',
      () => fixture('bad-mixed-columns.csv'),
      'mixed-column-counts',
      4,
      undefined,
      /line 4 has 2 columns, but the data rows have 3/,
    ],
    [
      'a non-numeric cell',
      () => fixture('bad-cell.csv'),
      'non-numeric-cell',
      8,
      2,
      /line 8, column 2 \("CH1"\): "overload" is not a number/,
    ],
    ['an empty cell', () => 't,a,b\n0,1,2\n1,,3\n2,4,5\n', 'non-numeric-cell', 3, 2, /line 3, column 2 \("a"\) is empty/],
    ['a decimal comma in a comma file', () => 't;a\n0;1.5\n1;2.5\n2;3,5\n', 'non-numeric-cell', 4, 2, /decimal point/],
    [
      'a binary file with a .csv name (NUL bytes)',
      binaryWaveform,
      'binary',
      undefined,
      undefined,
      /this looks like a binary file, not a CSV export/,
    ],
    ['a binary file without NUL bytes', controlNoise, 'binary', undefined, undefined, /binary file/],
    ['a NUL inside a text string', () => 't,v\n0,1\u0000\n', 'binary', undefined, undefined, /binary file/],
    ['a file over the 20 MB limit', overLimit, 'too-large', undefined, undefined, /over the 20\.0 MB limit/],
  ])('refuses %s', (_label, input, code, line, column, message) => {
    const error = captureErrorOf(() => parseCapture(input()));
    expect(error.code).toBe(code);
    expect(error.line).toBe(line);
    expect(error.column).toBe(column);
    expect(error.message).toMatch(message);
  });

  it('applies a smaller size limit when given one, to strings too (UTF-8 bytes)', () => {
    const text = 't,v\n0,1\n1,2\n'; // 12 bytes
    expect(parseCapture(text, { maxBytes: 12 }).rows).toBe(2);
    expect(captureErrorOf(() => parseCapture(text, { maxBytes: 11 })).code).toBe('too-large');
    expect(captureErrorOf(() => parseCapture('t,µ\n0,1\n', { maxBytes: 8 })).code).toBe('too-large'); // µ is 2 bytes
  });
});

describe('parseCapture: properties', () => {
  const layouts = [
    { delimiter: ',', decimal: '.' },
    { delimiter: ';', decimal: ',' },
    { delimiter: ';', decimal: '.' },
    { delimiter: '\t', decimal: '.' },
    { delimiter: '\t', decimal: ',' },
  ] as const;

  it('reads back any increasing record it is given, in every layout, with or without header and CRLF', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 0, max: layouts.length - 1 }),
        fc.array(fc.double({ min: 1e-9, max: 1e3, noNaN: true }), { minLength: 2, maxLength: 40 }),
        fc.array(
          fc.double({ min: -1e6, max: 1e6, noNaN: true }).map((x) => (x === 0 ? 0 : x)),
          { minLength: 40, maxLength: 40 },
        ),
        fc.boolean(),
        fc.boolean(),
        (which, steps, values, header, crlf) => {
          const { delimiter, decimal } = layouts[which];
          const times: number[] = [];
          let t = -1;
          for (const step of steps) times.push((t += step));
          const write = (x: number) => (decimal === ',' ? String(x).replace('.', ',') : String(x));
          const lines = times.map((time, k) => `${write(time)}${delimiter}${write(values[k])}`);
          if (header) lines.unshift(`time${delimiter}ch1`);
          const parsed = parseCapture(lines.join(crlf ? '\r\n' : '\n'), { delimiter, decimal });
          expect(Array.from(parsed.time)).toEqual(times);
          expect(Array.from(parsed.channels[0])).toEqual(values.slice(0, times.length));
          expect(parsed.header !== null).toBe(header);
        },
      ),
      { numRuns: 150, seed: 8 },
    );
  });

  it('reads a 100 000-row export and keeps the file line of every row', () => {
    const lines = ['Time,CH1,CH2'];
    for (let k = 0; k < 100_000; k++)
      lines.push(`${(k * 1e-7).toExponential(6)},${Math.sin(k / 50).toFixed(5)},${Math.cos(k / 50).toFixed(5)}`);
    const parsed = parseCapture(new TextEncoder().encode(lines.join('\r\n')));
    expect(parsed.rows).toBe(100_000);
    expect(parsed.rowLines[99_999]).toBe(100_001);
  });
});
