// The authorization walk: the route list comes from the real Express app's router stack, so a route
// added without an entry in the expectation table below fails the first test. Every route is then
// called by each person (the four roles of team A, a member of team B, and nobody signed in):
// anonymous → 401, a role the route does not allow → 403, team B's member on team A's resources
// (or naming team A in X-Team-Id) → 404, and an allowed role with an empty body → 400 (the guard
// lets it through and validation answers), never 403. Refused requests write nothing: every table's
// row count and the uploads directory stay as they were.
//
// tests/server/roles.test.ts drives the successful calls with real bodies; this walk is about the
// guard on every route, including the ones added since (bench, parts, mains, analyses, auth).
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import request from 'supertest';
import express, { type Express } from 'express';
import type { Role } from '@/db/schema';
import { TEAM_HEADER } from '@/lib/contracts/common';
import { closeEngineWorkers } from '@/server/services/engine';
import { drainJobs } from '@/server/services/jobs';
import { createTestWorld, PEOPLE, TEST_PASSWORD, type Person, type TestWorld } from '@/tests/helpers/testApp';
import { makeChain, makeDesign, makeProject } from '@/tests/helpers/fixtures';

jest.setTimeout(600_000);

type Who = Person | 'anonymous';
const EVERYONE: Who[] = [...PEOPLE, 'anonymous'];
const ALL: Role[] = ['admin', 'engineer', 'reviewer', 'viewer'];
type Params = Record<string, string>;
type Method = 'get' | 'post' | 'put' | 'patch' | 'delete';

// ---------------------------------------------------------------------------------------------
// The walk over the router stack (Express 5 / router 2: layer.rawPath, layer.route, nested routers)

interface StackLayer {
  rawPath?: unknown;
  route?: { path: unknown; methods: Record<string, boolean> };
  handle?: { stack?: StackLayer[] };
}

const asPaths = (raw: unknown): string[] => {
  if (Array.isArray(raw)) return raw.flatMap(asPaths);
  if (typeof raw === 'string') return [raw];
  // A RegExp mount or route path cannot be listed by name: make it visible rather than skip it.
  return [String(raw)];
};
const join = (prefix: string, p: string) => (prefix + (p === '/' ? '' : p)).replace(/\/{2,}/g, '/') || '/';

function discoverRoutes(app: Express): string[] {
  const found = new Set<string>();
  const walk = (stack: StackLayer[], prefix: string) => {
    for (const layer of stack) {
      if (layer.route) {
        const methods = Object.keys(layer.route.methods).filter((m) => m !== '_all');
        for (const p of asPaths(layer.route.path)) for (const m of methods) found.add(`${m.toUpperCase()} ${join(prefix, p)}`);
        if (layer.route.methods._all) for (const p of asPaths(layer.route.path)) found.add(`ALL ${join(prefix, p)}`);
      } else if (layer.handle?.stack) {
        for (const p of asPaths(layer.rawPath ?? '/')) walk(layer.handle.stack, join(prefix, p));
      }
    }
  };
  const router = (app as unknown as { router?: { stack: StackLayer[] } }).router;
  if (!router) throw new Error('app.router is missing: not an Express 5 app?');
  walk(router.stack, '');
  return [...found].sort();
}

// ---------------------------------------------------------------------------------------------
// The expectation table

type Access = 'public' | 'signed-in' | Role[];

interface Expectation {
  /** Who may call it: nobody needs a session, any signed-in person, or these roles of the team. */
  access: Access;
  /** 'team': acts on the current team (team B's member names team A in X-Team-Id); 'resource': on a resource of team A. */
  scope?: 'team' | 'resource';
  /** The status an allowed person gets for the call as made here (no body: validation answers). */
  allowed: number;
  /** Per-person exceptions for public routes (refresh without a cookie is 401). */
  override?: Partial<Record<Who, number>>;
  /** A wrong body, for routes where no body at all is a complete request. */
  invalidBody?: object;
  /** Fresh path parameters for every call (destructive routes). */
  setup?: () => Promise<Params>;
  /** Sign this person in afresh for the call (the call ends or rotates the session). */
  freshSession?: boolean;
}

