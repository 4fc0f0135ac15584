// The team: members and roles, invitations by e-mail, the derating policy, the outbox and the
// audit log.
import request from 'supertest';
import nodemailer from 'nodemailer';
import { eq } from 'drizzle-orm';
import { auditLog, mailOutbox } from '@/db/schema';
import { invitationPreviewSchema } from '@/lib/contracts/auth';
import { pageSchema } from '@/lib/contracts/common';
import { auditEntrySchema, deratingResponseSchema, mailMessageSchema, memberSchema } from '@/lib/contracts/team';
import { createMailer } from '@/server/mail/mailer';
import { createTestWorld, TEST_PASSWORD, type TestWorld } from '@/tests/helpers/testApp';

jest.setTimeout(120_000);

let world: TestWorld;
beforeAll(async () => {
  world = await createTestWorld();
});
afterAll(async () => {
  await world.close();
});

const linkIn = (text: string) => /https:\/\/ringwell\.northfold\.example\/invite\/([A-Za-z0-9_-]+)/.exec(text)?.[1];

describe('members and roles', () => {
  it('lists the members with their roles for everyone in the team', async () => {
    const res = await (await world.as('viewer')).get('/api/team/members').expect(200);
    const members = res.body.items.map((m: unknown) => memberSchema.parse(m));
    expect(members.map((m: { email: string; role: string }) => [m.email, m.role])).toEqual(
      expect.arrayContaining([
        ['ada@northfold.example', 'admin'],
        ['sam@northfold.example', 'engineer'],
        ['priya@northfold.example', 'reviewer'],
        ['tomas@northfold.example', 'viewer'],
      ]),
    );
    expect(members.some((m: { email: string }) => m.email === 'noor@harbour.northfold.example')).toBe(false);
  });

  it('lets an admin change a role, recorded in the audit log with before and after', async () => {
    const eli = await world.addUser('Eli Brandt', 'eli@northfold.example', 'viewer');
    const res = await (await world.as('admin')).patch(`/api/team/members/${eli.id}`).send({ role: 'engineer' }).expect(200);
    expect(res.body).toMatchObject({ userId: eli.id, role: 'engineer' });
    const [row] = await world.database.db.select().from(auditLog).where(eq(auditLog.entityId, eli.id));
    expect(row).toMatchObject({
      action: 'member.role-changed',
      teamId: world.teamA.id,
      actorId: world.users.admin.id,
      details: { from: 'viewer', to: 'engineer' },
    });
    expect((await (await world.as('admin')).patch(`/api/team/members/${eli.id}`).send({ role: 'owner' })).status).toBe(400);
  });

  it('never leaves the team without an admin', async () => {
    const ada = await world.as('admin');
    const demote = await ada.patch(`/api/team/members/${world.users.admin.id}`).send({ role: 'engineer' });
    expect(demote.status).toBe(409);
    expect(demote.body.error.code).toBe('last_admin');
    expect((await ada.delete(`/api/team/members/${world.users.admin.id}`)).body.error.code).toBe('last_admin');
    // With a second admin, the first may step down.
    const zoe = await world.addUser('Zoe Park', 'zoe@northfold.example', 'admin');
    await ada.delete(`/api/team/members/${zoe.id}`).expect(204);
  });

  it('answers 404 for someone who is not in the team', async () => {
    const ada = await world.as('admin');
    expect((await ada.patch(`/api/team/members/${world.users.outsider.id}`).send({ role: 'viewer' })).status).toBe(404);
    expect((await ada.patch('/api/team/members/not-an-id').send({ role: 'viewer' })).status).toBe(404);
  });
});

