// Mains power-up (issue 9) through the API: a mains design saved as a revision, its checks, verify,
// the margin report's mains section, the stored analyses and the stateless screens' endpoints.
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { createTestWorld, type TestWorld } from '@/tests/helpers/testApp';
import { makeDesign, makeProject, makeRevision, presets } from '@/tests/helpers/fixtures';
import { pdfText } from '@/tests/helpers/pdfText';

jest.setTimeout(180_000);

const example = JSON.parse(readFileSync(path.join(__dirname, '..', '..', 'examples', 'mains-wall-charger.json'), 'utf8'));

let world: TestWorld;
let revision: { id: string; sha256: string };
let stored: { checks: { id: string; status: string; value: number | null; limit: number | null }[]; metrics: Record<string, unknown> };

beforeAll(async () => {
  world = await createTestWorld();
  const project = await makeProject(world);
  const design = await makeDesign(world, project.id, example, 'Wall charger front end, 230 V');
  revision = await makeRevision(world, design.id);
  stored = (await (await world.as('viewer')).get(`/api/revisions/${revision.id}`).expect(200)).body.results;
});
afterAll(async () => {
  await world.close();
});

const binary = (res: import('superagent').Response, callback: (error: Error | null, body: Buffer) => void) => {
  const chunks: Buffer[] = [];
  res.on('data', (chunk: Buffer) => chunks.push(chunk));
  res.on('end', () => callback(null, Buffer.concat(chunks)));
};
const normalise = (text: string) => text.replace(/\u03bc/g, '\u00b5').replace(/\s+/g, ' ');

describe('a mains design as a revision', () => {
  it('is offered as a preset', async () => {
    const mains = (await presets(world)).find((p) => p.id === 'mains-wall-charger');
    expect(mains).toBeDefined();
    expect(mains!.design.mains).toBeDefined();
  });

  it('stores the rectifier checks: diode surge (half-sine equivalent) and I²t, fuse I²t', () => {
    const ids = stored.checks.map((c) => c.id);
    expect(ids).toEqual(expect.arrayContaining(['diode-surge-current', 'diode-i2t', 'fuse-i2t']));
    const surge = stored.checks.find((c) => c.id === 'diode-surge-current')!;
    expect(surge.limit).toBe(200);
    expect(surge.value).toBeCloseTo(stored.metrics.surgeEquivalentCurrent as number, 9);
    expect(surge.value).toBeGreaterThan(0);
    expect(Array.isArray(stored.metrics.diodes)).toBe(true);
  });

  it('verifies: re-hashing and re-running reproduce the stored check', async () => {
    const res = await (await world.as('viewer')).get(`/api/revisions/${revision.id}/verify`).expect(200);
    expect(res.body.differences).toEqual([]);
    expect(res.body.reproduced).toBe(true);
  });

  it('the stateless check answers a mains design in the same shape', async () => {
    const res = await (await world.as('viewer')).post('/api/check').send({ design: example, includeWaveform: true }).expect(200);
    expect(Object.keys(res.body)).toEqual(expect.arrayContaining(['metrics', 'solvers', 'checks', 'notices', 'summary', 'waveform']));
    expect(res.body.waveform.t.length).toBe(res.body.waveform.i.length);
    expect(res.body.checks.map((c: { id: string }) => c.id)).toContain('diode-surge-current');
  });

  it('names the field of a bad mains design', async () => {
    const bad = { ...example, mains: { ...example.mains, frequency: '5 kHz' } };
    const res = await (await world.as('viewer')).post('/api/check').send({ design: bad }).expect(422);
    expect(res.body.error.fields.map((f: { path: string }) => f.path)).toContain('design.mains.frequency');
  });
});

