// Output encoding: hostile text typed into names, notes, review reasons and comments goes out
// through the waveform CSV, the parts CSV, the JSON export, the review API and the PDF margin
// report. CSV cells a spreadsheet would run as a formula are escaped (OWASP CSV injection: a leading
// apostrophe for = + - @ tab CR, RFC 4180 quoting for , " CR LF, and quoting for ; so that a
// semicolon-separated locale cannot split a cell into a new formula cell); JSON gives back exactly
// what was stored; the PDF parses and shows the text literally, and glyphs the fonts do not have
// (emoji, Hebrew, Arabic, CJK) neither crash it nor lose the text around them.
import Papa from 'papaparse';
import { createTestWorld, type TestWorld } from '@/tests/helpers/testApp';
import { makeDesign, makeProject, makeRevision, makeReview, prechargePreset } from '@/tests/helpers/fixtures';
import { pdfText } from '@/tests/helpers/pdfText';

jest.setTimeout(300_000);

interface HostileCase {
  label: string;
  text: string;
  /** 'literal': the PDF text shows it as typed; 'outside-font': some glyphs are not in the fonts. */
  pdf: 'literal' | 'outside-font';
}

const LONG_NAME = `Northfold DC link ${'Ω-0123456789'.repeat(11)}`.slice(0, 160);
const LONG_NOTE = `${'=cmd|\' /C calc\'!A0 <script>alert(1)</script> 4.7 µF ± 10 %, 2² Ω. '.repeat(60)}`.slice(0, 4000);

const CASES: HostileCase[] = [
  { label: 'DDE formula', text: "=cmd|' /C calc'!A0", pdf: 'literal' },
  { label: 'HYPERLINK formula with quotes and a comma', text: '=HYPERLINK("https://evil.northfold.example?a=1,b=2","open")', pdf: 'literal' },
  { label: 'plus sign', text: '+1', pdf: 'literal' },
  { label: 'minus sign', text: '-1', pdf: 'literal' },
  { label: 'plus formula', text: "+1+cmd|' /C calc'!A0", pdf: 'literal' },
  { label: 'minus formula', text: "-2+3+cmd|' /C calc'!A0", pdf: 'literal' },
  { label: 'unicode minus', text: '−1+1', pdf: 'literal' },
  { label: 'at function', text: '@SUM(1+1)*cmd|\' /C calc\'!A0', pdf: 'literal' },
  { label: 'tab prefix', text: '\t=1+2', pdf: 'literal' },
  { label: 'carriage return prefix', text: '\r=3+4', pdf: 'literal' },
  { label: 'formula after a semicolon', text: "Bus A;=cmd|' /C calc'!A0", pdf: 'literal' },
  { label: 'formula after a line feed', text: "Bus A\n=cmd|' /C calc'!A0", pdf: 'literal' },
  { label: 'HTML and script tags', text: '<script>alert("x")</script><img src=x onerror=alert(1)> & &amp;', pdf: 'literal' },
  { label: 'PDF string syntax', text: 'a) (b \\) \\\\ /Name << >> [ ] %comment', pdf: 'literal' },
  { label: 'units and symbols', text: 'Filter 4.7 µF, 10 Ω, 2² m², ±5 %, 25 °C, ≤ 50 ms', pdf: 'literal' },
  { label: 'Hebrew and Arabic (right to left)', text: 'Bus שלום مرحبا end', pdf: 'outside-font' },
  { label: 'right-to-left override', text: 'report\u202Efdp.exe', pdf: 'outside-font' },
  { label: 'emoji', text: 'DC link ⚡🔌 check 🧪', pdf: 'outside-font' },
  { label: 'CJK', text: '直流リンク 预充电', pdf: 'outside-font' },
  { label: 'combining marks and zero-width joiner', text: 'Zoe\u0308 a\u200Db', pdf: 'outside-font' },
  { label: 'longest name (160 characters)', text: LONG_NAME, pdf: 'literal' },
];

const DANGEROUS_START = /^[=+\-−@\t\r]/;
const PLAIN_NUMBER = /^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$/;

