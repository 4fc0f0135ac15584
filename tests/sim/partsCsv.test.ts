import * as fc from 'fast-check';

import {
  demoParts,
  escapeCell,
  exportPartsCsv,
  importPartsCsv,
  parsePart,
  PARTS_CSV_COLUMNS,
  partsCsvTemplate,
  unescapeCell,
  type Part,
} from '@/sim/parts';

const HEADER = PARTS_CSV_COLUMNS.join(',');
/** A CSV line with the given columns filled, the rest empty. */
function line(cells: Partial<Record<(typeof PARTS_CSV_COLUMNS)[number], string>>): string {
  return PARTS_CSV_COLUMNS.map((column) => cells[column] ?? '').join(',');
}

describe('parts CSV: round trip', () => {
  it('export → import gives the same parts back', () => {
    const parts = demoParts().map((part, k) => ({ ...part, id: `part-${k}`, notes: k % 2 ? 'checked, "in house"' : undefined }));
    const clean = parts.map((part) => JSON.parse(JSON.stringify(part)) as Part);
    const csv = exportPartsCsv(clean);
    expect(csv.split('\r\n')[0]).toMatch(/^kind,partNumber,description,maker,notes,capacitance \(F\),resistance \(Ω\)/);
    const back = importPartsCsv(csv);
    expect(back.errors).toEqual([]);
    expect(back.parts).toEqual(clean);
    expect(back.rows).toBe(parts.length);
  });

  it('export → import round-trips any text, including commas, quotes, line breaks and formula starts', () => {
    const text = fc.string({
      maxLength: 30,
      unit: fc.constantFrom('a', 'Z', ' ', ',', ';', '"', "'", '=', '+', '-', '\u2212', '@', '\n', 'µ', 'Ω', '1'),
    });
    fc.assert(
      fc.property(text, text, fc.double({ min: 1e-12, max: 1e6, noNaN: true }), (description, notes, resistance) => {
        const trimmed = (value: string) => value.trim();
        // Text fields are stored trimmed; an empty one is absent.
        const input: Record<string, unknown> = { kind: 'resistor', partNumber: 'NF-RES-X', resistance };
        if (trimmed(description)) input.description = description;
        if (trimmed(notes)) input.notes = notes;
        const part = parsePart(input);
        const back = importPartsCsv(exportPartsCsv([part]));
        expect(back.errors).toEqual([]);
        expect(back.parts).toEqual([part]);
      }),
      { numRuns: 200, seed: 2024 },
    );
  });

  it('the template imports as it is, one example part per kind, values with units', () => {
    const template = partsCsvTemplate();
    expect(template).toContain('940 µF');
    const result = importPartsCsv(template);
    expect(result.errors).toEqual([]);
    expect(result.parts.map((part) => part.kind)).toEqual([
      'capacitor',
      'resistor',
      'inductor',
      'contactor',
      'fuse',
      'semiconductor',
    ]);
    expect(result.parts[0]).toMatchObject({ capacitance: 940e-6, ratedVoltage: 900 });
  });

  it('reads a semicolon-separated sheet, a BOM and bytes', () => {
    const csv = `\uFEFFkind;partNumber;resistance (Ω)\r\nresistor;NF-RES-A;47\r\n`;
    const result = importPartsCsv(new TextEncoder().encode(csv));
    expect(result.errors).toEqual([]);
    expect(result.parts).toEqual([{ kind: 'resistor', partNumber: 'NF-RES-A', resistance: 47 }]);
  });
});

describe('parts CSV: formula injection', () => {
  it.each([
    ['=HYPERLINK("x")', '\'=HYPERLINK("x")'],
    ['+1', "'+1"],
    ['-2', "'-2"],
    ['\u22123', "'\u22123"],
    ['@SUM(A1)', "'@SUM(A1)"],
    ['\tTab', "'\tTab"],
    ["'=already", "''=already"],
    ['plain', 'plain'],
    ["it's", "it's"],
  ])('escapes %j as %j, and reads it back', (cell, escaped) => {
    expect(escapeCell(cell)).toBe(escaped);
    expect(unescapeCell(escapeCell(cell))).toBe(cell);
  });

  it('an exported description that starts with = reaches the sheet as text', () => {
    const part = parsePart({ kind: 'fuse', partNumber: 'NF-FUS-X', meltingI2t: 10, description: '=cmd|"/c calc"!A1' });
    const csv = exportPartsCsv([part]);
    const row = csv.split('\r\n')[1];
    expect(row.startsWith('fuse,NF-FUS-X,')).toBe(true);
    expect(row).toContain(`"'=cmd|""/c calc""!A1"`);
    expect(importPartsCsv(csv).parts[0].description).toBe('=cmd|"/c calc"!A1');
  });

  it('quotes a cell with a semicolon, so a ";" spreadsheet cannot split a formula out of it', () => {
    const part = parsePart({ kind: 'fuse', partNumber: 'NF-FUS-Y', meltingI2t: 10, description: 'Bus A;=cmd|"/c calc"!A1' });
    const csv = exportPartsCsv([part]);
    expect(csv.split('\r\n')[1]).toContain('"Bus A;=cmd|""/c calc""!A1"');
    expect(importPartsCsv(csv).parts[0].description).toBe('Bus A;=cmd|"/c calc"!A1');
  });
});

