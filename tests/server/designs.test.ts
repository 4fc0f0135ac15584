// Projects, designs and revisions: CRUD, filters and pagination, the working copy, immutable
// revisions with their hash, re-running, cached analyses, and the stateless check.
import { eq, sql } from 'drizzle-orm';
import { analysisRuns, auditLog, revisions } from '@/db/schema';
import {
  analysisRunSchema,
  checkResponseSchema,
  designDetailSchema,
  projectSchema,
  revisionDetailSchema,
  designSummarySchema,
  verifyRevisionResponseSchema,
} from '@/lib/contracts/designs';
import { pageSchema } from '@/lib/contracts/common';
import { canonicalJson, sha256Hex } from '@/server/services/canonical';
import { createTestWorld, type TestWorld } from '@/tests/helpers/testApp';
import { makeDesign, makeProject, makeRevision, prechargePreset, sizingRequest, type Preset } from '@/tests/helpers/fixtures';

jest.setTimeout(120_000);

let world: TestWorld;
let preset: Preset;
beforeAll(async () => {
  world = await createTestWorld();
  preset = await prechargePreset(world);
});
afterAll(async () => {
  await world.close();
});

describe('projects', () => {
  it('are created, listed with a name search, renamed, archived and deleted when empty', async () => {
    const sam = await world.as('engineer');
    const a = projectSchema.parse(
      (await sam.post('/api/projects').send({ name: 'Depot charger', description: '800 V' }).expect(201)).body,
    );
    await sam.post('/api/projects').send({ name: 'Cargo bike' }).expect(201);
    const dup = await sam.post('/api/projects').send({ name: 'depot CHARGER' });
    expect(dup.status).toBe(409);

    const found = pageSchema(projectSchema).parse((await sam.get('/api/projects?search=depot').expect(200)).body);
    expect(found.items.map((p) => p.name)).toEqual(['Depot charger']);
    // A search with a wildcard in it matches the character, not everything.
    expect((await sam.get('/api/projects?search=%25').expect(200)).body.items).toEqual([]);

    const renamed = await sam.patch(`/api/projects/${a.id}`).send({ name: 'Depot charger DC link' }).expect(200);
    expect(renamed.body.name).toBe('Depot charger DC link');
    await sam.patch(`/api/projects/${a.id}`).send({ archived: true }).expect(200);
    expect((await sam.get('/api/projects?search=depot').expect(200)).body.items).toEqual([]);
    expect((await sam.get('/api/projects?search=depot&archived=true').expect(200)).body.items).toHaveLength(1);
    await sam.delete(`/api/projects/${a.id}`).expect(204);
    await sam.get(`/api/projects/${a.id}`).expect(404);
  });

  it('page through with a cursor, newest first, without repeats', async () => {
    const sam = await world.as('engineer');
    for (let k = 0; k < 5; k++)
      await sam
        .post('/api/projects')
        .send({ name: `Paging ${k}` })
        .expect(201);
    const seen: string[] = [];
    let cursor: string | null = null;
    do {
      const res: { body: { items: { name: string }[]; nextCursor: string | null } } = await sam
        .get('/api/projects')
        .query({ search: 'Paging', limit: 2, ...(cursor ? { cursor } : {}) })
        .expect(200);
      seen.push(...res.body.items.map((p) => p.name));
      cursor = res.body.nextCursor;
    } while (cursor);
    expect(seen).toEqual(['Paging 4', 'Paging 3', 'Paging 2', 'Paging 1', 'Paging 0']);
    const bad = await sam.get('/api/projects?cursor=garbage');
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields[0].path).toBe('cursor');
  });

  it('with designs cannot be deleted', async () => {
    const project = await makeProject(world);
    await makeDesign(world, project.id, preset.design);
    const res = await (await world.as('engineer')).delete(`/api/projects/${project.id}`);
    expect(res.status).toBe(409);
  });
});