describe('mains analyses on the revision', () => {
  it('mains-sweep: validates its options by field, runs, and is cached', async () => {
    const sam = await world.as('engineer');
    const bad = await sam.post(`/api/revisions/${revision.id}/analyses`).send({ kind: 'mains-sweep', options: { step: -5 } }).expect(400);
    expect(bad.body.error.fields[0].path).toBe('options.step');
    const unknown = await sam.post(`/api/revisions/${revision.id}/analyses`).send({ kind: 'mains-sweep', options: { stride: 5 } }).expect(400);
    expect(unknown.body.error.fields[0].path).toMatch(/^options/);
    const first = await sam.post(`/api/revisions/${revision.id}/analyses`).send({ kind: 'mains-sweep', options: { step: 10 } });
    expect([200, 201]).toContain(first.status);
    expect(first.body.cached).toBe(false);
    expect(first.body.result.points).toHaveLength(19);
    expect(first.body.result.worst.angle).toBeGreaterThan(0);
    expect(first.body.result.worst.angle).toBeLessThan(180);
    const again = await sam.post(`/api/revisions/${revision.id}/analyses`).send({ kind: 'mains-sweep', options: { step: 10 } });
    expect(again.body.cached).toBe(true);
  });

  it('mains-cold-hot: the hot restart lets through more than the cold start', async () => {
    const sam = await world.as('engineer');
    const bad = await sam.post(`/api/revisions/${revision.id}/analyses`).send({ kind: 'mains-cold-hot', options: { sweep: { from: 90, to: 30 } } }).expect(400);
    expect(bad.body.error.fields[0].path).toBe('options.sweep.to');
    const res = await sam.post(`/api/revisions/${revision.id}/analyses`).send({ kind: 'mains-cold-hot', options: { sweep: { step: 15 } } });
    expect([200, 201]).toContain(res.status);
    const { cold, hot } = res.body.result;
    expect(hot.limiterResistance).toBeLessThan(cold.limiterResistance);
    expect(hot.metrics.peakCurrent.value).toBeGreaterThan(cold.metrics.peakCurrent.value);
    expect(hot.metrics.i2t).toBeGreaterThan(cold.metrics.i2t);
  });

  it('the margin report has the mains section, the diode checks and the cold/hot table', async () => {
    const res = await (await world.as('viewer')).get(`/api/revisions/${revision.id}/report.pdf`).buffer(true).parse(binary).expect(200);
    const text = normalise((await pdfText(res.body as Buffer)).text);
    expect(text).toContain('Mains power-up');
    expect(text).toContain('Worst switch-on angle');
    expect(text).toContain('Diode surge current');
    expect(text).toContain('Diode I²t');
    expect(text).toMatch(/half-sine equivalent/i);
    expect(text).toMatch(/against IFSM 200 A/);
    expect(text).toMatch(/Cold start against hot restart/);
    expect(text).toMatch(/Hot, 110 °C/);
  });
});

describe('stateless mains endpoints', () => {
  it('POST /api/mains/sweep returns the points and the worst angle, and names bad options', async () => {
    const tom = await world.as('viewer');
    const res = await tom.post('/api/mains/sweep').send({ design: example, options: { from: 0, to: 180, step: 15 } }).expect(200);
    expect(res.body.points).toHaveLength(13);
    const max = Math.max(...res.body.points.map((p: { peakCurrent: number }) => p.peakCurrent));
    expect(res.body.worst.peakCurrent).toBeGreaterThanOrEqual(max * (1 - 1e-9));
    expect(res.body.worst.refined).toBe(true);
    const bad = await tom.post('/api/mains/sweep').send({ design: example, options: { step: 'wide' } }).expect(400);
    expect(bad.body.error.fields[0].path).toBe('options.step');
    const tooMany = await tom.post('/api/mains/sweep').send({ design: example, options: { step: 0.01 } }).expect(400);
    expect(tooMany.body.error.fields[0].message).toMatch(/at most 721/);
  });

  it('refuses a design without a mains section, naming it', async () => {
    const dc = (await presets(world)).find((p) => !p.design.mains)!.design;
    const res = await (await world.as('viewer')).post('/api/mains/sweep').send({ design: dc }).expect(422);
    expect(res.body.error.fields[0].path).toBe('design.mains');
  });

  it('POST /api/mains/cold-hot compares, and needs an NTC', async () => {
    const tom = await world.as('viewer');
    const res = await tom.post('/api/mains/cold-hot').send({ design: example, options: { hot: '100 °C', sweep: { step: 15 } } }).expect(200);
    expect(res.body.hot.startTemperature).toBeCloseTo(373.15, 6);
    expect(res.body.cold.angle).toEqual(expect.any(Number));
    const badTemp = await tom.post('/api/mains/cold-hot').send({ design: example, options: { hot: 'warm' } });
    expect(badTemp.status).toBeGreaterThanOrEqual(400);
    expect(JSON.stringify(badTemp.body.error)).toMatch(/hot/);
    const resistor = { ...example, mains: { ...example.mains, limiter: { kind: 'resistor', resistance: '10 Ω' } } };
    const noNtc = await tom.post('/api/mains/cold-hot').send({ design: resistor }).expect(422);
    expect(noNtc.body.error.fields[0].path).toBe('design.mains.limiter.kind');
  });
});

