// Bench captures and the parts library through the API: upload limits (nothing stored on refusal),
// the stored file and its hash, a fit on a capture made by the engine, parts CRUD and CSV, a design
// taking a part, team scoping and roles.
import crypto from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { eq } from 'drizzle-orm';
import { revisions } from '@/db/schema';
import { createTestWorld, type TestWorld } from '@/tests/helpers/testApp';
import { makeDesign, makeProject, makeRevision } from '@/tests/helpers/fixtures';
import { syntheticCsv } from '@/tests/fixtures/captures/synthetic';
import { expectClose } from '@/tests/helpers/expectClose';

jest.setTimeout(180_000);

let world: TestWorld;
let uploadsDir: string;
let project: { id: string };

// REFERENCE §1 case A: 48 V through 280 Ω and 0.1 H onto 0.4 µF (ζ ≈ 0.28).
const caseA = {
  source: { voltage: '48 V', resistance: '280 Ω', inductance: '0.1 H' },
  capacitor: { capacitance: '0.4 µF' },
  duration: '5 ms',
};
const mappingA = { time: { column: 0, unit: 'us' }, channels: [{ column: 1, quantity: 'capacitorVoltage', unit: 'mV' }] };

beforeAll(async () => {
  uploadsDir = fs.mkdtempSync(path.join(os.tmpdir(), 'ringwell-bench-test-'));
  world = await createTestWorld({ uploadsDir });
  project = await makeProject(world);
});
afterAll(async () => {
  await world.close();
  fs.rmSync(uploadsDir, { recursive: true, force: true });
});

async function captureRows(): Promise<number> {
  const result = await world.database.pg.query<{ n: number }>('select count(*)::int as n from bench_captures');
  return result.rows[0].n;
}
const storedFiles = () => (fs.existsSync(uploadsDir) ? fs.readdirSync(uploadsDir) : []);

async function upload(designId: string, bytes: Buffer | string, fileName = 'scope.csv', contentType = 'text/csv', mapping: unknown = mappingA) {
  const sam = await world.as('engineer');
  return sam
    .post(`/api/designs/${designId}/captures`)
    .field('mapping', JSON.stringify(mapping))
    .attach('file', Buffer.isBuffer(bytes) ? bytes : Buffer.from(bytes), { filename: fileName, contentType });
}