describe('designs and their working copy', () => {
  it('start from a preset, keep an invalid draft as sent, and say what is wrong with it', async () => {
    const sam = await world.as('engineer');
    const project = await makeProject(world);
    const created = designDetailSchema.parse(
      (await sam.post('/api/designs').send({ projectId: project.id, name: 'From preset', presetId: preset.id }).expect(201)).body,
    );
    expect(created.draft).toEqual(preset.design);
    expect(created.presetId).toBe(preset.id);
    expect(created.status).toBe('not-run');
    expect(created.draftValidation).toEqual({ valid: true, issues: [] });

    const broken = { ...preset.design, capacitor: { capacitence: '940 uF' } };
    const edited = designDetailSchema.parse(
      (await sam.patch(`/api/designs/${created.id}`).send({ draft: broken }).expect(200)).body,
    );
    expect(edited.draft).toEqual(broken);
    expect(edited.draftValidation.valid).toBe(false);
    expect(edited.draftValidation.issues.map((i) => i.path)).toEqual(expect.arrayContaining(['capacitor.capacitence']));

    const save = await sam.post(`/api/designs/${created.id}/revisions`).send({ note: 'should fail' });
    expect(save.status).toBe(422);
    expect(save.body.error.code).toBe('invalid_design');
    expect(save.body.error.fields.map((f: { path: string }) => f.path)).toEqual(
      expect.arrayContaining(['draft.capacitor.capacitence']),
    );
    expect(await world.database.db.select().from(revisions).where(eq(revisions.designId, created.id))).toHaveLength(0);
  });

  it('refuse an unknown preset and a project of no one', async () => {
    const sam = await world.as('engineer');
    const project = await makeProject(world);
    expect((await sam.post('/api/designs').send({ projectId: project.id, name: 'x', presetId: 'no-such-preset' })).status).toBe(
      422,
    );
    expect((await sam.post('/api/designs').send({ projectId: '00000000-0000-4000-8000-000000000000', name: 'x' })).status).toBe(
      404,
    );
  });

  it('filter by project, status and name, and carry the latest revision’s worst status', async () => {
    const sam = await world.as('engineer');
    const project = await makeProject(world, 'Filter project');
    const one = await makeDesign(world, project.id, preset.design, 'Filter alpha');
    await makeDesign(world, project.id, preset.design, 'Filter beta');
    const revision = await makeRevision(world, one.id);
    const list = pageSchema(designSummarySchema).parse(
      (await sam.get('/api/designs').query({ projectId: project.id }).expect(200)).body,
    );
    expect(list.items.map((d) => d.name).sort()).toEqual(['Filter alpha', 'Filter beta']);
    const alpha = list.items.find((d) => d.name === 'Filter alpha')!;
    expect(alpha.latestRevisionId).toBe(revision.id);
    expect(alpha.status).not.toBe('not-run');
    expect(
      (await sam.get('/api/designs').query({ projectId: project.id, status: 'not-run' }).expect(200)).body.items.map(
        (d: { name: string }) => d.name,
      ),
    ).toEqual(['Filter beta']);
    expect(
      (await sam.get('/api/designs').query({ projectId: project.id, status: alpha.status }).expect(200)).body.items.map(
        (d: { name: string }) => d.name,
      ),
    ).toEqual(['Filter alpha']);
    expect(
      (await sam.get('/api/designs').query({ search: 'beta' }).expect(200)).body.items.map((d: { name: string }) => d.name),
    ).toEqual(['Filter beta']);
    expect((await sam.get('/api/designs').query({ status: 'sideways' })).status).toBe(400);
  });

  it('with revisions cannot be deleted, only archived', async () => {
    const sam = await world.as('engineer');
    const project = await makeProject(world);
    const design = await makeDesign(world, project.id, preset.design);
    await makeRevision(world, design.id);
    expect((await sam.delete(`/api/designs/${design.id}`)).status).toBe(409);
    await sam.patch(`/api/designs/${design.id}`).send({ archived: true }).expect(200);
    const empty = await makeDesign(world, project.id, preset.design);
    await sam.delete(`/api/designs/${empty.id}`).expect(204);
  });
});