let world: TestWorld;
let uploadsDir: string;
let shared: Params = {};
let serial = 0;
const engineer = () => world.as('engineer');

const freshPart = async (): Promise<Params> => {
  serial += 1;
  const res = await (await engineer())
    .post('/api/parts')
    .send({ kind: 'resistor', partNumber: `NF-AUTHZ-${serial}`, resistance: '47 Ω' })
    .expect(201);
  return { partId: res.body.id };
};
const captureCsv = 'time,v\n0,0\n1,1\n2,1.8\n3,2.4\n4,2.9\n5,3.2\n';
const captureMapping = { time: { column: 0, unit: 'ms' }, channels: [{ column: 1, quantity: 'capacitorVoltage', unit: 'V' }] };
const freshCapture = async (designId = shared.designId): Promise<Params> => {
  const res = await (await engineer())
    .post(`/api/designs/${designId}/captures`)
    .field('mapping', JSON.stringify(captureMapping))
    .attach('file', Buffer.from(captureCsv), { filename: 'scope.csv', contentType: 'text/csv' });
  if (res.status !== 201) throw new Error(`capture: ${res.status} ${JSON.stringify(res.body)}`);
  return { captureId: res.body.id };
};
const freshMember = async (): Promise<Params> => {
  serial += 1;
  const u = await world.addUser(`Walk Member ${serial}`, `walk${serial}@northfold.example`, 'viewer');
  return { userId: u.id };
};
const freshInvitation = async (): Promise<Params> => {
  serial += 1;
  const res = await (await world.as('admin'))
    .post('/api/team/invitations')
    .send({ email: `walk-invitee${serial}@northfold.example`, role: 'viewer' })
    .expect(201);
  return { invitationId: res.body.id };
};

