// The margin report, the waveform CSV and the JSON export of a revision.
import { createHash } from 'node:crypto';
import Papa from 'papaparse';
import { and, eq } from 'drizzle-orm';
import { auditLog } from '@/db/schema';
import { formatEng, HV_NOTICE_DISCLAIMER } from '@/server/services/engine';
import { DESIGN_AID_STATEMENT, formatMargin } from '@/server/reports/marginReport';
import { createTestWorld, type TestWorld } from '@/tests/helpers/testApp';
import { makeChain, makeDesign, makeProject, makeRevision, prechargePreset } from '@/tests/helpers/fixtures';
import { pdfText } from '@/tests/helpers/pdfText';

jest.setTimeout(120_000);

let world: TestWorld;
let chain: Awaited<ReturnType<typeof makeChain>>;
let revision: {
  id: string;
  sha256: string;
  results: {
    checks: { id: string; label: string; marginPercent: number | null; status: string; value: number | null; unit: string }[];
    notices: { title: string; text: string }[];
  };
};
beforeAll(async () => {
  world = await createTestWorld();
  chain = await makeChain(world);
  revision = (await (await world.as('viewer')).get(`/api/revisions/${chain.revision.id}`).expect(200)).body;
});
afterAll(async () => {
  await world.close();
});

const binary = (res: import('superagent').Response, callback: (error: Error | null, body: Buffer) => void) => {
  const chunks: Buffer[] = [];
  res.on('data', (chunk: Buffer) => chunks.push(chunk));
  res.on('end', () => callback(null, Buffer.concat(chunks)));
};

async function downloadPdf(person: 'viewer' | 'reviewer' = 'viewer', revisionId = chain.revision.id): Promise<Buffer> {
  const res = await (
    await world.as(person)
  )
    .get(`/api/revisions/${revisionId}/report.pdf`)
    .buffer(true)
    .parse(binary)
    .expect(200);
  expect(res.headers['content-type']).toBe('application/pdf');
  expect(res.headers['content-disposition']).toMatch(/attachment; filename=".+-r\d+\.pdf"/);
  return res.body as Buffer;
}

// pdf.js hands back the Greek mu for the micro sign, and lines break where the layout breaks them.
const normalise = (text: string) => text.replace(/\u03bc/g, '\u00b5').replace(/\s+/g, ' ');

describe('the margin report', () => {
  let text: string;
  let pdf: Buffer;
  beforeAll(async () => {
    pdf = await downloadPdf();
    text = normalise((await pdfText(pdf)).text);
  });

  it('is a PDF with the title block: project, design, revision hash, engine version, author, review state', async () => {
    expect(pdf.subarray(0, 5).toString()).toBe('%PDF-');
    expect(text).toContain(chain.project.name);
    expect(text).toContain(chain.design.name);
    expect(text).toContain(chain.revision.sha256);
    expect(text).toContain('Sam Okafor');
    expect(text).toContain('Not reviewed.');
    expect(text).toMatch(/Engine version/);
  });

  it('holds every check with its margin and its status as a word', async () => {
    for (const check of revision.results.checks) {
      expect(text).toContain(normalise(check.label));
      expect(text).toContain(formatMargin(check.marginPercent));
      if (check.value !== null) expect(text).toContain(normalise(formatEng(check.value, check.unit)));
    }
    const words = { pass: 'Pass', warn: 'Warn', fail: 'Fail', 'not-checked': 'Not checked' } as Record<string, string>;
    for (const status of new Set(revision.results.checks.map((c) => c.status))) expect(text).toContain(words[status]);
  });

  it('holds the waveforms, the parameters with units, the assumptions, the high-voltage notice and the design-aid statement', async () => {
    expect(text).toContain('Capacitor voltage vC');
    expect(text).toContain('Current i');
    expect(text).toContain('Bus voltage v');
    expect(text).toMatch(/peak [\d.]+ [kmµ]?V at/);
    expect(text).toContain('Source voltage');
    expect(text).toContain('DC-link capacitance');
    expect(text).toContain('Assumptions and model limits');
    expect(text).toContain(normalise(HV_NOTICE_DISCLAIMER));
    for (const notice of revision.results.notices) expect(text).toContain(normalise(notice.title));
    expect(text).toContain(normalise(DESIGN_AID_STATEMENT));
  });

  it('embeds the shipped fonts', () => {
    const latin1 = pdf.toString('latin1');
    expect(latin1).toMatch(/\/FontFile2/);
    expect(latin1).toMatch(/Inter/);
    expect(latin1).toMatch(/JetBrainsMono/);
  });

  it('gives the same bytes on every download of the same revision', async () => {
    const again = await downloadPdf('reviewer');
    const hash = (b: Buffer) => createHash('sha256').update(b).digest('hex');
    expect(hash(again)).toBe(hash(pdf));
    const info = (await pdfText(pdf)).info;
    expect(String(info.Title)).toContain(chain.design.name);
  });

  it('records each download in the audit log', async () => {
    const rows = await world.database.db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.action, 'report.downloaded'), eq(auditLog.entityId, chain.revision.id)));
    expect(rows.length).toBeGreaterThanOrEqual(2);
    expect(rows[0].details).toEqual(expect.objectContaining({ sha256: chain.revision.sha256 }));
  });

  it('shows the approval, and the precharge sizing once it has been run', async () => {
    const c = await makeChain(world, true);
    await (
      await world.as('engineer')
    )
      .post(`/api/revisions/${c.revision.id}/analyses`)
      .send({ kind: 'precharge', options: { maxInrushCurrent: 30, maxPrechargeTime: 3 } })
      .expect(201);
    await (await world.as('reviewer')).post(`/api/reviews/${c.review!.id}/approve`).send({}).expect(200);
    const report = normalise((await pdfText(await downloadPdf('viewer', c.revision.id))).text);
    expect(report).toMatch(/Approved by Priya Lindqvist on \d{4}-\d\d-\d\d \d\d:\d\d UTC \(hash matches\)/);
    expect(report).toContain('Precharge sizing');
  });
});