describe('revisions', () => {
  let designId: string;
  let revision: ReturnType<typeof revisionDetailSchema.parse>;
  beforeAll(async () => {
    const project = await makeProject(world);
    designId = (await makeDesign(world, project.id, preset.design)).id;
    const res = await (await world.as('engineer')).post(`/api/designs/${designId}/revisions`).send({ note: 'first' }).expect(201);
    revision = revisionDetailSchema.parse(res.body);
  });

  it('store the canonical JSON of the design, its SHA-256, the engine version, the author and the check', async () => {
    expect(revision.sequence).toBe(1);
    expect(revision.canonicalJson).toBe(canonicalJson(preset.design));
    expect(revision.sha256).toBe(sha256Hex(canonicalJson(preset.design)));
    expect(revision.sha256).toMatch(/^[0-9a-f]{64}$/);
    expect(revision.engineVersion).toEqual(expect.any(String));
    expect(revision.author?.email).toBe('sam@northfold.example');
    expect(revision.results.checks.length).toBeGreaterThan(0);
    expect(revision.results.summary).toEqual(expect.objectContaining({ worst: revision.worstStatus }));
    expect(revision.isLatest).toBe(true);
    expect(revision.analyses.map((a) => a.kind)).toEqual(['check']);
    const [audit] = await world.database.db
      .select()
      .from(auditLog)
      .where(sql`${auditLog.action} = 'revision.saved' and ${auditLog.entityId} = ${revision.id}`);
    expect(audit.details).toEqual(expect.objectContaining({ sha256: revision.sha256, sequence: 1 }));
  });

  it('number in sequence per design and mark the older one as not the latest', async () => {
    const second = await makeRevision(world, designId, 'second');
    expect(second.sequence).toBe(2);
    const first = await (await world.as('viewer')).get(`/api/revisions/${revision.id}`).expect(200);
    expect(first.body.isLatest).toBe(false);
    const list = await (await world.as('viewer')).get(`/api/designs/${designId}/revisions`).expect(200);
    expect(list.body.items.map((r: { sequence: number }) => r.sequence)).toEqual([2, 1]);
  });

  it('hash the same design the same whatever the key order it was sent in', async () => {
    const reverseKeys = (value: unknown): unknown =>
      Array.isArray(value)
        ? value.map(reverseKeys)
        : value && typeof value === 'object'
          ? Object.fromEntries(
              Object.entries(value)
                .reverse()
                .map(([k, v]) => [k, reverseKeys(v)]),
            )
          : value;
    const reordered = reverseKeys(preset.design);
    expect(JSON.stringify(reordered)).not.toBe(JSON.stringify(preset.design));
    const res = await (
      await world.as('engineer')
    )
      .post(`/api/designs/${designId}/revisions`)
      .send({ note: 'same design, other order', design: reordered })
      .expect(201);
    expect(res.body.sha256).toBe(revision.sha256);
  });

  it('have no update route', async () => {
    const sam = await world.as('engineer');
    for (const method of ['put', 'patch', 'delete'] as const) {
      const res = await sam[method](`/api/revisions/${revision.id}`).send({ note: 'edited' });
      expect([method, res.status]).toEqual([method, 404]);
    }
  });

  it('cannot be changed or deleted even by SQL: the database raises', async () => {
    await expect(world.database.pg.query(`update revisions set note = 'edited' where id = $1`, [revision.id])).rejects.toThrow(
      /immutable/,
    );
    await expect(world.database.pg.query(`delete from revisions where id = $1`, [revision.id])).rejects.toThrow(/immutable/);
    await expect(world.database.pg.query(`truncate revisions cascade`)).rejects.toThrow(/immutable/);
    const [row] = await world.database.db.select().from(revisions).where(eq(revisions.id, revision.id));
    expect(row.note).toBe('first');
  });

  it('verify: the stored hash matches the stored text and a re-run reproduces the metrics', async () => {
    const res = await (await world.as('viewer')).get(`/api/revisions/${revision.id}/verify`).expect(200);
    const verify = verifyRevisionResponseSchema.parse(res.body);
    expect(verify).toMatchObject({
      revisionId: revision.id,
      sha256: revision.sha256,
      hashMatches: true,
      reproduced: true,
      differences: [],
    });
  });

  it('verify: a revision whose stored results differ from a re-run says so, with the differences', async () => {
    // Forge a revision row directly (the API cannot write one like this) with a wrong metric.
    const results = { ...revision.results, metrics: { ...revision.results.metrics, i2t: 12345 } };
    const [forged] = await world.database.db
      .insert(revisions)
      .values({
        teamId: world.teamA.id,
        designId,
        sequence: 99,
        designJson: revision.canonicalJson,
        sha256: 'f'.repeat(64),
        engineVersion: revision.engineVersion,
        policy: revision.policy as object,
        results,
        worstStatus: revision.worstStatus,
        authorId: world.users.engineer.id,
      })
      .returning();
    const verify = (await (await world.as('viewer')).get(`/api/revisions/${forged.id}/verify`).expect(200)).body;
    expect(verify.hashMatches).toBe(false);
    expect(verify.reproduced).toBe(false);
    expect(verify.differences).toEqual([expect.objectContaining({ path: 'metrics.i2t', stored: 12345 })]);
  });
});