/** The cell a spreadsheet sees is safe: no formula start, or a bare number (no formula can be one). */
function expectSafeCell(cell: string) {
  if (DANGEROUS_START.test(cell)) expect(cell).toMatch(PLAIN_NUMBER);
}
/** What the person typed, read back from an escaped cell. */
const unescape = (cell: string) => (cell.startsWith("'") && DANGEROUS_START.test(cell.slice(1)) ? cell.slice(1) : cell);

const parseCsv = (text: string) => {
  const parsed = Papa.parse<string[]>(text.replace(/^\uFEFF/, ''), { skipEmptyLines: true });
  expect(parsed.errors).toEqual([]);
  return parsed.data;
};

async function binary(path: string): Promise<Buffer> {
  const res = await (await world.as('viewer'))
    .get(path)
    .buffer(true)
    .parse((r, callback) => {
      const chunks: Buffer[] = [];
      r.on('data', (chunk: Buffer) => chunks.push(chunk));
      r.on('end', () => callback(null, Buffer.concat(chunks)));
    });
  expect(res.status).toBe(200);
  return res.body as Buffer;
}

// The fonts draw MICRO SIGN (U+00B5) and GREEK SMALL LETTER MU (U+03BC) with one glyph, and a PDF's
// text layer maps a glyph to one character: the report's own units use μ, so a typed µ reads back
// as μ. Same look, different code point; the comparison folds the two.
const squash = (s: string) => s.replace(/\s+/g, '').replace(/\u00B5/g, '\u03BC');

let world: TestWorld;
let presetDesign: Record<string, unknown>;
beforeAll(async () => {
  world = await createTestWorld();
  presetDesign = (await prechargePreset(world)).design;
});
afterAll(async () => {
  await world.close();
});

