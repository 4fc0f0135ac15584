// Spread, stability and snubber through the API: the spread as a background job (start → poll →
// done, cancel, the cached second call), option errors naming the field, roles and teams, and the
// stateless stability and snubber the live editor calls.
import { eq } from 'drizzle-orm';
import { analysisRuns } from '@/db/schema';
import { drainJobs } from '@/server/services/jobs';
import { closeEngineWorkers } from '@/server/services/engine';
import { createTestWorld, type TestWorld } from '@/tests/helpers/testApp';
import { pdfText } from '@/tests/helpers/pdfText';
import { makeDesign, makeProject, makeRevision, presets, prechargePreset, type Preset } from '@/tests/helpers/fixtures';

jest.setTimeout(180_000);

let world: TestWorld;
let precharge: Preset;
let lcFilter: Preset;
let turnOff: Preset;
let revisionId: string;
let lcRevisionId: string;
let turnOffRevisionId: string;

const tolerances = {
  'capacitor.capacitance': { percent: 10, drift: -20 },
  'source.voltage': { min: '760 V', max: '840 V' },
  'precharge.resistance': { percent: 5 },
};

async function poll(agent: Awaited<ReturnType<TestWorld['as']>>, jobId: string, until: (body: { state: string }) => boolean) {
  for (let k = 0; k < 1200; k++) {
    const res = await agent.get(`/api/analysis-jobs/${jobId}`).expect(200);
    if (until(res.body)) return res.body;
    await new Promise((r) => setTimeout(r, 50));
  }
  throw new Error('job did not reach the state in time');
}

beforeAll(async () => {
  world = await createTestWorld();
  const all = await presets(world);
  precharge = await prechargePreset(world);
  lcFilter = all.find((p) => p.id === 'lc-filter')!;
  turnOff = all.find((p) => p.id === 'switch-turn-off')!;
  const project = await makeProject(world);
  revisionId = (await makeRevision(world, (await makeDesign(world, project.id, precharge.design)).id)).id;
  lcRevisionId = (await makeRevision(world, (await makeDesign(world, project.id, lcFilter.design)).id)).id;
  turnOffRevisionId = (await makeRevision(world, (await makeDesign(world, project.id, turnOff.design)).id)).id;
});
afterAll(async () => {
  await drainJobs(true);
  await closeEngineWorkers();
  await world.close();
});