describe('invitations', () => {
  it('are e-mailed with a link; the link shows team and inviter; signing up with it joins the team in the invited role', async () => {
    const ada = await world.as('admin');
    const created = await ada
      .post('/api/team/invitations')
      .send({ email: 'rosa@northfold.example', role: 'reviewer' })
      .expect(201);
    expect(created.body).toMatchObject({
      email: 'rosa@northfold.example',
      role: 'reviewer',
      state: 'pending',
      invitedBy: { name: 'Ada Reyes' },
    });

    await world.mailSettled();
    const [mail] = await world.database.db.select().from(mailOutbox).where(eq(mailOutbox.toAddress, 'rosa@northfold.example'));
    expect(mail).toMatchObject({
      status: 'sent',
      subject: 'Join Northfold Motion on Ringwell',
      relatedType: 'invitation',
      teamId: world.teamA.id,
    });
    const token = linkIn((mail.received as { text: string }).text)!;
    expect(token).toBeDefined();

    const preview = invitationPreviewSchema.parse((await request(world.app).get(`/api/invitations/${token}`).expect(200)).body);
    expect(preview).toMatchObject({
      team: { name: 'Northfold Motion' },
      inviter: { name: 'Ada Reyes' },
      role: 'reviewer',
      email: 'rosa@northfold.example',
    });

    const wrongAddress = await request(world.app)
      .post('/api/auth/sign-up')
      .send({ name: 'Rosa', email: 'someone@northfold.example', password: 'rosa-long-password', invitationToken: token });
    expect(wrongAddress.status).toBe(422);
    expect(wrongAddress.body.error.fields[0].path).toBe('email');

    const agent = request.agent(world.app);
    const joined = await agent
      .post('/api/auth/sign-up')
      .send({ name: 'Rosa Lind', email: 'rosa@northfold.example', password: 'rosa-long-password', invitationToken: token })
      .expect(201);
    expect(joined.body.currentTeam).toMatchObject({ id: world.teamA.id, role: 'reviewer' });
    // Used once only.
    expect((await request(world.app).get(`/api/invitations/${token}`)).status).toBe(404);
    const list = await ada.get('/api/team/invitations').expect(200);
    expect(list.body.items.find((i: { email: string }) => i.email === 'rosa@northfold.example').state).toBe('accepted');
  });

  it('can be accepted by someone who already has an account (a second team)', async () => {
    const noorAsAdminOfB = await world.as('outsider');
    const res = await noorAsAdminOfB
      .post('/api/team/invitations')
      .send({ email: 'tomas@northfold.example', role: 'engineer' })
      .expect(201);
    await world.mailSettled();
    const [mail] = await world.database.db.select().from(mailOutbox).where(eq(mailOutbox.relatedId, res.body.id));
    const token = linkIn(mail.text)!;
    const tomas = await world.as('viewer');
    const accepted = await tomas.post(`/api/invitations/${token}/accept`).expect(200);
    expect(accepted.body.teams).toHaveLength(2);
    expect(accepted.body.currentTeam).toMatchObject({ id: world.teamB.id, role: 'engineer' });
    // Still a viewer in Northfold Motion: roles are per team.
    expect((await tomas.get('/api/me').expect(200)).body.currentTeam).toMatchObject({ id: world.teamA.id, role: 'viewer' });
    expect((await tomas.get('/api/team/members').set('X-Team-Id', world.teamB.id).expect(200)).body.items).toHaveLength(2);
  });

  it('refuse an existing member, and can be revoked', async () => {
    const ada = await world.as('admin');
    expect((await ada.post('/api/team/invitations').send({ email: 'SAM@northfold.example', role: 'viewer' })).status).toBe(409);
    const created = await ada.post('/api/team/invitations').send({ email: 'max@northfold.example', role: 'viewer' }).expect(201);
    await ada.delete(`/api/team/invitations/${created.body.id}`).expect(204);
    await world.mailSettled();
    const [mail] = await world.database.db.select().from(mailOutbox).where(eq(mailOutbox.relatedId, created.body.id));
    expect((await request(world.app).get(`/api/invitations/${linkIn(mail.text)}`)).status).toBe(404);
  });
});

describe('the derating policy', () => {
  it('shows defaults to every member, and takes an admin’s valid override', async () => {
    const tomas = await world.as('viewer');
    const initial = deratingResponseSchema.parse((await tomas.get('/api/team/derating').expect(200)).body);
    expect(initial.policy).toBeNull();
    expect(initial.effective).toEqual(expect.objectContaining({ factors: expect.any(Object) }));

    const ada = await world.as('admin');
    const put = await ada
      .put('/api/team/derating')
      .send({ policy: { factors: { capacitorVoltage: 0.75 } } })
      .expect(200);
    expect(put.body.policy).toEqual({ factors: { capacitorVoltage: 0.75 } });
    expect((put.body.effective as { factors: { capacitorVoltage: { factor: number } } }).factors.capacitorVoltage.factor).toBe(
      0.75,
    );
    const [audit] = await world.database.db.select().from(auditLog).where(eq(auditLog.action, 'derating.changed'));
    expect(audit.details).toEqual({ before: null, after: { factors: { capacitorVoltage: 0.75 } } });
  });

  it('refuses an invalid policy with the field named', async () => {
    const ada = await world.as('admin');
    const res = await ada.put('/api/team/derating').send({ policy: { factors: { capacitorVoltage: 1.5 } } });
    expect(res.status).toBe(422);
    expect(res.body.error.fields[0].path).toBe('policy.factors.capacitorVoltage');
    const unknown = await ada.put('/api/team/derating').send({ policy: { factorz: {} } });
    expect(unknown.status).toBe(422);
  });
});