describe('a tolerance spread of a mains design (issue 9)', () => {
  async function poll(agent: Awaited<ReturnType<TestWorld['as']>>, jobId: string) {
    for (let k = 0; k < 2400; k++) {
      const res = await agent.get(`/api/analysis-jobs/${jobId}`).expect(200);
      if (res.body.state !== 'queued' && res.body.state !== 'running') return res.body;
      await new Promise((r) => setTimeout(r, 50));
    }
    throw new Error('the spread job did not finish');
  }

  it('runs through the job route to completion with the mains engine, its metrics and checks', async () => {
    const sam = await world.as('engineer');
    const options = {
      method: 'corners',
      tolerances: { 'mains.voltage': { percent: 10 }, 'capacitor.capacitance': { percent: 20 } },
    };
    const start = await sam.post(`/api/revisions/${revision.id}/analyses`).send({ kind: 'spread', options }).expect(202);
    expect(start.body.job).toEqual(expect.objectContaining({ kind: 'spread', total: 4 }));
    const done = await poll(sam, start.body.job.id);
    expect(done.state).toBe('done');
    const result = done.result.result;
    expect(result.status).toBe('complete');
    expect(result.subject).toBe('mains');
    expect(result.mains.angleMode).toBe('search');
    const keys = result.metrics.map((m: { key: string }) => m.key);
    expect(keys).toEqual(expect.arrayContaining(['peakCurrent', 'diodeI2t', 'surgeEquivalentCurrent', 'limiterEnergy', 'switchOnAngle']));
    const peak = result.metrics.find((m: { key: string }) => m.key === 'peakCurrent');
    expect(peak.max).toBeGreaterThan(peak.nominal);
    expect(peak.atMax.values['mains.voltage']).toBeCloseTo(253, 6);
    // The corner opens as a mains design (no DC source), at the angle it was judged at.
    expect(peak.atMax.design.mains.voltage).toBeCloseTo(253, 6);
    expect(peak.atMax.design.source).toBeUndefined();
    const surge = result.checks.find((c: { id: string }) => c.id === 'diode-surge-current');
    expect(surge.limit).toBe(200);
    expect(surge.value.max).toBeCloseTo(result.metrics.find((m: { key: string }) => m.key === 'surgeEquivalentCurrent').max, 9);
  });

  it('names a DC path put on a mains design', async () => {
    const sam = await world.as('engineer');
    const res = await sam
      .post(`/api/revisions/${revision.id}/analyses`)
      .send({ kind: 'spread', options: { method: 'corners', tolerances: { 'source.voltage': { percent: 10 } } } })
      .expect(422);
    expect(res.body.error.fields).toEqual(
      expect.arrayContaining([expect.objectContaining({ path: 'options.tolerances.source.voltage', message: expect.stringMatching(/mains\.voltage/) })]),
    );
  });
});
