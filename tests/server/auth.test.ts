// Accounts and sessions: sign-in, refresh rotation, sign-out, password change, sign-up, and every
// kind of token the server must refuse.
import request from 'supertest';
import { decodeJwt, SignJWT } from 'jose';
import { eq, sql } from 'drizzle-orm';
import { auditLog, sessions, users } from '@/db/schema';
import { meResponseSchema } from '@/lib/contracts/auth';
import { createApp } from '@/server/app';
import { createTestWorld, TEST_PASSWORD, type TestWorld } from '@/tests/helpers/testApp';

jest.setTimeout(60_000);

let world: TestWorld;
beforeAll(async () => {
  world = await createTestWorld();
});
afterAll(async () => {
  await world.close();
});

function cookiesOf(res: request.Response): Record<string, string> {
  const header = res.headers['set-cookie'] as unknown as string[] | undefined;
  const out: Record<string, string> = {};
  for (const line of header ?? []) {
    const [pair] = line.split(';');
    const [name, ...value] = pair.split('=');
    out[name.trim()] = value.join('=');
  }
  return out;
}

const setCookieLines = (res: request.Response) => (res.headers['set-cookie'] as unknown as string[]) ?? [];

async function signIn(email: string, password = TEST_PASSWORD) {
  return request(world.app).post('/api/auth/sign-in').send({ email, password });
}

const me = (access: string) => request(world.app).get('/api/me').set('Cookie', `rw_access=${access}`);