describe('analyses on a revision', () => {
  let revisionId: string;
  beforeAll(async () => {
    const project = await makeProject(world);
    const design = await makeDesign(world, project.id, preset.design);
    revisionId = (await makeRevision(world, design.id)).id;
  });

  it('answer the check from the cache made when the revision was saved', async () => {
    const res = await (
      await world.as('engineer')
    )
      .post(`/api/revisions/${revisionId}/analyses`)
      .send({ kind: 'check' })
      .expect(200);
    const run = analysisRunSchema.parse(res.body);
    expect(run.cached).toBe(true);
    expect(run.kind).toBe('check');
  });

  it('size the precharge resistor once per options, then answer from the cache', async () => {
    const sam = await world.as('engineer');
    const options = { maxInrushCurrent: 30, maxPrechargeTime: 3 };
    const first = await sam.post(`/api/revisions/${revisionId}/analyses`).send({ kind: 'precharge', options }).expect(201);
    expect(first.body.cached).toBe(false);
    expect(first.body.result).toEqual(expect.objectContaining({ window: expect.anything(), candidates: expect.any(Array) }));
    const again = await sam
      .post(`/api/revisions/${revisionId}/analyses`)
      .send({ kind: 'precharge', options: { maxPrechargeTime: 3, maxInrushCurrent: 30 } })
      .expect(200);
    expect(again.body).toEqual({ ...first.body, cached: true });
    const rows = await world.database.db.select().from(analysisRuns).where(eq(analysisRuns.revisionId, revisionId));
    expect(rows.map((r) => r.kind).sort()).toEqual(['check', 'precharge']);
  });

  it('refuse bad precharge options with field paths', async () => {
    const res = await (
      await world.as('engineer')
    )
      .post(`/api/revisions/${revisionId}/analyses`)
      .send({ kind: 'precharge', options: { maxInrushCurrent: 'lots' } });
    expect(res.status).toBe(422);
    expect(res.body.error.fields.map((f: { path: string }) => f.path)).toEqual(
      expect.arrayContaining(['options.maxInrushCurrent']),
    );
  });

  it('refuse an unknown kind', async () => {
    const res = await (await world.as('engineer')).post(`/api/revisions/${revisionId}/analyses`).send({ kind: 'astrology' });
    expect(res.status).toBe(400);
    expect(res.body.error.fields[0].path).toBe('kind');
  });
});

describe('the stateless check and sizing', () => {
  it('checks a design sent in the body and writes nothing', async () => {
    const before = await world.counts();
    const res = await (await world.as('viewer')).post('/api/check').send({ design: preset.design, points: 200 }).expect(200);
    const body = checkResponseSchema.parse(res.body);
    // The engine adds its event instants (the bypass closing) to the requested grid.
    expect(body.waveform!.t.length).toBeGreaterThanOrEqual(200);
    expect(body.waveform!.t.length).toBeLessThan(220);
    expect(body.checks.length).toBeGreaterThan(0);
    expect(await world.counts()).toEqual(before);
  });

  it('names the fields of an invalid design under design.', async () => {
    const res = await (await world.as('engineer')).post('/api/check').send({ design: { ...preset.design, duration: -1 } });
    expect(res.status).toBe(422);
    expect(res.body.error.fields[0].path).toBe('design.duration');
  });

  it('sizes a precharge resistor from the engine’s own request', async () => {
    const res = await (await world.as('engineer')).post('/api/precharge/size').send(sizingRequest).expect(200);
    expect(res.body).toEqual(expect.objectContaining({ candidates: expect.any(Array), binding: expect.any(String) }));
    const bad = await (await world.as('engineer')).post('/api/precharge/size').send({ ...sizingRequest, bypassThreshold: 1.5 });
    expect(bad.status).toBe(422);
    expect(bad.body.error.fields[0].path).toBe('bypassThreshold');
  });
});
