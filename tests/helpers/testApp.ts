// A whole Ringwell server for one test file: an in-memory database with the real migrations, the
// loopback capture SMTP server, a mailer delivering to it, and the app. Two teams: Northfold Motion
// (one member per role) and a second team whose admin plays the outsider in cross-team tests.
import request from 'supertest';
import type { Express } from 'express';
import { hash } from '@node-rs/argon2';
import type { DatabaseHandle } from '@/db/client';
import { memberships, teams, users, type Role } from '@/db/schema';
import { createApp, type AppOptions } from '@/server/app';
import { randomJwtSecret } from '@/server/auth/secret';
import { startCaptureServer, type CaptureServer } from '@/server/mail/captureServer';
import { createMailer, type Mailer } from '@/server/mail/mailer';
import { stopJobWorkers } from '@/server/services/jobs';
import { closeEnginePool } from '@/server/services/offload';
import { openTestDatabase } from './testDatabase';

export type Person = 'admin' | 'engineer' | 'reviewer' | 'viewer' | 'outsider';
export const PEOPLE: Person[] = ['admin', 'engineer', 'reviewer', 'viewer', 'outsider'];
export const TEST_PASSWORD = 'northfold-test-password';

export interface TestUser {
  id: string;
  name: string;
  email: string;
  role: Role;
  teamId: string;
}

export interface TestWorld {
  database: DatabaseHandle;
  app: Express;
  mailer: Mailer;
  capture: CaptureServer;
  jwtSecret: string;
  teamA: { id: string; name: string };
  teamB: { id: string; name: string };
  users: Record<Person, TestUser>;
  /** A supertest agent signed in as that person (cookies kept), made once per person. */
  as(person: Person): Promise<ReturnType<typeof request.agent>>;
  /** Row counts of every table, to prove a refused request wrote nothing. */
  counts(): Promise<Record<string, number>>;
  /** Waits until every message sent so far has been delivered and captured. */
  mailSettled(): Promise<void>;
  /** Adds a member to team A (or B) with a role. */
  addUser(name: string, email: string, role: Role, teamId?: string): Promise<TestUser>;
  close(): Promise<void>;
}

const TABLES = [
  'teams',
  'users',
  'memberships',
  'sessions',
  'invitations',
  'projects',
  'designs',
  'revisions',
  'analysis_runs',
  'analysis_jobs',
  'reviews',
  'review_comments',
  'component_parts',
  'uploads',
  'mail_outbox',
  'audit_log',
];

export async function createTestWorld(options: Partial<AppOptions> = {}): Promise<TestWorld> {
  const database = await openTestDatabase();
  const capture = await startCaptureServer({ db: database.db, log: () => undefined });
  const mailer = createMailer({
    db: database.db,
    transport: capture.url,
    from: 'Ringwell <ringwell@northfold.example>',
    log: () => undefined,
  });
  const jwtSecret = randomJwtSecret();
  const app = createApp({
    database,
    mailer,
    jwtSecret,
    webDir: null,
    publicUrl: 'https://ringwell.northfold.example',
    // supertest speaks plain HTTP: Secure cookies would never be sent back.
    secureCookies: false,
    log: process.env.RINGWELL_TEST_LOG ? (m: string, e?: unknown) => console.error(m, e) : () => undefined,
    // Every agent signs in from 127.0.0.1; the rate-limit tests build their own app with small limits.
    rateLimits: { signInPerIp: { limit: 1000, windowMs: 60_000 }, signUpPerIp: { limit: 1000, windowMs: 60_000 } },
    ...options,
  });

  const passwordHash = await hash(TEST_PASSWORD);
  const [teamA] = await database.db.insert(teams).values({ name: 'Northfold Motion' }).returning();
  const [teamB] = await database.db.insert(teams).values({ name: 'Harbour Test Bench' }).returning();

  const addUser = async (name: string, email: string, role: Role, teamId = teamA.id): Promise<TestUser> => {
    const [user] = await database.db.insert(users).values({ name, email, passwordHash }).returning();
    await database.db.insert(memberships).values({ teamId, userId: user.id, role });
    return { id: user.id, name, email, role, teamId };
  };
  const people: Record<Person, TestUser> = {
    admin: await addUser('Ada Reyes', 'ada@northfold.example', 'admin'),
    engineer: await addUser('Sam Okafor', 'sam@northfold.example', 'engineer'),
    reviewer: await addUser('Priya Lindqvist', 'priya@northfold.example', 'reviewer'),
    viewer: await addUser('Tomás Berg', 'tomas@northfold.example', 'viewer'),
    outsider: await addUser('Noor Haddad', 'noor@harbour.northfold.example', 'admin', teamB.id),
  };

  const agents = new Map<Person, ReturnType<typeof request.agent>>();
  const world: TestWorld = {
    database,
    app,
    mailer,
    capture,
    jwtSecret,
    teamA: { id: teamA.id, name: teamA.name },
    teamB: { id: teamB.id, name: teamB.name },
    users: people,
    async as(person) {
      const existing = agents.get(person);
      if (existing) return existing;
      const agent = request.agent(app);
      const res = await agent.post('/api/auth/sign-in').send({ email: people[person].email, password: TEST_PASSWORD });
      if (res.status !== 200) throw new Error(`sign-in as ${person} failed: ${res.status} ${JSON.stringify(res.body)}`);
      agents.set(person, agent);
      return agent;
    },
    async counts() {
      const sql = `select ${TABLES.map((t) => `(select count(*)::int from "${t}") as "${t}"`).join(', ')}`;
      const result = await database.pg.query<Record<string, number>>(sql);
      return result.rows[0];
    },
    async mailSettled() {
      await mailer.flush();
      await capture.settled();
    },
    addUser,
    async close() {
      await mailer.flush();
      await stopJobWorkers(database);
      await closeEnginePool();
      mailer.close();
      await capture.close();
      await database.close();
    },
  };
  return world;
}