describe('signing in', () => {
  it('sets an httpOnly, SameSite=Lax access cookie and a refresh cookie scoped to /api/auth, and answers with the user and teams', async () => {
    const res = await signIn('sam@northfold.example');
    expect(res.status).toBe(200);
    const body = meResponseSchema.parse(res.body);
    expect(body.user.email).toBe('sam@northfold.example');
    expect(body.teams).toEqual([{ id: world.teamA.id, name: 'Northfold Motion', role: 'engineer' }]);
    expect(body.currentTeam?.id).toBe(world.teamA.id);
    const [access, refresh] = ['rw_access', 'rw_refresh'].map((name) =>
      setCookieLines(res).find((l) => l.startsWith(`${name}=`))!,
    );
    expect(access).toMatch(/HttpOnly/);
    expect(access).toMatch(/SameSite=Lax/);
    expect(access).toMatch(/Path=\//);
    expect(refresh).toMatch(/HttpOnly/);
    expect(refresh).toMatch(/Path=\/api\/auth/);
    const claims = decodeJwt(cookiesOf(res).rw_access);
    expect(claims.sub).toBe(world.users.engineer.id);
    expect((claims.exp! - claims.iat!) / 60).toBe(15);
  });

  it('accepts the address in any letter case', async () => {
    expect((await signIn('SAM@Northfold.Example')).status).toBe(200);
  });

  it('refuses a wrong password and an unknown address with the same answer, and records both', async () => {
    const wrong = await signIn('sam@northfold.example', 'not the password');
    const unknown = await signIn('nobody@northfold.example', 'not the password');
    expect(wrong.status).toBe(401);
    expect(unknown.status).toBe(401);
    expect(wrong.body).toEqual(unknown.body);
    expect(wrong.body.error.code).toBe('invalid_credentials');
    const failures = await world.database.db.select().from(auditLog).where(eq(auditLog.action, 'auth.sign-in-failed'));
    expect(failures.map((f) => f.details)).toEqual(
      expect.arrayContaining([
        expect.objectContaining({ email: 'sam@northfold.example', reason: 'wrong password' }),
        expect.objectContaining({ email: 'nobody@northfold.example', reason: 'unknown address' }),
      ]),
    );
    expect(failures.find((f) => (f.details as { email: string }).email === 'sam@northfold.example')?.actorId).toBe(
      world.users.engineer.id,
    );
  });

  it('records a successful sign-in in the audit log', async () => {
    const rows = await world.database.db.select().from(auditLog).where(eq(auditLog.action, 'auth.sign-in'));
    expect(rows.some((r) => r.actorId === world.users.engineer.id)).toBe(true);
  });

  it('answers a malformed body with field errors in the common shape', async () => {
    const res = await request(world.app).post('/api/auth/sign-in').send({ email: 'not-an-address' });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('validation_failed');
    expect(res.body.error.fields.map((f: { path: string }) => f.path).sort()).toEqual(['email', 'password']);
  });
});

describe('the access token', () => {
  let access: string;
  let claims: ReturnType<typeof decodeJwt>;
  beforeAll(async () => {
    access = cookiesOf(await signIn('priya@northfold.example')).rw_access;
    claims = decodeJwt(access);
  });

  const sign = (payload: Record<string, unknown>, key: string, expiresAt: number) =>
    new SignJWT(payload)
      .setProtectedHeader({ alg: 'HS256', typ: 'JWT' })
      .setSubject(String(claims.sub))
      .setIssuer('ringwell')
      .setAudience('ringwell-api')
      .setIssuedAt(expiresAt - 900)
      .setExpirationTime(expiresAt)
      .sign(new TextEncoder().encode(key));

  it('works as issued (the control for the refusals below)', async () => {
    expect((await me(access)).status).toBe(200);
    const forged = await sign({ sid: claims.sid }, world.jwtSecret, Math.floor(Date.now() / 1000) + 600);
    expect((await me(forged)).status).toBe(200);
  });

  it('is refused with no token at all', async () => {
    const res = await request(world.app).get('/api/me');
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe('unauthorized');
  });

  it('is refused when tampered with (payload changed, signature kept)', async () => {
    const [header, , signature] = access.split('.');
    const payload = Buffer.from(JSON.stringify({ ...claims, sub: world.users.admin.id })).toString('base64url');
    expect((await me(`${header}.${payload}.${signature}`)).status).toBe(401);
    expect((await me(`${access.slice(0, -2)}xx`)).status).toBe(401);
  });

  it('is refused when expired', async () => {
    const expired = await sign({ sid: claims.sid }, world.jwtSecret, Math.floor(Date.now() / 1000) - 5);
    expect((await me(expired)).status).toBe(401);
  });

  it('is refused when signed with another key', async () => {
    const other = await sign(
      { sid: claims.sid },
      'another-secret-of-at-least-thirty-two-bytes!!',
      Math.floor(Date.now() / 1000) + 600,
    );
    expect((await me(other)).status).toBe(401);
  });

  it('is refused with alg none', async () => {
    const header = Buffer.from(JSON.stringify({ alg: 'none', typ: 'JWT' })).toString('base64url');
    const payload = Buffer.from(JSON.stringify(claims)).toString('base64url');
    expect((await me(`${header}.${payload}.`)).status).toBe(401);
    expect((await me(`${header}.${payload}`)).status).toBe(401);
  });

  it('is refused with another algorithm (HS512) even with the right key', async () => {
    const hs512 = await new SignJWT({ sid: claims.sid })
      .setProtectedHeader({ alg: 'HS512' })
      .setSubject(String(claims.sub))
      .setIssuer('ringwell')
      .setAudience('ringwell-api')
      .setExpirationTime('10m')
      .sign(new TextEncoder().encode(world.jwtSecret.padEnd(64, 'x')));
    expect((await me(hs512)).status).toBe(401);
  });

  it('is refused once its user is deleted', async () => {
    const kit = await world.addUser('Kit Marlow', 'kit@northfold.example', 'viewer');
    const token = cookiesOf(await signIn(kit.email)).rw_access;
    expect((await me(token)).status).toBe(200);
    await world.database.db.delete(users).where(eq(users.id, kit.id));
    expect((await me(token)).status).toBe(401);
    // And a well-signed token naming a user who does not exist.
    const ghost = await new SignJWT({ sid: claims.sid })
      .setProtectedHeader({ alg: 'HS256' })
      .setSubject(kit.id)
      .setIssuer('ringwell')
      .setAudience('ringwell-api')
      .setExpirationTime('10m')
      .sign(new TextEncoder().encode(world.jwtSecret));
    expect((await me(ghost)).status).toBe(401);
  });
});

describe('refreshing', () => {
  it('rotates the refresh token; a rotated token presented again later ends the whole session', async () => {
    const first = await signIn('tomas@northfold.example');
    const firstCookies = cookiesOf(first);
    const refreshed = await request(world.app).post('/api/auth/refresh').set('Cookie', `rw_refresh=${firstCookies.rw_refresh}`);
    expect(refreshed.status).toBe(200);
    const second = cookiesOf(refreshed);
    expect(second.rw_refresh).not.toBe(firstCookies.rw_refresh);
    expect((await me(second.rw_access)).status).toBe(200);

    // Within the grace period a second use is only refused (two tabs refreshing at once).
    const again = await request(world.app).post('/api/auth/refresh').set('Cookie', `rw_refresh=${firstCookies.rw_refresh}`);
    expect(again.status).toBe(401);
    expect((await me(second.rw_access)).status).toBe(200);

    // Later, it is taken as a stolen token: the family is revoked and the new tokens stop working.
    await world.database.db.execute(
      sql`update sessions set revoked_at = now() - interval '1 minute' where revoked_reason = 'rotated'`,
    );
    const reuse = await request(world.app).post('/api/auth/refresh').set('Cookie', `rw_refresh=${firstCookies.rw_refresh}`);
    expect(reuse.status).toBe(401);
    expect((await me(second.rw_access)).status).toBe(401);
    const third = await request(world.app).post('/api/auth/refresh').set('Cookie', `rw_refresh=${second.rw_refresh}`);
    expect(third.status).toBe(401);
  });

  it('refuses an expired refresh token', async () => {
    const cookies = cookiesOf(await signIn('tomas@northfold.example'));
    await world.database.db.execute(
      sql`update sessions set expires_at = now() - interval '1 second' where revoked_at is null and user_id = ${world.users.viewer.id}`,
    );
    const res = await request(world.app).post('/api/auth/refresh').set('Cookie', `rw_refresh=${cookies.rw_refresh}`);
    expect(res.status).toBe(401);
  });

  it('refuses a missing or unknown refresh token', async () => {
    expect((await request(world.app).post('/api/auth/refresh')).status).toBe(401);
    expect((await request(world.app).post('/api/auth/refresh').set('Cookie', 'rw_refresh=made-up')).status).toBe(401);
  });
});

describe('signing out', () => {
  it('ends the session: the access token and the refresh token stop working', async () => {
    const cookies = cookiesOf(await signIn('priya@northfold.example'));
    const out = await request(world.app)
      .post('/api/auth/sign-out')
      .set('Cookie', `rw_access=${cookies.rw_access}; rw_refresh=${cookies.rw_refresh}`);
    expect(out.status).toBe(204);
    expect(setCookieLines(out).some((l) => /^rw_access=;/.test(l))).toBe(true);
    expect((await me(cookies.rw_access)).status).toBe(401);
    expect((await request(world.app).post('/api/auth/refresh').set('Cookie', `rw_refresh=${cookies.rw_refresh}`)).status).toBe(
      401,
    );
    const rows = await world.database.db.select().from(auditLog).where(eq(auditLog.action, 'auth.sign-out'));
    expect(rows.some((r) => r.actorId === world.users.reviewer.id)).toBe(true);
  });
});

describe('changing the password', () => {
  it('needs the current password, then signs out other browsers and keeps this one', async () => {
    const lee = await world.addUser('Lee Carver', 'lee@northfold.example', 'engineer');
    const here = request.agent(world.app);
    await here.post('/api/auth/sign-in').send({ email: lee.email, password: TEST_PASSWORD }).expect(200);
    const elsewhere = cookiesOf(await signIn(lee.email)).rw_access;

    const wrong = await here
      .post('/api/auth/password')
      .send({ currentPassword: 'not it at all', newPassword: 'a-new-long-password' });
    expect(wrong.status).toBe(422);
    expect(wrong.body.error.fields[0].path).toBe('currentPassword');

    const short = await here.post('/api/auth/password').send({ currentPassword: TEST_PASSWORD, newPassword: 'short' });
    expect(short.status).toBe(400);
    expect(short.body.error.fields[0].path).toBe('newPassword');

    await here
      .post('/api/auth/password')
      .send({ currentPassword: TEST_PASSWORD, newPassword: 'a-new-long-password' })
      .expect(204);
    expect((await here.get('/api/me')).status).toBe(200);
    expect((await me(elsewhere)).status).toBe(401);
    expect((await signIn(lee.email)).status).toBe(401);
    expect((await signIn(lee.email, 'a-new-long-password')).status).toBe(200);
  });
});

describe('signing up with a new team', () => {
  it('creates the account and the team, with the new user as its admin, and signs in', async () => {
    const agent = request.agent(world.app);
    const res = await agent
      .post('/api/auth/sign-up')
      .send({ name: 'Iris Vang', email: 'iris@northfold.example', password: 'iris-long-password', teamName: 'Vang Power' });
    expect(res.status).toBe(201);
    expect(res.body.currentTeam).toMatchObject({ name: 'Vang Power', role: 'admin' });
    expect((await agent.get('/api/me')).body.user.email).toBe('iris@northfold.example');
  });

  it('refuses an address that already has an account', async () => {
    const res = await request(world.app)
      .post('/api/auth/sign-up')
      .send({ name: 'Sam Again', email: 'Sam@northfold.example', password: 'some-long-password', teamName: 'Copy' });
    expect(res.status).toBe(409);
  });
});

describe('rate limiting of sign-in', () => {
  it('locks an account after too many failed attempts, even for the right password, and says when to try again', async () => {
    const app = createApp({
      database: world.database,
      jwtSecret: world.jwtSecret,
      log: () => undefined,
      rateLimits: { signInPerAccount: { limit: 3, windowMs: 60_000 }, signInPerIp: { limit: 100, windowMs: 60_000 } },
    });
    for (let k = 0; k < 3; k++) {
      expect(
        (await request(app).post('/api/auth/sign-in').send({ email: 'ada@northfold.example', password: 'wrong guess' })).status,
      ).toBe(401);
    }
    const locked = await request(app).post('/api/auth/sign-in').send({ email: 'ada@northfold.example', password: TEST_PASSWORD });
    expect(locked.status).toBe(429);
    expect(locked.body.error.code).toBe('rate_limited');
    expect(Number(locked.headers['retry-after'])).toBeGreaterThan(0);
    // Another account from the same address is not locked.
    expect(
      (await request(app).post('/api/auth/sign-in').send({ email: 'sam@northfold.example', password: TEST_PASSWORD })).status,
    ).toBe(200);
  });

  it('limits attempts from one address across accounts', async () => {
    const app = createApp({
      database: world.database,
      jwtSecret: world.jwtSecret,
      log: () => undefined,
      rateLimits: { signInPerIp: { limit: 4, windowMs: 60_000 } },
    });
    const emails = ['a1', 'a2', 'a3', 'a4'].map((n) => `${n}@northfold.example`);
    for (const email of emails)
      expect((await request(app).post('/api/auth/sign-in').send({ email, password: 'whatever' })).status).toBe(401);
    const res = await request(app).post('/api/auth/sign-in').send({ email: 'sam@northfold.example', password: TEST_PASSWORD });
    expect(res.status).toBe(429);
    expect(res.body.error.message).toMatch(/Try again in/);
  });
});

describe('GET /api/me and the current team', () => {
  it('follows X-Team-Id when the user is in that team, and says null for a team they are not in', async () => {
    const kai = await world.addUser('Kai Sorensen', 'kai@northfold.example', 'viewer');
    // Joined team B later. Said explicitly: the embedded database's clock can give two inserts in a
    // row the same timestamp, and the order of a tie is the random ids' (the first CI run that hit it failed).
    await world.database.db.execute(
      sql`insert into memberships (team_id, user_id, role, created_at) values (${world.teamB.id}, ${kai.id}, 'engineer', now() + interval '1 second')`,
    );
    const agent = request.agent(world.app);
    await agent.post('/api/auth/sign-in').send({ email: kai.email, password: TEST_PASSWORD }).expect(200);
    const first = await agent.get('/api/me');
    expect(first.body.teams).toHaveLength(2);
    expect(first.body.currentTeam).toMatchObject({ id: world.teamA.id, role: 'viewer' });
    const b = await agent.get('/api/me').set('X-Team-Id', world.teamB.id);
    expect(b.body.currentTeam).toMatchObject({ id: world.teamB.id, role: 'engineer' });
    const none = await agent.get('/api/me').set('X-Team-Id', '00000000-0000-4000-8000-000000000000');
    expect(none.body.currentTeam).toBeNull();
  });

  it('keeps refresh-token hashes only, never the tokens', async () => {
    const res = await signIn('ada@northfold.example');
    const token = cookiesOf(res).rw_refresh;
    const rows = await world.database.db.select().from(sessions);
    expect(rows.some((r) => r.tokenHash === token)).toBe(false);
    expect(rows.every((r) => /^[0-9a-f]{64}$/.test(r.tokenHash))).toBe(true);
  });
});