const table: Record<string, Expectation> = {
  'GET /api/health': { access: 'public', allowed: 200 },

  'POST /api/auth/sign-in': { access: 'public', allowed: 400 },
  'POST /api/auth/sign-up': { access: 'public', allowed: 400 },
  'POST /api/auth/sign-out': { access: 'public', allowed: 204, freshSession: true },
  'POST /api/auth/refresh': { access: 'public', allowed: 200, override: { anonymous: 401 }, freshSession: true },
  'POST /api/auth/password': { access: 'signed-in', allowed: 400 },

  'GET /api/me': { access: 'signed-in', allowed: 200 },
  'GET /api/me/mail': { access: 'signed-in', allowed: 200 },
  'GET /api/presets': { access: 'signed-in', allowed: 200 },
  // An unknown token: public, so nobody gets 401, and everyone the same 404.
  'GET /api/invitations/:token': { access: 'public', allowed: 404 },
  'POST /api/invitations/:token/accept': { access: 'signed-in', allowed: 404 },

  'GET /api/team/members': { access: ALL, scope: 'team', allowed: 200 },
  'PATCH /api/team/members/:userId': { access: ['admin'], scope: 'team', allowed: 400 },
  'DELETE /api/team/members/:userId': { access: ['admin'], scope: 'team', allowed: 204, setup: freshMember },
  'GET /api/team/invitations': { access: ['admin'], scope: 'team', allowed: 200 },
  'POST /api/team/invitations': { access: ['admin'], scope: 'team', allowed: 400 },
  'DELETE /api/team/invitations/:invitationId': { access: ['admin'], scope: 'resource', allowed: 204, setup: freshInvitation },
  'GET /api/team/derating': { access: ALL, scope: 'team', allowed: 200 },
  'PUT /api/team/derating': { access: ['admin'], scope: 'team', allowed: 400 },
  'GET /api/admin/outbox': { access: ['admin'], scope: 'team', allowed: 200 },
  'GET /api/admin/audit': { access: ['admin'], scope: 'team', allowed: 200 },

  'GET /api/projects': { access: ALL, scope: 'team', allowed: 200 },
  'POST /api/projects': { access: ['engineer'], scope: 'team', allowed: 400 },
  'GET /api/projects/:projectId': { access: ALL, scope: 'resource', allowed: 200 },
  'PATCH /api/projects/:projectId': { access: ['engineer'], scope: 'resource', allowed: 400 },
  'DELETE /api/projects/:projectId': {
    access: ['engineer'],
    scope: 'resource',
    allowed: 204,
    setup: async () => ({ projectId: (await makeProject(world)).id }),
  },

  'GET /api/designs': { access: ALL, scope: 'team', allowed: 200 },
  'POST /api/designs': { access: ['engineer'], scope: 'team', allowed: 400 },
  'GET /api/designs/:designId': { access: ALL, scope: 'resource', allowed: 200 },
  'PATCH /api/designs/:designId': { access: ['engineer'], scope: 'resource', allowed: 400 },
  'DELETE /api/designs/:designId': {
    access: ['engineer'],
    scope: 'resource',
    allowed: 204,
    setup: async () => ({ designId: (await makeDesign(world, shared.projectId)).id }),
  },
  'GET /api/designs/:designId/revisions': { access: ALL, scope: 'resource', allowed: 200 },
  // No body saves the working copy: a note that is not text is the wrong body.
  'POST /api/designs/:designId/revisions': { access: ['engineer'], scope: 'resource', allowed: 400, invalidBody: { note: 42 } },

  'GET /api/revisions/:revisionId': { access: ALL, scope: 'resource', allowed: 200 },
  'GET /api/revisions/:revisionId/verify': { access: ALL, scope: 'resource', allowed: 200 },
  'GET /api/revisions/:revisionId/analyses': { access: ALL, scope: 'resource', allowed: 200 },
  'POST /api/revisions/:revisionId/analyses': { access: ['engineer'], scope: 'resource', allowed: 400 },
  'POST /api/revisions/:revisionId/reviews': { access: ['engineer'], scope: 'resource', allowed: 400 },
  'GET /api/revisions/:revisionId/report.pdf': { access: ALL, scope: 'resource', allowed: 200 },
  'GET /api/revisions/:revisionId/waveforms.csv': { access: ALL, scope: 'resource', allowed: 200 },
  'GET /api/revisions/:revisionId/export.json': { access: ALL, scope: 'resource', allowed: 200 },

  'GET /api/reviews': { access: ALL, scope: 'team', allowed: 200 },
  'GET /api/reviews/:reviewId': { access: ALL, scope: 'resource', allowed: 200 },
  'POST /api/reviews/:reviewId/comments': { access: ['engineer', 'reviewer'], scope: 'resource', allowed: 400 },
  // No body approves without a comment: a comment that is not text is the wrong body.
  'POST /api/reviews/:reviewId/approve': { access: ['reviewer'], scope: 'resource', allowed: 400, invalidBody: { comment: 42 } },
  'POST /api/reviews/:reviewId/request-changes': { access: ['reviewer'], scope: 'resource', allowed: 400 },

  'POST /api/check': { access: ALL, scope: 'team', allowed: 400 },
  'POST /api/precharge/size': { access: ALL, scope: 'team', allowed: 400 },
  'POST /api/mains/sweep': { access: ALL, scope: 'team', allowed: 400 },
  'POST /api/mains/cold-hot': { access: ALL, scope: 'team', allowed: 400 },
  'POST /api/stability': { access: ALL, scope: 'team', allowed: 400 },
  'POST /api/snubber/propose': { access: ALL, scope: 'team', allowed: 400 },
  // A job id is not a resource parameter: the job is looked up in the current team.
  'GET /api/analysis-jobs/:jobId': { access: ALL, scope: 'team', allowed: 200 },
  'POST /api/analysis-jobs/:jobId/cancel': { access: ['engineer'], scope: 'team', allowed: 200 },

  'POST /api/captures/preview': { access: ['engineer'], scope: 'team', allowed: 400 },
  'POST /api/designs/:designId/captures': { access: ['engineer'], scope: 'resource', allowed: 400 },
  'GET /api/designs/:designId/captures': { access: ALL, scope: 'resource', allowed: 200 },
  'GET /api/captures/:captureId': { access: ALL, scope: 'resource', allowed: 200 },
  'DELETE /api/captures/:captureId': { access: ['engineer'], scope: 'resource', allowed: 204, setup: () => freshCapture() },
  'POST /api/captures/:captureId/fit': { access: ['engineer'], scope: 'resource', allowed: 400 },

  'GET /api/parts': { access: ALL, scope: 'team', allowed: 200 },
  'GET /api/parts/template.csv': { access: ALL, scope: 'team', allowed: 200 },
  'GET /api/parts/export.csv': { access: ALL, scope: 'team', allowed: 200 },
  'POST /api/parts/import': { access: ['admin', 'engineer'], scope: 'team', allowed: 400 },
  'POST /api/parts': { access: ['admin', 'engineer'], scope: 'team', allowed: 400 },
  'GET /api/parts/:partId': { access: ALL, scope: 'resource', allowed: 200 },
  'PATCH /api/parts/:partId': { access: ['admin', 'engineer'], scope: 'resource', allowed: 400 },
  'POST /api/parts/:partId/archive': { access: ['admin', 'engineer'], scope: 'resource', allowed: 200, setup: freshPart },
  'POST /api/parts/:partId/unarchive': { access: ['admin', 'engineer'], scope: 'resource', allowed: 200, setup: freshPart },
  'GET /api/designs/:designId/part-refs': { access: ALL, scope: 'resource', allowed: 200 },
  'POST /api/designs/:designId/apply-part': { access: ['engineer'], scope: 'resource', allowed: 400 },
};