describe('the spread job', () => {
  it('starts with 202, reports progress, finishes, stores the run, and answers the next call from the cache', async () => {
    const sam = await world.as('engineer');
    const options = { method: 'corners', tolerances };
    const start = await sam.post(`/api/revisions/${revisionId}/analyses`).send({ kind: 'spread', options }).expect(202);
    expect(start.body.job).toEqual(expect.objectContaining({ id: expect.any(String), kind: 'spread', total: 8 }));
    expect(['queued', 'running']).toContain(start.body.job.state);

    // The same request while it runs joins the same job.
    const joined = await sam.post(`/api/revisions/${revisionId}/analyses`).send({ kind: 'spread', options });
    if (joined.status === 202) expect(joined.body.job.id).toBe(start.body.job.id);

    const done = await poll(sam, start.body.job.id, (b) => b.state !== 'queued' && b.state !== 'running');
    expect(done.state).toBe('done');
    expect(done.done).toBe(8);
    expect(done.total).toBe(8);
    const result = done.result.result;
    expect(result.status).toBe('complete');
    expect(result.method).toBe('corners');
    expect(result.histograms.length).toBeGreaterThan(0);
    expect(result.histograms[0].bins).toHaveLength(30);
    expect(result.worstCase.design).toEqual(expect.objectContaining({ source: expect.anything() }));

    const again = await sam.post(`/api/revisions/${revisionId}/analyses`).send({ kind: 'spread', options }).expect(200);
    expect(again.body.cached).toBe(true);
    expect(again.body.id).toBe(done.result.id);
    const rows = await world.database.db.select().from(analysisRuns).where(eq(analysisRuns.revisionId, revisionId));
    expect(rows.filter((r) => r.kind === 'spread')).toHaveLength(1);

    // The margin report files the spread with the revision: how it sampled and the worst case.
    const report = await sam
      .get(`/api/revisions/${revisionId}/report.pdf`)
      .buffer(true)
      .parse((res, callback) => {
        const chunks: Buffer[] = [];
        res.on('data', (chunk: Buffer) => chunks.push(chunk));
        res.on('end', () => callback(null, Buffer.concat(chunks)));
      })
      .expect(200);
    const text = (await pdfText(report.body as Buffer)).text.replace(/\s+/g, ' ');
    expect(text).toContain('Tolerance spread');
    expect(text).toContain('all 8 corners of the tolerance bands');
    expect(text).toContain(`Worst case: ${result.worstCase.label}`);
  });

  it('is cancelled on request and stores nothing', async () => {
    const sam = await world.as('engineer');
    const options = { method: 'monte-carlo', samples: 100_000, seed: 7, tolerances };
    const start = await sam.post(`/api/revisions/${revisionId}/analyses`).send({ kind: 'spread', options }).expect(202);
    const jobId = start.body.job.id;
    await poll(sam, jobId, (b) => b.state === 'running');
    // A viewer may watch but not cancel.
    await (await world.as('viewer')).get(`/api/analysis-jobs/${jobId}`).expect(200);
    await (await world.as('viewer')).post(`/api/analysis-jobs/${jobId}/cancel`).expect(403);
    await sam.post(`/api/analysis-jobs/${jobId}/cancel`).expect(200);
    const ended = await poll(sam, jobId, (b) => b.state !== 'running' && b.state !== 'queued');
    expect(ended.state).toBe('cancelled');
    expect(ended.done).toBeLessThan(100_000);
    expect(ended.result).toBeUndefined();
    const rows = await world.database.db.select().from(analysisRuns).where(eq(analysisRuns.revisionId, revisionId));
    expect(rows.filter((r) => r.kind === 'spread')).toHaveLength(1);
  });

  it.each([
    [{ method: 'sideways', tolerances }, 'options.method'],
    [{ method: 'monte-carlo', samples: 100_001, tolerances }, 'options.samples'],
    [{ method: 'monte-carlo', samples: 2.5, tolerances }, 'options.samples'],
    [{ method: 'monte-carlo', seed: -1, tolerances }, 'options.seed'],
    [{ method: 'corners', tolerances: { 'capacitor.colour': { percent: 5 } } }, 'options.tolerances.capacitor.colour'],
    [{ method: 'corners', tolerances: { 'capacitor.capacitance': { percent: 'lots' } } }, 'options.tolerances.capacitor.capacitance.percent'],
    [{ method: 'corners', tolerances, color: 'red' }, 'options'],
  ])('refuses options %j naming %s', async (options, path) => {
    const res = await (await world.as('engineer')).post(`/api/revisions/${revisionId}/analyses`).send({ kind: 'spread', options });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.map((f: { path: string }) => f.path)).toContain(path);
  });

  it('refuses more than 10 toleranced values for corners, and a spread without tolerances', async () => {
    const eleven = Object.fromEntries(
      [
        'source.voltage',
        'source.resistance',
        'source.inductance',
        'capacitor.capacitance',
        'capacitor.esr',
        'precharge.resistance',
        'filter.inductance',
        'filter.resistance',
        'damping.resistance',
        'damping.capacitance',
        'bleeder.resistance',
      ].map((p) => [p, { percent: 5 }]),
    );
    const sam = await world.as('engineer');
    const res = await sam.post(`/api/revisions/${revisionId}/analyses`).send({ kind: 'spread', options: { method: 'corners', tolerances: eleven } });
    expect(res.status).toBe(400);
    expect(res.body.error.fields[0].path).toBe('options.tolerances');
    expect(res.body.error.message).toMatch(/at most 10/);
    const none = await sam.post(`/api/revisions/${revisionId}/analyses`).send({ kind: 'spread', options: { method: 'corners' } });
    expect(none.status).toBe(422);
    expect(none.body.error.fields[0].path).toBe('options.tolerances');
  });

  it('takes the tolerances from the design file when the options have none', async () => {
    const project = await makeProject(world);
    const withTolerances = { ...precharge.design, tolerances: { 'capacitor.capacitance': { percent: 10, drift: -20 } } };
    const rev = (await makeRevision(world, (await makeDesign(world, project.id, withTolerances)).id)).id;
    const sam = await world.as('engineer');
    const start = await sam.post(`/api/revisions/${rev}/analyses`).send({ kind: 'spread', options: { method: 'corners' } }).expect(202);
    expect(start.body.job.total).toBe(2);
    const done = await poll(sam, start.body.job.id, (b) => b.state === 'done' || b.state === 'failed');
    expect(done.state).toBe('done');
    expect(done.result.result.parameters.map((p: { path: string }) => p.path)).toEqual(['capacitor.capacitance']);
  });

  it('names a tolerance on a part the design does not have', async () => {
    const res = await (await world.as('engineer'))
      .post(`/api/revisions/${lcRevisionId}/analyses`)
      .send({ kind: 'spread', options: { method: 'corners', tolerances: { 'precharge.resistance': { percent: 5 } } } });
    expect(res.status).toBe(422);
    expect(res.body.error.fields[0].path).toBe('options.tolerances.precharge.resistance');
  });

  it('is forbidden to a viewer, and another team sees neither the revision nor the job', async () => {
    const viewer = await world.as('viewer');
    const outsider = await world.as('outsider');
    const before = await world.counts();
    await viewer
      .post(`/api/revisions/${revisionId}/analyses`)
      .send({ kind: 'spread', options: { method: 'corners', tolerances } })
      .expect(403);
    await outsider
      .post(`/api/revisions/${revisionId}/analyses`)
      .send({ kind: 'spread', options: { method: 'corners', tolerances } })
      .expect(404);
    expect(await world.counts()).toEqual(before);

    const sam = await world.as('engineer');
    const start = await sam
      .post(`/api/revisions/${revisionId}/analyses`)
      .send({ kind: 'spread', options: { method: 'monte-carlo', samples: 200, seed: 3, tolerances } })
      .expect(202);
    await outsider.get(`/api/analysis-jobs/${start.body.job.id}`).expect(404);
    // The outsider is their own team's admin: cancelling is an engineer's act, refused before the job is looked up.
    await outsider.post(`/api/analysis-jobs/${start.body.job.id}/cancel`).expect(403);
    await (await world.as('engineer')).get('/api/analysis-jobs/not-a-job').expect(404);
    const done = await poll(sam, start.body.job.id, (b) => b.state === 'done' || b.state === 'failed');
    expect(done.state).toBe('done');
    expect(done.result.result.seed).toBe(3);
  });
});