describe('the waveform CSV', () => {
  it('has a header block, named columns and one row per point, and opens safely in a spreadsheet', async () => {
    const project = await makeProject(world, '=HYPERLINK("http://evil.example","click")');
    const preset = await prechargePreset(world);
    const design = await makeDesign(world, project.id, preset.design, '@SUM(A1:A9) design');
    const rev = await makeRevision(world, design.id);
    const res = await (await world.as('viewer')).get(`/api/revisions/${rev.id}/waveforms.csv`).expect(200);
    expect(res.headers['content-type']).toMatch(/^text\/csv/);
    const parsed = Papa.parse<string[]>(res.text.trim(), { skipEmptyLines: true }).data;
    const meta = Object.fromEntries(parsed.filter((r) => r[0].startsWith('#')).map((r) => [r[0], r[1]]));
    expect(meta['# project']).toBe(`'=HYPERLINK("http://evil.example","click")`);
    expect(meta['# design']).toBe("'@SUM(A1:A9) design");
    expect(meta['# sha256']).toBe(rev.sha256);
    const table = parsed.filter((r) => !r[0].startsWith('#'));
    expect(table[0].slice(0, 4)).toEqual(['t_s', 'vC_V', 'v_V', 'i_A']);
    const rows = table.slice(1);
    expect(rows.length).toBeGreaterThan(10);
    for (const row of rows) for (const cell of row) expect(Number.isFinite(Number(cell))).toBe(true);
    // No cell a spreadsheet would evaluate.
    for (const row of parsed) for (const cell of row) if (/^[=+@]/.test(cell)) throw new Error(`formula cell ${cell}`);
  });
});

describe('the JSON export', () => {
  it('carries the canonical design (whose SHA-256 is the revision hash), the policy, the results and the reviews', async () => {
    const res = await (await world.as('viewer')).get(`/api/revisions/${chain.revision.id}/export.json`).expect(200);
    expect(res.body.format).toBe('ringwell-revision');
    expect(createHash('sha256').update(res.body.canonicalJson, 'utf8').digest('hex')).toBe(chain.revision.sha256);
    expect(res.body.revision.sha256).toBe(chain.revision.sha256);
    expect(res.body.results.checks).toEqual(revision.results.checks);
    expect(res.body.reviews).toEqual([]);
    const again = await (await world.as('viewer')).get(`/api/revisions/${chain.revision.id}/export.json`).expect(200);
    expect(again.text).toBe(res.text);
  });
});