// ---------------------------------------------------------------------------------------------

const isAllowed = (access: Access, who: Who): boolean => {
  if (access === 'public') return true;
  if (who === 'anonymous') return false;
  if (access === 'signed-in') return true;
  return who !== 'outsider' && access.includes(who);
};

/** What this person must get; refused people get 401/403/404 whatever the route's body needs. */
function expectedStatus(e: Expectation, who: Who): number {
  if (e.override?.[who] !== undefined) return e.override[who]!;
  if (isAllowed(e.access, who)) return e.allowed;
  if (who === 'anonymous') return 401;
  if (who === 'outsider') return 404;
  return 403;
}
const expectedCode: Record<number, string> = { 401: 'unauthorized', 403: 'forbidden', 404: 'not_found' };

/** Every table in the schema (not only the ones world.counts() lists) and the stored upload files. */
async function everything(): Promise<Record<string, number>> {
  const tables = await world.database.pg.query<{ name: string }>(
    "select table_name as name from information_schema.tables where table_schema = 'public' and table_type = 'BASE TABLE' order by 1",
  );
  const sql = `select ${tables.rows.map((t) => `(select count(*)::int from "${t.name}") as "${t.name}"`).join(', ')}`;
  const counts = (await world.database.pg.query<Record<string, number>>(sql)).rows[0];
  const files = fs.existsSync(uploadsDir) ? fs.readdirSync(uploadsDir, { recursive: true }).length : 0;
  return { ...counts, 'files in uploads': files };
}

const fill = (route: string, params: Params) =>
  route.replace(/:(\w+)/g, (_m, name: string) => {
    if (!params[name]) throw new Error(`no value for :${name} in ${route}`);
    return params[name];
  });

async function agentFor(who: Who, fresh: boolean) {
  if (who === 'anonymous') return request.agent(world.app);
  if (!fresh) return world.as(who);
  const agent = request.agent(world.app);
  await agent.post('/api/auth/sign-in').send({ email: world.users[who].email, password: TEST_PASSWORD }).expect(200);
  return agent;
}

let discovered: string[] = [];

