// Access-token attacks on a protected route. The server's tokens are HS256 JWTs in the rw_access
// cookie ({ sub: user id, sid: session family, iss: ringwell, aud: ringwell-api, exp }); every
// request re-reads the user, the family and the memberships. A token forged here with the server's
// own secret and real claims is accepted, so each refusal below is about the one thing changed.
import { randomBytes } from 'node:crypto';
import request from 'supertest';
import { decodeJwt, SignJWT, type JWTPayload } from 'jose';
import { ACCESS_COOKIE, REFRESH_COOKIE } from '@/lib/contracts/common';
import { jwtConstants } from '@/server/auth/tokens';
import { sha256Hex } from '@/server/services/canonical';
import { createTestWorld, TEST_PASSWORD, type TestUser, type TestWorld } from '@/tests/helpers/testApp';

jest.setTimeout(120_000);

let world: TestWorld;
beforeAll(async () => {
  world = await createTestWorld();
});
afterAll(async () => {
  await world.close();
});

const b64 = (value: unknown) => Buffer.from(JSON.stringify(value)).toString('base64url');

function cookieValue(setCookie: string[] | string | undefined, name: string): string {
  const list = Array.isArray(setCookie) ? setCookie : setCookie ? [setCookie] : [];
  const found = list.find((c) => c.startsWith(`${name}=`));
  if (!found) throw new Error(`no ${name} cookie in ${JSON.stringify(list)}`);
  return decodeURIComponent(found.slice(name.length + 1).split(';')[0]);
}

interface Session {
  access: string;
  refresh: string;
  claims: JWTPayload;
}

async function signIn(user: Pick<TestUser, 'email'>): Promise<Session> {
  const res = await request(world.app).post('/api/auth/sign-in').send({ email: user.email, password: TEST_PASSWORD }).expect(200);
  const access = cookieValue(res.headers['set-cookie'], ACCESS_COOKIE);
  return { access, refresh: cookieValue(res.headers['set-cookie'], REFRESH_COOKIE), claims: decodeJwt(access) };
}

/** A token signed the way the server signs, with any claims, key, algorithm and lifetime. */
async function forge(
  claims: Record<string, unknown>,
  { key = world.jwtSecret as string | Uint8Array, alg = 'HS256', exp = Math.floor(Date.now() / 1000) + 600 } = {},
): Promise<string> {
  const { sub, iss = jwtConstants.ISSUER, aud = jwtConstants.AUDIENCE, ...rest } = claims;
  const secret = typeof key === 'string' ? new TextEncoder().encode(key) : key;
  return new SignJWT(rest)
    .setProtectedHeader({ alg, typ: 'JWT' })
    .setSubject(String(sub))
    .setIssuer(String(iss))
    .setAudience(aud as string)
    .setIssuedAt(Math.min(exp - 60, Math.floor(Date.now() / 1000)))
    .setExpirationTime(exp)
    .sign(secret);
}

const me = (token: string) => request(world.app).get('/api/me').set('Cookie', `${ACCESS_COOKIE}=${token}`);
const designs = (token: string) => request(world.app).get('/api/designs').set('Cookie', `${ACCESS_COOKIE}=${token}`);

async function expectRefused(token: string) {
  const res = await me(token);
  expect({ status: res.status, code: res.body?.error?.code }).toEqual({ status: 401, code: 'unauthorized' });
  expect((await designs(token)).status).toBe(401);
}