describe('stability and snubber on a revision', () => {
  it('runs stability once per options and caches it', async () => {
    const sam = await world.as('engineer');
    const first = await sam.post(`/api/revisions/${lcRevisionId}/analyses`).send({ kind: 'stability', options: { dampingRatio: 3 } }).expect(201);
    expect(first.body.result).toEqual(
      expect.objectContaining({ stable: expect.any(Boolean), marginDb: expect.any(Number), eigenvalues: expect.any(Array) }),
    );
    expect(first.body.result.damping.n).toBe(3);
    const again = await sam.post(`/api/revisions/${lcRevisionId}/analyses`).send({ kind: 'stability', options: { dampingRatio: 3 } }).expect(200);
    expect(again.body.cached).toBe(true);
  });

  it('proposes a snubber from the two measurements', async () => {
    const res = await (await world.as('engineer'))
      .post(`/api/revisions/${turnOffRevisionId}/analyses`)
      .send({ kind: 'snubber', options: { f1: '58.1 MHz', f2: '40.1 MHz', addedCapacitance: '330 pF', switchingFrequency: '50 kHz' } })
      .expect(201);
    const { parasitics, proposal, comparison } = res.body.result;
    expect(parasitics.cParasitic).toBeGreaterThan(250e-12);
    expect(parasitics.cParasitic).toBeLessThan(350e-12);
    expect(proposal.rs).toBeGreaterThan(5);
    expect(proposal.resistorPower).toBeGreaterThan(0);
    expect(comparison.peakAfter).toBeLessThan(comparison.peakBefore);
  });

  it('names a bad snubber field', async () => {
    const res = await (await world.as('engineer'))
      .post(`/api/revisions/${turnOffRevisionId}/analyses`)
      .send({ kind: 'snubber', options: { f1: 'fast', f2: '40 MHz', addedCapacitance: '330 pF', switchingFrequency: '50 kHz' } });
    expect(res.status).toBe(400);
    expect(res.body.error.fields[0].path).toBe('options.f1');
    const swapped = await (await world.as('engineer'))
      .post(`/api/revisions/${turnOffRevisionId}/analyses`)
      .send({ kind: 'snubber', options: { f1: '40 MHz', f2: '58 MHz', addedCapacitance: '330 pF', switchingFrequency: '50 kHz' } });
    expect(swapped.status).toBe(422);
    expect(swapped.body.error.fields[0].path).toBe('f2');
  });
});

describe('stateless stability and snubber', () => {
  it('analyse a design in the body for any member and write nothing', async () => {
    const before = await world.counts();
    const res = await (await world.as('viewer')).post('/api/stability').send({ design: lcFilter.design }).expect(200);
    expect(res.body.impedance ?? res.body.sweep).toBeDefined();
    expect(typeof res.body.verdict).toBe('string');
    const snub = await (await world.as('viewer'))
      .post('/api/snubber/propose')
      .send({ design: turnOff.design, options: { f1: 58.1e6, f2: 40.1e6, addedCapacitance: 330e-12, switchingFrequency: 50e3 } })
      .expect(200);
    expect(snub.body.comparison.before.waveform.t.length).toBeGreaterThan(10);
    expect(await world.counts()).toEqual(before);
  });

  it('name the fields of bad input', async () => {
    const noLoad = await (await world.as('engineer')).post('/api/stability').send({ design: precharge.design });
    expect(noLoad.status).toBe(422);
    const bad = await (await world.as('engineer')).post('/api/stability').send({ design: { ...lcFilter.design, duration: -1 } });
    expect(bad.status).toBe(422);
    expect(bad.body.error.fields[0].path).toBe('design.duration');
    const missing = await (await world.as('engineer')).post('/api/snubber/propose').send({ design: turnOff.design, options: { f1: 1e6 } });
    expect(missing.status).toBe(400);
    expect(missing.body.error.fields.map((f: { path: string }) => f.path)).toContain('options.f2');
    await (await world.as('outsider')).post('/api/stability').send({ design: lcFilter.design }).expect(200);
  });
});
