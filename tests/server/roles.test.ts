// The role matrix: every team route × every role, and a member of another team. A refused request
// answers 403 (wrong role in the team) or 404 (another team's resource, or another team named in
// X-Team-Id), and writes nothing at all: every table's row count stays the same.
import request from 'supertest';
import type { Role } from '@/db/schema';
import { createTestWorld, PEOPLE, TEST_PASSWORD, type Person, type TestWorld } from '@/tests/helpers/testApp';
import {
  makeChain,
  makeDesign,
  makeProject,
  makeReview,
  makeRevision,
  prechargePreset,
  sizingRequest,
} from '@/tests/helpers/fixtures';

jest.setTimeout(240_000);

let world: TestWorld;
let presetDesign: Record<string, unknown>;
beforeAll(async () => {
  world = await createTestWorld();
  presetDesign = (await prechargePreset(world)).design;
});
afterAll(async () => {
  await world.close();
});

type Params = Record<string, string>;
interface RouteCase {
  method: 'get' | 'post' | 'patch' | 'put' | 'delete';
  path: string;
  allowed: Role[];
  /** 'team' routes act on the current team; 'resource' routes on a resource of team A. */
  scope: 'team' | 'resource';
  /** Fresh resources for one call (destructive and stateful routes get their own). */
  setup?: () => Promise<Params>;
  body?: (p: Params) => object;
  success: number;
}

const ALL: Role[] = ['admin', 'engineer', 'reviewer', 'viewer'];

let shared: Params = {};
const chain = async (withReview = false): Promise<Params> => {
  const c = await makeChain(world, withReview);
  return {
    projectId: c.project.id,
    designId: c.design.id,
    revisionId: c.revision.id,
    ...(c.review ? { reviewId: c.review.id } : {}),
  };
};
let spareCount = 0;
const spareMember = async (): Promise<Params> => {
  spareCount += 1;
  const u = await world.addUser(`Spare Member ${spareCount}`, `spare${spareCount}@northfold.example`, 'viewer');
  return { userId: u.id };
};
const invitation = async (): Promise<Params> => {
  spareCount += 1;
  const res = await (
    await world.as('admin')
  )
    .post('/api/team/invitations')
    .send({ email: `invitee${spareCount}@northfold.example`, role: 'viewer' })
    .expect(201);
  return { invitationId: res.body.id };
};

