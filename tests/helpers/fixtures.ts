// Builders for the workspace through the API, as the people of a TestWorld would do it.
import type { TestWorld } from './testApp';

export interface Preset {
  id: string;
  title: string;
  design: Record<string, unknown>;
}

export async function presets(world: TestWorld): Promise<Preset[]> {
  const res = await (await world.as('engineer')).get('/api/presets').expect(200);
  return res.body.items;
}

/** The preset with a precharge resistor and a bypass (the depot charger's DC link, 800 V). */
export async function prechargePreset(world: TestWorld): Promise<Preset> {
  const all = await presets(world);
  const found = all.find((p) => /depot|800/i.test(`${p.id} ${p.title}`)) ?? all.find((p) => p.design.precharge);
  if (!found) throw new Error('no preset with a precharge resistor');
  return found;
}

let counter = 0;
const unique = (base: string) => `${base} ${++counter}`;

export async function makeProject(world: TestWorld, name = unique('Project')): Promise<{ id: string; name: string }> {
  const res = await (await world.as('engineer')).post('/api/projects').send({ name }).expect(201);
  return res.body;
}

export async function makeDesign(
  world: TestWorld,
  projectId: string,
  draft?: unknown,
  name = unique('Design'),
): Promise<{ id: string; name: string }> {
  const design = draft ?? (await prechargePreset(world)).design;
  const res = await (await world.as('engineer')).post('/api/designs').send({ projectId, name, draft: design });
  if (res.status !== 201) throw new Error(`design: ${res.status} ${JSON.stringify(res.body)}`);
  return res.body;
}

export async function makeRevision(
  world: TestWorld,
  designId: string,
  note = 'for a test',
): Promise<{ id: string; sha256: string; sequence: number }> {
  const res = await (await world.as('engineer')).post(`/api/designs/${designId}/revisions`).send({ note });
  if (res.status !== 201) throw new Error(`revision: ${res.status} ${JSON.stringify(res.body)}`);
  return res.body;
}

export async function makeReview(world: TestWorld, revisionId: string, note = 'please review'): Promise<{ id: string }> {
  const res = await (
    await world.as('engineer')
  )
    .post(`/api/revisions/${revisionId}/reviews`)
    .send({ reviewerIds: [world.users.reviewer.id], note });
  if (res.status !== 201) throw new Error(`review: ${res.status} ${JSON.stringify(res.body)}`);
  return res.body.items[0];
}

/** Project → design → revision (→ review), fresh. */
export async function makeChain(world: TestWorld, withReview = false) {
  const project = await makeProject(world);
  const design = await makeDesign(world, project.id);
  const revision = await makeRevision(world, design.id);
  const review = withReview ? await makeReview(world, revision.id) : null;
  return { project, design, revision, review };
}

export const sizingRequest = {
  busVoltage: 800,
  busVoltageTolerance: '10 %',
  capacitance: '940 uF',
  capacitanceTolerance: 0.2,
  maxInrushCurrent: 25,
  maxPrechargeTime: 3,
  bypassThreshold: 0.95,
  contactorDelay: '20 ms',
  loopResistance: '50 mohm',
};