describe('bench capture uploads', () => {
  let designId: string;
  beforeAll(async () => {
    designId = (await makeDesign(world, project.id, caseA)).id;
  });

  it('refuses a file over 20 MB with 413 in the common shape, storing nothing', async () => {
    const before = { rows: await captureRows(), files: storedFiles().length };
    const big = Buffer.alloc(20 * 1024 * 1024 + 10, '1,2\n');
    const res = await upload(designId, big);
    expect(res.status).toBe(413);
    expect(res.body.error).toMatchObject({ code: 'file_too_large' });
    expect(await captureRows()).toBe(before.rows);
    expect(storedFiles()).toHaveLength(before.files);
  });

  it('refuses a binary file named .csv with 400 "binary", storing nothing', async () => {
    const bytes = crypto.randomBytes(4096);
    bytes[10] = 0;
    const res = await upload(designId, bytes, 'capture.csv');
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('binary');
    expect(await captureRows()).toBe(0);
    expect(storedFiles()).toEqual([]);
  });

  it('refuses another extension or a non-text type', async () => {
    expect((await upload(designId, '0,1\n1,2\n', 'capture.xlsx')).status).toBe(400);
    expect((await upload(designId, '0,1\n1,2\n', 'capture.csv', 'application/pdf')).status).toBe(400);
    expect(await captureRows()).toBe(0);
    expect(storedFiles()).toEqual([]);
  });

  it('refuses time that goes backwards with 400 naming the line, storing nothing', async () => {
    const res = await upload(designId, 'time,v\n0,1\n1,2\n3,3\n2,4\n', 'steps.csv', 'text/csv', {
      time: { column: 0, unit: 's' },
      channels: [{ column: 1, quantity: 'capacitorVoltage', unit: 'V' }],
    });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('non-monotonic-time');
    expect(res.body.error.line).toBe(5);
    expect(res.body.error.message).toMatch(/line 5/);
    expect(await captureRows()).toBe(0);
    expect(storedFiles()).toEqual([]);
  });

  it('refuses a bad mapping naming the field, storing nothing', async () => {
    const res = await upload(designId, 'time,v\n0,1\n1,2\n', 'ok.csv', 'text/csv', {
      time: { column: 0, unit: 's' },
      channels: [{ column: 1, quantity: 'current', unit: 'V' }],
    });
    expect(res.status).toBe(400);
    expect(res.body.error.fields[0].path).toBe('mapping.channels.0.unit');
    expect(await captureRows()).toBe(0);
    expect(storedFiles()).toEqual([]);
  });

  it('previews a file without storing it', async () => {
    const sam = await world.as('engineer');
    const res = await sam
      .post('/api/captures/preview')
      .attach('file', Buffer.from('Time;CH1\n0,0;1,5\n0,1;2,5\n0,2;3,5\n'), { filename: 'eu.csv', contentType: 'text/csv' })
      .expect(200);
    expect(res.body).toMatchObject({ delimiter: ';', decimal: ',', rows: 3, header: ['Time', 'CH1'] });
    expect(res.body.preview[0]).toEqual(['0,0', '1,5']);
    expect(await captureRows()).toBe(0);
    expect(storedFiles()).toEqual([]);
  });

  it('stores a good capture under its SHA-256, with a decimated copy, then fits the design to it', async () => {
    const csv = syntheticCsv(caseA, { quantity: 'capacitorVoltage', noise: 0.2, seed: 8, samples: 6000, preTrigger: 0.5e-3 });
    const bytes = Buffer.from(csv);
    const sha = crypto.createHash('sha256').update(bytes).digest('hex');
    // The design starts from poor guesses for the values to be fitted.
    const guessed = (await makeDesign(world, project.id, { ...caseA, source: { voltage: '48 V', resistance: '1 Ω', inductance: '1 mH' } })).id;
    const res = await upload(guessed, bytes, 'case-a.csv');
    expect(res.status).toBe(201);
    expect(res.body.sha256).toBe(sha);
    expect(res.body.rows).toBe(6000);
    expect(storedFiles()).toEqual([sha]);
    expect(crypto.createHash('sha256').update(fs.readFileSync(path.join(uploadsDir, sha))).digest('hex')).toBe(sha);
    expect(res.body.data.time.length).toBeLessThanOrEqual(2000);

    const sam = await world.as('engineer');
    const listed = await sam.get(`/api/designs/${guessed}/captures`).expect(200);
    expect(listed.body.items.map((c: { id: string }) => c.id)).toEqual([res.body.id]);
    const got = await sam.get(`/api/captures/${res.body.id}`).expect(200);
    expect(got.body.data.channels[0]).toMatchObject({ quantity: 'capacitorVoltage', unit: 'V' });
    expect(got.body.data.channels[0].values.length).toBe(got.body.data.time.length);

    const fit = await sam.post(`/api/captures/${res.body.id}/fit`).send({ quantity: 'capacitorVoltage' }).expect(200);
    expectClose(fit.body.values['source.inductance'], 0.1, 0.02);
    expectClose(fit.body.values['source.resistance'], 280, 0.02);
    expect(fit.body.residualRms).toBeLessThan(0.4);
    expect(fit.body.apply.source).toBeDefined();

    // Applying is a PATCH of the draft with the fitted sections.
    const design = (await sam.get(`/api/designs/${guessed}`).expect(200)).body;
    await sam.patch(`/api/designs/${guessed}`).send({ draft: { ...design.draft, ...fit.body.apply } }).expect(200);
    const after = (await sam.get(`/api/designs/${guessed}`).expect(200)).body;
    expect(after.draftValidation.valid).toBe(true);
    expect(after.draft.source.inductance).toBeCloseTo(fit.body.values['source.inductance'], 9);

    // Other teams see nothing; viewers cannot delete; the engineer can.
    const outsider = await world.as('outsider');
    await outsider.get(`/api/captures/${res.body.id}`).expect(404);
    await outsider.post(`/api/captures/${res.body.id}/fit`).send({ quantity: 'capacitorVoltage' }).expect(404);
    await outsider.get(`/api/designs/${guessed}/captures`).expect(404);
    await outsider.delete(`/api/captures/${res.body.id}`).expect(404);
    await (await world.as('viewer')).delete(`/api/captures/${res.body.id}`).expect(403);
    expect(await captureRows()).toBe(1);
    await sam.delete(`/api/captures/${res.body.id}`).expect(204);
    expect(await captureRows()).toBe(0);
    expect(storedFiles()).toEqual([]);
  });

  it('a fit on a channel the capture does not have is a 422 naming the field', async () => {
    const res = await upload(designId, syntheticCsv(caseA, { quantity: 'capacitorVoltage', noise: 0.1, seed: 1, samples: 800 }), 'small.csv');
    expect(res.status).toBe(201);
    const fit = await (await world.as('engineer')).post(`/api/captures/${res.body.id}/fit`).send({ quantity: 'current' });
    expect(fit.status).toBe(422);
    expect(fit.body.error.code).toBe('fit_no-channel');
    await (await world.as('engineer')).delete(`/api/captures/${res.body.id}`).expect(204);
  });

  it('viewers and reviewers cannot upload; the outsider cannot upload to this team’s design', async () => {
    for (const who of ['viewer', 'reviewer', 'outsider'] as const) {
      const agent = await world.as(who);
      const res = await agent
        .post(`/api/designs/${designId}/captures`)
        .field('mapping', JSON.stringify(mappingA))
        .attach('file', Buffer.from('0,1\n1,2\n'), { filename: 'a.csv', contentType: 'text/csv' });
      expect(res.status).toBe(who === 'outsider' ? 404 : 403);
    }
    expect(await captureRows()).toBe(0);
    expect(storedFiles()).toEqual([]);
  });
});