beforeAll(async () => {
  uploadsDir = fs.mkdtempSync(path.join(os.tmpdir(), 'ringwell-authz-'));
  world = await createTestWorld({ uploadsDir });
  discovered = discoverRoutes(world.app);
  const c = await makeChain(world, true);
  shared = { projectId: c.project.id, designId: c.design.id, revisionId: c.revision.id, reviewId: c.review!.id };
  Object.assign(shared, await freshPart(), await freshCapture(), await freshMember(), await freshInvitation());
  shared.token = 'no-such-invitation-token-0000000000';
  // A small spread job in team A, for the job routes.
  const start = await (await engineer())
    .post(`/api/revisions/${shared.revisionId}/analyses`)
    .send({
      kind: 'spread',
      options: { method: 'monte-carlo', samples: 50, seed: 11, tolerances: { 'capacitor.capacitance': { percent: 10 } } },
    })
    .expect(202);
  shared.jobId = start.body.job.id;
  await drainJobs();
});
afterAll(async () => {
  await drainJobs(true);
  await closeEngineWorkers();
  await world.close();
  fs.rmSync(uploadsDir, { recursive: true, force: true });
});

describe('the route list walked from the router stack', () => {
  it('finds the routers (a sanity check of the walk itself)', () => {
    expect(discovered.length).toBeGreaterThan(50);
    expect(discovered).toEqual(expect.arrayContaining(['GET /api/health', 'POST /api/check', 'GET /api/revisions/:revisionId/report.pdf']));
  });

  it('sees routes in routers nested at any mount path, with every method', () => {
    const app = express();
    const inner = express.Router();
    inner.get('/widgets/:widgetId', (_req, res) => res.end());
    inner.route('/widgets').post((_req, res) => res.end()).delete((_req, res) => res.end());
    const outer = express.Router();
    outer.use('/inner', inner);
    app.use('/api', outer);
    app.put(['/a', '/b'], (_req, res) => res.end());
    const routes = discoverRoutes(app);
    expect(routes).toEqual(['DELETE /api/inner/widgets', 'GET /api/inner/widgets/:widgetId', 'POST /api/inner/widgets', 'PUT /a', 'PUT /b']);
    // Such a route has no expectation, so the next test would list it as missing.
    expect(routes.filter((r) => !(r in table))).toHaveLength(5);
  });

  it('has an expectation for every route, and none for a route that no longer exists', () => {
    const missing = discovered.filter((r) => !(r in table));
    const stale = Object.keys(table).filter((r) => !discovered.includes(r));
    expect({ missing, stale }).toEqual({ missing: [], stale: [] });
  });

  it('matrix size', () => {
    // Printed for the reliability report: routes × people.
    if (process.env.AUTHZ_REPORT) console.log(`authz matrix: ${discovered.length} routes × ${EVERYONE.length} people = ${discovered.length * EVERYONE.length}`);
    expect(Object.keys(table)).toHaveLength(discovered.length);
  });
});

describe.each(Object.keys(table))('%s', (key) => {
  const e = table[key];
  const [methodName, route] = key.split(' ');
  const method = methodName.toLowerCase() as Method;
  // Refused people first, so that an allowed destructive call cannot hide a refusal.
  const order = [...EVERYONE.filter((w) => !isAllowed(e.access, w)), ...EVERYONE.filter((w) => isAllowed(e.access, w))];

  it.each(order)('as %s', async (who) => {
    const params = { ...shared, ...(e.setup ? await e.setup() : {}) };
    const agent = await agentFor(who, Boolean(e.freshSession));
    await world.mailSettled();
    const before = await everything();
    let call = agent[method](fill(route, params));
    if (who === 'outsider' && e.scope === 'team') call = call.set(TEAM_HEADER, world.teamA.id);
    const res = e.invalidBody ? await call.send(e.invalidBody) : await call;
    const want = expectedStatus(e, who);
    expect({ who, status: res.status, body: res.status === want ? undefined : res.body }).toEqual({
      who,
      status: want,
      body: undefined,
    });
    if (want >= 400) {
      if (!isAllowed(e.access, who) || e.override?.[who]) expect(res.body.error.code).toBe(expectedCode[want]);
      else expect(res.body.error.code).not.toBe('forbidden');
      await world.mailSettled();
      expect(await everything()).toEqual(before);
    }
  });
});