describe('parts CSV: per-row errors', () => {
  const good1 = line({ kind: 'capacitor', partNumber: 'NF-CAP-A', capacitance: '470 µF', ratedVoltage: '450 V' });
  const bad = line({ kind: 'capacitor', partNumber: 'NF-CAP-B', capacitance: '470 µF', ratedVoltage: '450 A' });
  const good2 = line({ kind: 'resistor', partNumber: 'NF-RES-C', resistance: '47 Ω' });

  it('imports nothing when one row fails, and names its row and column', () => {
    const result = importPartsCsv([HEADER, good1, bad, good2].join('\n'));
    expect(result.parts).toEqual([]);
    expect(result.errors).toHaveLength(1);
    expect(result.errors[0]).toMatchObject({ row: 3, column: 'ratedVoltage' });
    expect(result.errors[0].message).toMatch(/expected a voltage/);
    expect(result.rows).toBe(3);
    expect(result.validRows).toBe(2);
  });

  it('with validOnly, imports the good rows and still reports the bad one', () => {
    const result = importPartsCsv([HEADER, good1, bad, good2].join('\n'), { validOnly: true });
    expect(result.parts.map((part) => part.partNumber)).toEqual(['NF-CAP-A', 'NF-RES-C']);
    expect(result.errors.map((error) => error.row)).toEqual([3]);
  });

  it('counts rows as a spreadsheet does: blank lines and quoted line breaks included', () => {
    const multiLine = line({ kind: 'resistor', partNumber: 'NF-RES-D', description: '"two\nlines"', resistance: '1 Ω' });
    const result = importPartsCsv([HEADER, '', multiLine, bad].join('\n'));
    expect(result.errors[0].row).toBe(4); // header 1, blank 2, the two-line record 3, the bad one 4
  });

  it.each<[string, string, number, string | null, RegExp]>([
    ['a missing required rating', line({ kind: 'inductor', partNumber: 'NF-IND-X' }), 2, 'inductance', /is required/],
    [
      'a rating that does not apply to the kind',
      line({ kind: 'fuse', partNumber: 'NF-FUS-X', meltingI2t: '10', capacitance: '1 µF' }),
      2,
      'capacitance',
      /does not apply to a fuse/,
    ],
    ['an unknown kind', line({ kind: 'transformer', partNumber: 'NF-TR-X' }), 2, 'kind', /must be one of/],
    ['a missing part number', line({ kind: 'fuse', meltingI2t: '10' }), 2, 'partNumber', /is required/],
    [
      'unreadable text in a number column',
      line({ kind: 'resistor', partNumber: 'NF-R', resistance: 'about 47' }),
      2,
      'resistance',
      /could not read/,
    ],
    [
      'extra cells beyond the header',
      `${line({ kind: 'resistor', partNumber: 'NF-R', resistance: '1' })},surplus`,
      2,
      null,
      /cells; the header has/,
    ],
  ])('reports %s', (_label, row, rowNumber, column, message) => {
    const result = importPartsCsv([HEADER, row].join('\n'));
    expect(result.parts).toEqual([]);
    const error = result.errors.find((candidate) => candidate.column === column);
    expect(error).toBeDefined();
    expect(error?.row).toBe(rowNumber);
    expect(error?.message).toMatch(message);
  });

  it('reports a part number used twice, on the later row', () => {
    const result = importPartsCsv([HEADER, good1, good1.replace('NF-CAP-A', 'nf-cap-a')].join('\n'));
    expect(result.errors).toEqual([{ row: 3, column: 'partNumber', message: '"nf-cap-a" is already on row 2' }]);
  });

  it.each<[string, string, RegExp]>([
    ['an unknown column', 'kind,partNumber,colour\nresistor,X,red', /unknown column "colour"/],
    ['a missing kind column', 'partNumber,resistance\nX,1', /"kind" column is missing/],
    ['a column twice', 'kind,partNumber,resistance,resistance (Ω)\nresistor,X,1,1', /appears twice/],
  ])('refuses the whole file for %s, even with validOnly', (_label, csv, message) => {
    const result = importPartsCsv(csv, { validOnly: true });
    expect(result.parts).toEqual([]);
    expect(result.errors[0].row).toBe(1);
    expect(result.errors[0].message).toMatch(message);
  });

  it('refuses an empty file, a header without parts and a binary file', () => {
    expect(importPartsCsv('').errors[0].message).toMatch(/empty/);
    expect(importPartsCsv(HEADER).errors[0].message).toMatch(/no parts/);
    expect(importPartsCsv(new Uint8Array([0x50, 0x4b, 0x03, 0x04, 0, 0, 0, 8])).errors[0].message).toMatch(/binary file/);
  });
});