describe.each(CASES)('$label', ({ text, pdf }) => {
  const stored = { name: text.trim(), note: text, reason: text.trim(), comment: text.trim() };
  let ids: { project: string; design: string; revision: string; review: string };

  beforeAll(async () => {
    const project = await makeProject(world, text);
    const design = await makeDesign(world, project.id, { ...presetDesign, notes: text }, text);
    const revision = await makeRevision(world, design.id, text);
    const review = await makeReview(world, revision.id, text);
    await (await world.as('reviewer')).post(`/api/reviews/${review.id}/comments`).send({ body: text }).expect(201);
    await (await world.as('reviewer')).post(`/api/reviews/${review.id}/request-changes`).send({ reason: text }).expect(200);
    ids = { project: project.id, design: design.id, revision: revision.id, review: review.id };
    // Names are trimmed on the way in (a leading tab or CR goes); everything else is kept as typed.
    expect(project.name).toBe(stored.name);
    expect(design.name).toBe(stored.name);
  });

  it('waveform CSV: every cell is formula-safe and reads back as the stored name', async () => {
    const res = await (await world.as('viewer')).get(`/api/revisions/${ids.revision}/waveforms.csv`).expect(200);
    expect(res.headers['content-type']).toMatch(/^text\/csv/);
    // The download's file name is made of safe characters only, whatever the design is called.
    expect(res.headers['content-disposition']).toMatch(/^attachment; filename="[A-Za-z0-9._-]+-r1\.csv"$/);
    const rows = parseCsv(res.text);
    for (const row of rows) for (const cell of row) expectSafeCell(cell);
    expect(rows[1][0]).toBe('# project');
    expect(rows[2][0]).toBe('# design');
    expect(unescape(rows[1][1])).toBe(stored.name);
    expect(unescape(rows[2][1])).toBe(stored.name);
    // A cell holding a separator of any common locale is quoted, so no program splits it.
    const raw = res.text.split('\r\n');
    for (const line of raw.slice(1, 3)) {
      const value = line.slice(line.indexOf(',') + 1);
      if (/[;,"\n\r]/.test(stored.name)) expect(value).toMatch(/^".*"$/s);
    }
  });

  it('JSON export: names, notes, the design file and the review reason come back exactly', async () => {
    const res = await (await world.as('viewer')).get(`/api/revisions/${ids.revision}/export.json`).expect(200);
    expect(res.headers['content-type']).toMatch(/^application\/json/);
    expect(res.headers['x-content-type-options']).toBe('nosniff');
    const body = JSON.parse(res.text);
    expect(body.project.name).toBe(stored.name);
    expect(body.design.name).toBe(stored.name);
    expect(body.revision.note).toBe(stored.note);
    expect(body.designFile.notes).toBe(text);
    expect(JSON.parse(body.canonicalJson).notes).toBe(text);
    expect(body.reviews[0].decisionReason).toBe(stored.reason);
  });

  it('review API: the comment comes back exactly', async () => {
    const res = await (await world.as('viewer')).get(`/api/reviews/${ids.review}`).expect(200);
    expect(res.body.comments.map((c: { body: string }) => c.body)).toContain(stored.comment);
  });

  it('PDF margin report: parses, and shows the text literally', async () => {
    const report = await pdfText(await binary(`/api/revisions/${ids.revision}/report.pdf`));
    expect(report.pages).toBeGreaterThan(0);
    const body = squash(report.text);
    expect(body).toContain('Margins');
    if (pdf === 'literal') {
      // Title, the Project/Design rows and the note (lines wrap, so whitespace is ignored).
      const needle = squash(stored.name);
      expect(body.split(needle).length - 1).toBeGreaterThanOrEqual(3);
      expect(body).toContain(squash(stored.note.trim()));
      expect(report.info.Title).toBe(`Margin report: ${stored.name}, revision 1`);
    } else {
      // Glyphs outside the fonts: the Latin words around them survive, and the document metadata
      // (not drawn with the fonts) keeps the whole text.
      for (const word of stored.name.match(/[A-Za-z]{2,}/g) ?? []) expect(body).toContain(word);
      if (process.env.ENCODING_REPORT) console.log(JSON.stringify({ typed: stored.name, pdfLine: report.text.split('\n')[1] }));
      expect(report.info.Title).toBe(`Margin report: ${stored.name}, revision 1`);
    }
  });
});

describe('long text', () => {
  it('a 4 000-character note fills pages in the PDF, word for word, and round-trips in JSON', async () => {
    const project = await makeProject(world, 'Long notes');
    const design = await makeDesign(world, project.id, presetDesign, 'Long note design');
    const revision = await makeRevision(world, design.id, LONG_NOTE);
    const report = await pdfText(await binary(`/api/revisions/${revision.id}/report.pdf`));
    expect(squash(report.text)).toContain(squash(LONG_NOTE.trim()));
    const json = await (await world.as('viewer')).get(`/api/revisions/${revision.id}/export.json`).expect(200);
    expect(json.body.revision.note).toBe(LONG_NOTE);
  });

  it('a 4 000-character word with no spaces does not crash the PDF and is all there', async () => {
    const word = 'Ω'.repeat(2000) + 'x'.repeat(2000);
    const project = await makeProject(world, 'Long word');
    const design = await makeDesign(world, project.id, presetDesign, 'Long word design');
    const revision = await makeRevision(world, design.id, word);
    const report = await pdfText(await binary(`/api/revisions/${revision.id}/report.pdf`));
    expect(squash(report.text)).toContain(word);
  });
});

describe('parts CSV export', () => {
  it('escapes hostile part descriptions, makers and notes, and reads them back', async () => {
    const sam = await world.as('engineer');
    const texts = CASES.map((c) => c.text).filter((t) => t.length <= 200);
    for (const [k, t] of texts.entries()) {
      const res = await sam
        .post('/api/parts')
        .send({ kind: 'resistor', partNumber: `NF-ENC-${k}`, resistance: '47 Ω', description: t, maker: t.slice(0, 100), notes: t });
      expect([res.status, res.body?.error]).toEqual([201, undefined]);
    }
    const res = await sam.get('/api/parts/export.csv').expect(200);
    const rows = parseCsv(res.text);
    const header = rows[0];
    for (const row of rows) for (const cell of row) expectSafeCell(cell);
    const byNumber = new Map(rows.slice(1).map((r) => [r[header.indexOf('partNumber')], r]));
    for (const k of texts.keys()) {
      const row = byNumber.get(`NF-ENC-${k}`)!;
      const stored = (await sam.get(`/api/parts?search=NF-ENC-${k}`).expect(200)).body.items.find(
        (p: { partNumber: string }) => p.partNumber === `NF-ENC-${k}`,
      );
      expect(unescape(row[header.indexOf('description')])).toBe(stored.description);
      expect(unescape(row[header.indexOf('notes')])).toBe(stored.notes);
    }
  });
});