const cases: RouteCase[] = [
  { method: 'get', path: '/api/team/members', allowed: ALL, scope: 'team', success: 200 },
  {
    method: 'patch',
    path: '/api/team/members/:userId',
    allowed: ['admin'],
    scope: 'team',
    setup: spareMember,
    body: () => ({ role: 'engineer' }),
    success: 200,
  },
  { method: 'delete', path: '/api/team/members/:userId', allowed: ['admin'], scope: 'team', setup: spareMember, success: 204 },
  { method: 'get', path: '/api/team/invitations', allowed: ['admin'], scope: 'team', success: 200 },
  {
    method: 'post',
    path: '/api/team/invitations',
    allowed: ['admin'],
    scope: 'team',
    body: () => ({ email: `matrix${++spareCount}@northfold.example`, role: 'engineer' }),
    success: 201,
  },
  {
    method: 'delete',
    path: '/api/team/invitations/:invitationId',
    allowed: ['admin'],
    scope: 'resource',
    setup: invitation,
    success: 204,
  },
  { method: 'get', path: '/api/team/derating', allowed: ALL, scope: 'team', success: 200 },
  {
    method: 'put',
    path: '/api/team/derating',
    allowed: ['admin'],
    scope: 'team',
    body: () => ({ policy: { factors: { capacitorVoltage: 0.8 } } }),
    success: 200,
  },
  { method: 'get', path: '/api/admin/outbox', allowed: ['admin'], scope: 'team', success: 200 },
  { method: 'get', path: '/api/admin/audit', allowed: ['admin'], scope: 'team', success: 200 },
  { method: 'get', path: '/api/projects', allowed: ALL, scope: 'team', success: 200 },
  {
    method: 'post',
    path: '/api/projects',
    allowed: ['engineer'],
    scope: 'team',
    body: () => ({ name: `Matrix project ${++spareCount}` }),
    success: 201,
  },
  { method: 'get', path: '/api/projects/:projectId', allowed: ALL, scope: 'resource', success: 200 },
  {
    method: 'patch',
    path: '/api/projects/:projectId',
    allowed: ['engineer'],
    scope: 'resource',
    body: () => ({ description: 'changed' }),
    success: 200,
  },
  {
    method: 'delete',
    path: '/api/projects/:projectId',
    allowed: ['engineer'],
    scope: 'resource',
    setup: async () => ({ projectId: (await makeProject(world)).id }),
    success: 204,
  },
  { method: 'get', path: '/api/designs', allowed: ALL, scope: 'team', success: 200 },
  {
    method: 'post',
    path: '/api/designs',
    allowed: ['engineer'],
    scope: 'team',
    body: (p) => ({ projectId: p.projectId, name: `Matrix design ${++spareCount}`, draft: presetDesign }),
    success: 201,
  },
  { method: 'get', path: '/api/designs/:designId', allowed: ALL, scope: 'resource', success: 200 },
  {
    method: 'patch',
    path: '/api/designs/:designId',
    allowed: ['engineer'],
    scope: 'resource',
    body: () => ({ description: 'changed' }),
    success: 200,
  },
  {
    method: 'delete',
    path: '/api/designs/:designId',
    allowed: ['engineer'],
    scope: 'resource',
    setup: async () => ({ designId: (await makeDesign(world, shared.projectId, presetDesign)).id }),
    success: 204,
  },
  { method: 'get', path: '/api/designs/:designId/revisions', allowed: ALL, scope: 'resource', success: 200 },
  {
    method: 'post',
    path: '/api/designs/:designId/revisions',
    allowed: ['engineer'],
    scope: 'resource',
    setup: () => chain(),
    body: () => ({ note: 'matrix' }),
    success: 201,
  },
  { method: 'get', path: '/api/revisions/:revisionId', allowed: ALL, scope: 'resource', success: 200 },
  { method: 'get', path: '/api/revisions/:revisionId/verify', allowed: ALL, scope: 'resource', success: 200 },
  { method: 'get', path: '/api/revisions/:revisionId/analyses', allowed: ALL, scope: 'resource', success: 200 },
  {
    method: 'post',
    path: '/api/revisions/:revisionId/analyses',
    allowed: ['engineer'],
    scope: 'resource',
    setup: () => chain(),
    body: () => ({ kind: 'precharge', options: { maxInrushCurrent: 30, maxPrechargeTime: 3 } }),
    success: 201,
  },
  {
    method: 'post',
    path: '/api/revisions/:revisionId/reviews',
    allowed: ['engineer'],
    scope: 'resource',
    setup: () => chain(),
    body: () => ({ reviewerIds: [world.users.reviewer.id], note: 'matrix' }),
    success: 201,
  },
  { method: 'get', path: '/api/revisions/:revisionId/report.pdf', allowed: ALL, scope: 'resource', success: 200 },
  { method: 'get', path: '/api/revisions/:revisionId/waveforms.csv', allowed: ALL, scope: 'resource', success: 200 },
  { method: 'get', path: '/api/revisions/:revisionId/export.json', allowed: ALL, scope: 'resource', success: 200 },
  { method: 'get', path: '/api/reviews', allowed: ALL, scope: 'team', success: 200 },
  { method: 'get', path: '/api/reviews/:reviewId', allowed: ALL, scope: 'resource', success: 200 },
  {
    method: 'post',
    path: '/api/reviews/:reviewId/comments',
    allowed: ['engineer', 'reviewer'],
    scope: 'resource',
    body: () => ({ body: 'A comment from the matrix.' }),
    success: 201,
  },
  {
    method: 'post',
    path: '/api/reviews/:reviewId/approve',
    allowed: ['reviewer'],
    scope: 'resource',
    setup: () => chain(true),
    body: () => ({ comment: 'Fine.' }),
    success: 200,
  },
  {
    method: 'post',
    path: '/api/reviews/:reviewId/request-changes',
    allowed: ['reviewer'],
    scope: 'resource',
    setup: () => chain(true),
    body: () => ({ reason: 'Add damping.' }),
    success: 200,
  },
  {
    method: 'post',
    path: '/api/check',
    allowed: ALL,
    scope: 'team',
    body: () => ({ design: presetDesign, includeWaveform: false }),
    success: 200,
  },
  { method: 'post', path: '/api/precharge/size', allowed: ALL, scope: 'team', body: () => sizingRequest, success: 200 },
];