const capacitor = {
  kind: 'capacitor',
  partNumber: 'NF-CAP-T100',
  description: 'Film DC-link test part',
  maker: 'Northfold',
  capacitance: '940 µF',
  ratedVoltage: '900 V',
  surgeVoltage: '1000 V',
  esr: '3 mΩ',
};

describe('parts library', () => {
  it('creates, lists with search and kind, edits, archives and unarchives', async () => {
    const sam = await world.as('engineer');
    const created = await sam.post('/api/parts').send(capacitor).expect(201);
    expect(created.body).toMatchObject({ kind: 'capacitor', partNumber: 'NF-CAP-T100', capacitance: 940e-6, ratedVoltage: 900, archived: false });
    await sam.post('/api/parts').send({ kind: 'resistor', partNumber: 'NF-RES-T47', resistance: '47 Ω' }).expect(201);

    const bad = await sam.post('/api/parts').send({ kind: 'capacitor', partNumber: 'NF-X', capacitance: '1 µF' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields.map((f: { path: string }) => f.path)).toContain('ratedVoltage');

    expect((await sam.get('/api/parts?search=t100').expect(200)).body.items.map((p: { partNumber: string }) => p.partNumber)).toEqual(['NF-CAP-T100']);
    expect((await sam.get('/api/parts?kind=resistor').expect(200)).body.items.map((p: { partNumber: string }) => p.partNumber)).toEqual(['NF-RES-T47']);

    const edited = await sam.patch(`/api/parts/${created.body.id}`).send({ ratedVoltage: '850 V' }).expect(200);
    expect(edited.body.ratedVoltage).toBe(850);
    const badEdit = await sam.patch(`/api/parts/${created.body.id}`).send({ capacitance: 'lots' });
    expect(badEdit.status).toBe(400);
    expect(badEdit.body.error.fields[0].path).toBe('capacitance');

    await sam.post(`/api/parts/${created.body.id}/archive`).expect(200);
    expect((await sam.get('/api/parts?search=t100').expect(200)).body.items).toEqual([]);
    expect((await sam.get('/api/parts?search=t100&archived=true').expect(200)).body.items).toHaveLength(1);
    await sam.post(`/api/parts/${created.body.id}/unarchive`).expect(200);

    // Everyone in the team reads; viewers and reviewers do not write; other teams see nothing.
    const viewer = await world.as('viewer');
    await viewer.get(`/api/parts/${created.body.id}`).expect(200);
    await viewer.post('/api/parts').send(capacitor).expect(403);
    await viewer.patch(`/api/parts/${created.body.id}`).send({ ratedVoltage: '1 V' }).expect(403);
    await (await world.as('reviewer')).post(`/api/parts/${created.body.id}/archive`).expect(403);
    await (await world.as('admin')).patch(`/api/parts/${created.body.id}`).send({ notes: 'checked by admin' }).expect(200);
    const outsider = await world.as('outsider');
    await outsider.get(`/api/parts/${created.body.id}`).expect(404);
    await outsider.patch(`/api/parts/${created.body.id}`).send({ ratedVoltage: '1 V' }).expect(404);
    expect((await outsider.get('/api/parts?search=t100').expect(200)).body.items).toEqual([]);
    expect((await sam.get(`/api/parts/${created.body.id}`).expect(200)).body.ratedVoltage).toBe(850);
  });

  it('imports all or nothing, names the bad row and column, and validOnly imports the rest', async () => {
    const sam = await world.as('engineer');
    const template = (await sam.get('/api/parts/template.csv').expect(200)).text;
    const header = template.split(/\r?\n/)[0];
    const exported = (await sam.get('/api/parts/export.csv').expect(200)).text.replace(/^\uFEFF/, '');
    expect(exported.split(/\r?\n/)[0]).toBe(header);

    const columns = header.split(',');
    const row = (values: Record<string, string>) => columns.map((c) => values[c.split(' ')[0]] ?? '').join(',');
    const csv = [
      header,
      row({ kind: 'inductor', partNumber: 'NF-IND-IMP1', inductance: '1.2e-5' }),
      row({ kind: 'capacitor', partNumber: 'NF-CAP-IMP2', capacitance: 'oops', ratedVoltage: '500' }),
      row({ kind: 'fuse', partNumber: 'NF-FUS-IMP3', meltingI2t: '18000' }),
    ].join('\n');
    const before = (await sam.get('/api/parts?search=IMP').expect(200)).body.items.length;
    const refused = await sam.post('/api/parts/import').set('Content-Type', 'text/csv').send(csv);
    expect(refused.status).toBe(422);
    expect(refused.body.imported).toBe(0);
    expect(refused.body.errors).toEqual([expect.objectContaining({ row: 3, column: 'capacitance' })]);
    expect((await sam.get('/api/parts?search=IMP').expect(200)).body.items).toHaveLength(before);

    const partial = await sam
      .post('/api/parts/import?validOnly=true')
      .attach('file', Buffer.from(csv), { filename: 'parts.csv', contentType: 'text/csv' })
      .expect(200);
    expect(partial.body.imported).toBe(2);
    expect((await sam.get('/api/parts?search=IMP').expect(200)).body.items.map((p: { partNumber: string }) => p.partNumber)).toEqual([
      'NF-FUS-IMP3',
      'NF-IND-IMP1',
    ]);
    await (await world.as('viewer')).post('/api/parts/import').set('Content-Type', 'text/csv').send(csv).expect(403);
  });

  it('round-trips through export and import exactly', async () => {
    const sam = await world.as('engineer');
    const exported = (await sam.get('/api/parts/export.csv').expect(200)).text;
    const outsider = await world.as('outsider');
    const imported = await outsider.post('/api/parts/import').set('Content-Type', 'text/csv').send(exported).expect(200);
    const ours = (await sam.get('/api/parts?limit=200').expect(200)).body.items;
    expect(imported.body.imported).toBe(ours.length);
    const theirs = (await outsider.get('/api/parts?limit=200').expect(200)).body.items;
    const strip = (p: Record<string, unknown>) => {
      const { id: _i, createdAt: _c, updatedAt: _u, ...rest } = p;
      return rest;
    };
    expect(theirs.map(strip)).toEqual(ours.map(strip));
  });

  it('a design takes a part; its revision keeps the values when the part is edited later', async () => {
    const sam = await world.as('engineer');
    const design = await makeDesign(world, project.id);
    const part = (await sam.post('/api/parts').send({ ...capacitor, partNumber: 'NF-CAP-T200' }).expect(201)).body;
    const applied = await sam.post(`/api/designs/${design.id}/apply-part`).send({ slot: 'capacitor', partId: part.id }).expect(200);
    expect(applied.body.partRefs).toEqual({ capacitor: part.id });
    expect(applied.body.written).toContain('capacitor.capacitance');
    expect(applied.body.citations.capacitorVoltage).toMatchObject({ slot: 'capacitor' });
    const draft = (await sam.get(`/api/designs/${design.id}`).expect(200)).body.draft;
    expect(draft.capacitor.capacitance).toBe(940e-6);

    const revision = await makeRevision(world, design.id);
    const [before] = await world.database.db.select().from(revisions).where(eq(revisions.id, revision.id));
    await sam.patch(`/api/parts/${part.id}`).send({ capacitance: '470 µF' }).expect(200);
    const [after] = await world.database.db.select().from(revisions).where(eq(revisions.id, revision.id));
    expect(after.designJson).toBe(before.designJson);
    expect(JSON.parse(after.designJson).capacitor.capacitance).toBe(940e-6);
    expect((await sam.get(`/api/designs/${design.id}/part-refs`).expect(200)).body.partRefs).toEqual({ capacitor: part.id });

    // A part of the wrong kind, another team's part, other roles.
    const resistor = (await sam.get('/api/parts?kind=resistor').expect(200)).body.items[0];
    const wrong = await sam.post(`/api/designs/${design.id}/apply-part`).send({ slot: 'capacitor', partId: resistor.id });
    expect(wrong.status).toBe(422);
    expect(wrong.body.error.fields[0].path).toBe('slot');
    const outsider = await world.as('outsider');
    const theirPart = (await outsider.get('/api/parts?limit=1').expect(200)).body.items[0];
    const foreign = await sam.post(`/api/designs/${design.id}/apply-part`).send({ slot: 'capacitor', partId: theirPart.id });
    expect(foreign.status).toBe(404);
    await outsider.post(`/api/designs/${design.id}/apply-part`).send({ slot: 'capacitor', partId: part.id }).expect(404);
    await (await world.as('viewer')).post(`/api/designs/${design.id}/apply-part`).send({ slot: 'capacitor', partId: part.id }).expect(403);
  });
});