describe('the outbox', () => {
  it('lists the team’s messages for admins, newest first, in pages', async () => {
    const ada = await world.as('admin');
    for (const name of ['ivo', 'una'])
      await ada
        .post('/api/team/invitations')
        .send({ email: `${name}@northfold.example`, role: 'viewer' })
        .expect(201);
    await world.mailSettled();
    const first = pageSchema(mailMessageSchema).parse((await ada.get('/api/admin/outbox').query({ limit: 2 }).expect(200)).body);
    expect(first.items).toHaveLength(2);
    expect(first.nextCursor).not.toBeNull();
    const second = pageSchema(mailMessageSchema).parse(
      (await ada.get('/api/admin/outbox').query({ limit: 2, cursor: first.nextCursor }).expect(200)).body,
    );
    expect(second.items[0].id).not.toBe(first.items[1].id);
    // Team B's invitation is not in team A's outbox.
    const all = (await ada.get('/api/admin/outbox').query({ limit: 200 }).expect(200)).body.items;
    expect(all.every((m: { to: string }) => m.to !== 'tomas@northfold.example')).toBe(true);
  });

  it('records a failed delivery as failed', async () => {
    const broken = createMailer({
      db: world.database.db,
      transport: 'smtp://127.0.0.1:1',
      from: 'Ringwell <ringwell@northfold.example>',
    });
    const id = await broken.send({ to: 'nobody@northfold.example', subject: 'Test', text: 'Test' });
    await broken.flush();
    broken.close();
    const [row] = await world.database.db.select().from(mailOutbox).where(eq(mailOutbox.id, id));
    expect(row.status).toBe('failed');
    expect(row.error).toBeTruthy();
  });

  it('captures a message that did not come from the outbox as a new captured row', async () => {
    const transport = nodemailer.createTransport(world.capture.url);
    await transport.sendMail({
      from: 'bench@northfold.example',
      to: 'lab@northfold.example',
      subject: 'Scope capture ready',
      text: 'Files are on the share.',
    });
    transport.close();
    await world.capture.settled();
    const [row] = await world.database.db.select().from(mailOutbox).where(eq(mailOutbox.subject, 'Scope capture ready'));
    expect(row).toMatchObject({ status: 'captured', toAddress: 'lab@northfold.example', text: 'Files are on the share.\n' });
  });
});

describe('the audit log', () => {
  it('is filterable by action, actor and time, and pages by cursor', async () => {
    const ada = await world.as('admin');
    const signIns = await ada.get('/api/admin/audit').query({ action: 'auth.sign-in', limit: 200 }).expect(200);
    const entries = signIns.body.items.map((e: unknown) => auditEntrySchema.parse(e));
    expect(entries.length).toBeGreaterThan(0);
    expect(entries.every((e: { action: string }) => e.action === 'auth.sign-in')).toBe(true);
    // Sign-ins of members are visible; the outsider's are not.
    expect(entries.some((e: { actorId: string }) => e.actorId === world.users.outsider.id)).toBe(false);

    const byActor = await ada.get('/api/admin/audit').query({ actor: 'ada@northfold.example', action: 'member.*' }).expect(200);
    expect(byActor.body.items.length).toBeGreaterThan(0);
    expect(
      byActor.body.items.every(
        (e: { actorEmail: string; action: string }) => e.actorEmail === 'ada@northfold.example' && e.action.startsWith('member.'),
      ),
    ).toBe(true);

    const future = await ada
      .get('/api/admin/audit')
      .query({ from: new Date(Date.now() + 3_600_000).toISOString() })
      .expect(200);
    expect(future.body.items).toEqual([]);

    const page1 = await ada.get('/api/admin/audit').query({ limit: 3 }).expect(200);
    const page2 = await ada.get('/api/admin/audit').query({ limit: 3, cursor: page1.body.nextCursor }).expect(200);
    expect(page2.body.items[0].id).toBeLessThan(page1.body.items[2].id);
  });

  it('is append-only in the database', async () => {
    await expect(world.database.pg.query(`update audit_log set action = 'x'`)).rejects.toThrow(/immutable/);
    await expect(world.database.pg.query(`delete from audit_log`)).rejects.toThrow(/immutable/);
  });

  it('signs in with the test password (sanity check of the world)', async () => {
    expect(
      (await request(world.app).post('/api/auth/sign-in').send({ email: 'priya@northfold.example', password: TEST_PASSWORD }))
        .status,
    ).toBe(200);
  });
});