const fill = (path: string, params: Params) => path.replace(/:(\w+)/g, (_m, name: string) => params[name] ?? `missing-${name}`);

beforeAll(async () => {
  shared = await chain(true);
});

describe.each(cases)('$method $path', (route) => {
  // Refused people first, so that an allowed destructive call cannot hide a refusal.
  const order: Person[] = [
    ...PEOPLE.filter((p) => p === 'outsider' || !route.allowed.includes(p as Role)),
    ...PEOPLE.filter((p) => p !== 'outsider' && route.allowed.includes(p as Role)),
  ];

  it.each(order)('as %s', async (person) => {
    const params = { ...shared, ...(route.setup ? await route.setup() : {}) };
    const agent = await world.as(person);
    const path = fill(route.path, params);
    let call = agent[route.method](path);
    if (person === 'outsider' && route.scope === 'team') call = call.set('X-Team-Id', world.teamA.id);
    const before = await world.counts();
    const res = route.body ? await call.send(route.body(params)) : await call;
    const allowed = person !== 'outsider' && route.allowed.includes(person as Role);
    if (allowed) {
      expect({ status: res.status, body: res.status >= 400 ? res.body : undefined }).toEqual({
        status: route.success,
        body: undefined,
      });
      return;
    }
    expect(res.status).toBe(person === 'outsider' ? 404 : 403);
    expect(res.body.error.code).toBe(person === 'outsider' ? 'not_found' : 'forbidden');
    await world.mailSettled();
    expect(await world.counts()).toEqual(before);
  });
});

describe('cross-team references inside a request', () => {
  it('answers 404 for another team’s resource exactly as for one that does not exist', async () => {
    const outsider = await world.as('outsider');
    const real = await outsider.get(`/api/designs/${shared.designId}`);
    const missing = await outsider.get('/api/designs/00000000-0000-4000-8000-000000000000');
    const malformed = await outsider.get('/api/designs/not-a-uuid');
    expect(real.status).toBe(404);
    expect(real.body).toEqual(missing.body);
    expect(real.body).toEqual(malformed.body);
  });

  it('will not create a design in another team’s project, and writes nothing', async () => {
    const bo = await world.addUser('Bo Lindahl', 'bo@harbour.northfold.example', 'engineer', world.teamB.id);
    const outsider = request.agent(world.app);
    await outsider.post('/api/auth/sign-in').send({ email: bo.email, password: TEST_PASSWORD }).expect(200);
    const before = await world.counts();
    const res = await outsider.post('/api/designs').send({ projectId: shared.projectId, name: 'Borrowed', draft: presetDesign });
    expect(res.status).toBe(404);
    expect(await world.counts()).toEqual(before);
  });

  it('will not name a member of another team as a reviewer', async () => {
    const c = await makeChain(world);
    const res = await (
      await world.as('engineer')
    )
      .post(`/api/revisions/${c.revision.id}/reviews`)
      .send({ reviewerIds: [world.users.outsider.id] });
    expect(res.status).toBe(422);
    expect(res.body.error.fields[0]).toEqual({ path: 'reviewerIds.0', message: 'Not a member of this team.' });
  });

  it('lists only the current team’s designs', async () => {
    const res = await (await world.as('outsider')).get('/api/designs').expect(200);
    expect(res.body.items).toEqual([]);
  });

  it('refuses everything without a session with 401', async () => {
    for (const route of cases) {
      const res = await request(world.app)
        [route.method](fill(route.path, shared))
        .send(route.body ? route.body(shared) : undefined);
      expect([route.path, res.status]).toEqual([route.path, 401]);
    }
  });
});

it('revisions made for the matrix are real (a sanity check of the fixtures)', async () => {
  const revision = await makeRevision(world, shared.designId);
  expect(revision.sequence).toBeGreaterThan(1);
  const review = await makeReview(world, revision.id);
  expect(review.id).toBeDefined();
});