describe('access tokens', () => {
  let viewer: Session;
  beforeAll(async () => {
    viewer = await signIn(world.users.viewer);
  });

  it('accepts the token the server issued, and one forged here with its secret and the same claims', async () => {
    expect((await me(viewer.access).expect(200)).body.user.id).toBe(world.users.viewer.id);
    await designs(viewer.access).expect(200);
    const forged = await forge({ sub: viewer.claims.sub, sid: viewer.claims.sid });
    expect((await me(forged).expect(200)).body.user.id).toBe(world.users.viewer.id);
  });

  it('refuses alg "none" (unsigned), with and without a trailing signature part', async () => {
    const header = b64({ alg: 'none', typ: 'JWT' });
    const payload = b64({ ...viewer.claims });
    await expectRefused(`${header}.${payload}.`);
    await expectRefused(`${header}.${payload}`);
    await expectRefused(`${b64({ alg: 'None', typ: 'JWT' })}.${payload}.`);
    // The real signature kept under a header that says none.
    await expectRefused(`${header}.${payload}.${viewer.access.split('.')[2]}`);
  });

  it('refuses a token signed with another key', async () => {
    await expectRefused(await forge({ sub: viewer.claims.sub, sid: viewer.claims.sid }, { key: randomBytes(32) }));
    await expectRefused(await forge({ sub: viewer.claims.sub, sid: viewer.claims.sid }, { key: 'x'.repeat(32) }));
  });

  it('refuses another HMAC algorithm with the right key (the algorithm is pinned to HS256)', async () => {
    await expectRefused(await forge({ sub: viewer.claims.sub, sid: viewer.claims.sid }, { alg: 'HS512' }));
    await expectRefused(await forge({ sub: viewer.claims.sub, sid: viewer.claims.sid }, { alg: 'HS384' }));
  });

  it('refuses an expired token, and one for another issuer or audience', async () => {
    await expectRefused(await forge({ sub: viewer.claims.sub, sid: viewer.claims.sid }, { exp: Math.floor(Date.now() / 1000) - 5 }));
    await expectRefused(await forge({ sub: viewer.claims.sub, sid: viewer.claims.sid, iss: 'someone-else' }));
    await expectRefused(await forge({ sub: viewer.claims.sub, sid: viewer.claims.sid, aud: 'another-api' }));
  });

  it('refuses a tampered payload under the original signature (user, team or role changed)', async () => {
    const [header, , signature] = viewer.access.split('.');
    const swap = (changes: Record<string, unknown>) => `${header}.${b64({ ...viewer.claims, ...changes })}.${signature}`;
    await expectRefused(swap({ sub: world.users.admin.id }));
    await expectRefused(swap({ role: 'admin' }));
    await expectRefused(swap({ teamId: world.teamB.id }));
    await expectRefused(swap({ exp: Math.floor(Date.now() / 1000) + 365 * 24 * 3600 }));
    // A flipped bit in the signature.
    const last = signature.slice(-1) === 'A' ? 'B' : 'A';
    await expectRefused(`${header}.${b64(viewer.claims)}.${signature.slice(0, -1)}${last}`);
  });

  it('takes the role from the database, not the token: a validly signed "role: admin" claim grants nothing', async () => {
    const forged = await forge({ sub: viewer.claims.sub, sid: viewer.claims.sid, role: 'admin', teamId: world.teamA.id });
    const res = await request(world.app).get('/api/admin/audit').set('Cookie', `${ACCESS_COOKIE}=${forged}`);
    expect(res.status).toBe(403);
  });

  it('refuses one user’s id under another user’s session family', async () => {
    await expectRefused(await forge({ sub: world.users.admin.id, sid: viewer.claims.sid }));
  });

  it('refuses a signed token with no session family, or junk claims', async () => {
    await expectRefused(await forge({ sub: viewer.claims.sub }));
    await expectRefused(await forge({ sub: 'not-a-uuid', sid: viewer.claims.sid }));
    await expectRefused(await forge({ sub: viewer.claims.sub, sid: 12345 }));
    await expectRefused('not.a.jwt');
    await expectRefused('');
  });
});

describe('accounts and sessions that have ended', () => {
  it('refuses a valid token of a deleted user', async () => {
    const gone = await world.addUser('Ines Varga', 'ines@northfold.example', 'engineer');
    const session = await signIn(gone);
    await me(session.access).expect(200);
    // The API has no account deletion; an operator would do it in SQL (sessions and memberships cascade).
    await world.database.pg.query('delete from users where id = $1', [gone.id]);
    await expectRefused(session.access);
    const refresh = await request(world.app).post('/api/auth/refresh').set('Cookie', `${REFRESH_COOKIE}=${session.refresh}`);
    expect(refresh.status).toBe(401);
  });

  it('refuses team routes to a member who was removed from the team (404: no team any more)', async () => {
    const removed = await world.addUser('Jon Aalto', 'jon@northfold.example', 'engineer');
    const session = await signIn(removed);
    await designs(session.access).expect(200);
    await (await world.as('admin')).delete(`/api/team/members/${removed.id}`).expect(204);
    const res = await designs(session.access);
    expect(res.status).toBe(404);
    expect(res.body.error.code).toBe('not_found');
    const named = await request(world.app)
      .get('/api/designs')
      .set('Cookie', `${ACCESS_COOKIE}=${session.access}`)
      .set('X-Team-Id', world.teamA.id);
    expect(named.status).toBe(404);
  });

  it('refuses the access token once its session is signed out', async () => {
    const session = await signIn(world.users.reviewer);
    await me(session.access).expect(200);
    await request(world.app)
      .post('/api/auth/sign-out')
      .set('Cookie', [`${ACCESS_COOKIE}=${session.access}`, `${REFRESH_COOKIE}=${session.refresh}`])
      .expect(204);
    await expectRefused(session.access);
  });

  it('refuses a replayed refresh token after rotation, and then the whole session family', async () => {
    const session = await signIn(world.users.engineer);
    const refresh = (token: string) => request(world.app).post('/api/auth/refresh').set('Cookie', `${REFRESH_COOKIE}=${token}`);

    const rotated = await refresh(session.refresh).expect(200);
    const next = {
      access: cookieValue(rotated.headers['set-cookie'], ACCESS_COOKIE),
      refresh: cookieValue(rotated.headers['set-cookie'], REFRESH_COOKIE),
    };
    expect(next.refresh).not.toBe(session.refresh);
    await me(next.access).expect(200);

    // Within the 30 s grace (two tabs refreshing at once) the old token gets no new session, and the family lives.
    expect((await refresh(session.refresh)).status).toBe(401);
    await me(next.access).expect(200);

    // Later, the same replay is theft: refused, and every token of the family stops working.
    const aged = await world.database.pg.query(
      "update sessions set revoked_at = now() - interval '5 minutes' where token_hash = $1 and revoked_reason = 'rotated'",
      [sha256Hex(session.refresh)],
    );
    expect(aged.affectedRows).toBe(1);
    const replay = await refresh(session.refresh);
    expect(replay.status).toBe(401);
    expect(replay.body.error.code).toBe('unauthorized');
    await expectRefused(next.access);
    await expectRefused(session.access);
    expect((await refresh(next.refresh)).status).toBe(401);
  });
});
