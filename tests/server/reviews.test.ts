// The review workflow with its e-mail, delivered through the real loopback SMTP server into the
// outbox: request, comment on a check, approve or request changes, supersede, and self-approval.
import request from 'supertest';
import { and, eq } from 'drizzle-orm';
import { auditLog, mailOutbox, reviews } from '@/db/schema';
import { reviewDetailSchema } from '@/lib/contracts/reviews';
import { createTestWorld, type TestWorld } from '@/tests/helpers/testApp';
import { makeChain, makeRevision } from '@/tests/helpers/fixtures';

jest.setTimeout(120_000);

let world: TestWorld;
beforeAll(async () => {
  world = await createTestWorld();
});
afterAll(async () => {
  await world.close();
});

async function mailTo(email: string) {
  await world.mailSettled();
  return world.database.db.select().from(mailOutbox).where(eq(mailOutbox.toAddress, email));
}

describe('requesting a review', () => {
  it('creates one review per reviewer and e-mails each of them a link to it, delivered over SMTP', async () => {
    const second = await world.addUser('Mira Olsen', 'mira@northfold.example', 'reviewer');
    const c = await makeChain(world);
    const sam = await world.as('engineer');
    const res = await sam
      .post(`/api/revisions/${c.revision.id}/reviews`)
      .send({ reviewerIds: [world.users.reviewer.id, second.id], note: 'Please check the bypass inrush.' })
      .expect(201);
    expect(res.body.items).toHaveLength(2);
    const [forPriya] = res.body.items.filter((r: { reviewer: { id: string } }) => r.reviewer.id === world.users.reviewer.id);
    expect(forPriya).toMatchObject({
      state: 'requested',
      revisionSha256: c.revision.sha256,
      requestedBy: { name: 'Sam Okafor' },
    });
    expect(res.body.items[0].requestId).toBe(res.body.items[1].requestId);

    for (const email of ['priya@northfold.example', 'mira@northfold.example']) {
      const mail = (await mailTo(email)).filter((m) => m.relatedType === 'review');
      expect(mail).toHaveLength(1);
      const [message] = mail;
      expect(message.status).toBe('sent');
      expect(message.receivedAt).not.toBeNull();
      expect(message.subject).toBe(`Review requested: ${c.design.name}, revision 1`);
      const received = message.received as { subject: string; text: string; html: string; to: string[] };
      // What arrived over SMTP, parsed from the wire, is what was sent.
      expect(received.subject).toBe(message.subject);
      expect(received.to.join()).toContain(email);
      expect(received.text).toContain('Sam Okafor asks you to review');
      expect(received.text).toContain('Please check the bypass inrush.');
      expect(received.text).toContain(`https://ringwell.northfold.example/reviews/${message.relatedId}`);
      expect(received.html).toContain(`href="https://ringwell.northfold.example/reviews/${message.relatedId}"`);
      expect(`${message.subject}${message.text}`).not.toContain('!');
    }
    const design = await (await world.as('viewer')).get(`/api/designs/${c.design.id}`).expect(200);
    expect(design.body.reviewState).toBe('requested');
    // The reviewer finds it in "my mail".
    const mine = await (await world.as('reviewer')).get('/api/me/mail').expect(200);
    expect(mine.body.items.some((m: { relatedId: string }) => m.relatedId === forPriya.id)).toBe(true);
  });

  it('refuses to ask the author, a non-reviewer, or someone outside the team', async () => {
    const c = await makeChain(world);
    const sam = await world.as('engineer');
    const self = await sam.post(`/api/revisions/${c.revision.id}/reviews`).send({ reviewerIds: [world.users.engineer.id] });
    expect(self.status).toBe(422);
    expect(self.body.error.code).toBe('self_review');
    const viewer = await sam.post(`/api/revisions/${c.revision.id}/reviews`).send({ reviewerIds: [world.users.viewer.id] });
    expect(viewer.status).toBe(422);
    expect(viewer.body.error.fields[0].message).toMatch(/not a reviewer/);
    const twice = await sam
      .post(`/api/revisions/${c.revision.id}/reviews`)
      .send({ reviewerIds: [world.users.reviewer.id, world.users.reviewer.id] });
    expect(twice.status).toBe(400);
  });

  it('only for the latest revision', async () => {
    const c = await makeChain(world);
    await makeRevision(world, c.design.id);
    const res = await (
      await world.as('engineer')
    )
      .post(`/api/revisions/${c.revision.id}/reviews`)
      .send({ reviewerIds: [world.users.reviewer.id] });
    expect(res.status).toBe(409);
  });
});

describe('the reviewer’s view', () => {
  it('lists failures first, then warnings, not-checked, passes; comments can target a check', async () => {
    const c = await makeChain(world, true);
    const priya = await world.as('reviewer');
    const view = reviewDetailSchema.parse((await priya.get(`/api/reviews/${c.review!.id}`).expect(200)).body);
    const rank = { fail: 0, warn: 1, 'not-checked': 2, pass: 3 };
    const ranks = view.checks.map((x) => rank[x.status]);
    expect(ranks).toEqual([...ranks].sort((a, b) => a - b));
    expect(view.canDecide).toBe(true);
    const target = view.checks[0];

    const comment = await priya
      .post(`/api/reviews/${c.review!.id}/comments`)
      .send({ body: 'Why this margin?', checkId: target.id })
      .expect(201);
    expect(comment.body).toMatchObject({ checkId: target.id, body: 'Why this margin?', author: { name: 'Priya Lindqvist' } });
    const unknownCheck = await priya.post(`/api/reviews/${c.review!.id}/comments`).send({ body: 'x', checkId: 'no-such-check' });
    expect(unknownCheck.status).toBe(422);
    expect(unknownCheck.body.error.fields[0].path).toBe('checkId');

    const reply = await (
      await world.as('engineer')
    )
      .post(`/api/reviews/${c.review!.id}/comments`)
      .send({ body: 'Because of the contactor.' })
      .expect(201);
    expect(reply.body.checkId).toBeNull();
    const again = reviewDetailSchema.parse(
      (await (await world.as('viewer')).get(`/api/reviews/${c.review!.id}`).expect(200)).body,
    );
    expect(again.comments.map((x) => x.body)).toEqual(['Why this margin?', 'Because of the contactor.']);
    expect(again.canDecide).toBe(false);

    // The author hears of the reviewer's comment, the reviewer of the author's.
    const toSam = (await mailTo('sam@northfold.example')).filter(
      (m) => m.subject.startsWith('Comment on') && m.relatedId === c.review!.id,
    );
    expect(toSam).toHaveLength(1);
    expect((toSam[0].received as { text: string }).text).toContain(`commented on the check "${target.label}"`);
    const toPriya = (await mailTo('priya@northfold.example')).filter(
      (m) => m.subject.startsWith('Comment on') && m.relatedId === c.review!.id,
    );
    expect(toPriya).toHaveLength(1);
  });

  it('lists a reviewer’s open reviews with ?mine=true&state=requested', async () => {
    const c = await makeChain(world, true);
    const res = await (await world.as('reviewer')).get('/api/reviews').query({ mine: 'true', state: 'requested' }).expect(200);
    expect(res.body.items.map((r: { id: string }) => r.id)).toContain(c.review!.id);
    expect((await (await world.as('engineer')).get('/api/reviews').query({ mine: 'true' }).expect(200)).body.items).toEqual([]);
  });
});

describe('deciding', () => {
  it('approval records the reviewer, the time, the revision hash and the checks exactly as approved, and tells the author', async () => {
    const c = await makeChain(world, true);
    const priya = await world.as('reviewer');
    const revision = (await priya.get(`/api/revisions/${c.revision.id}`).expect(200)).body;
    const res = await priya
      .post(`/api/reviews/${c.review!.id}/approve`)
      .send({ comment: 'Margins are fine for the prototype.' })
      .expect(200);
    const view = reviewDetailSchema.parse(res.body);
    expect(view.state).toBe('approved');
    expect(view.approvedSha256).toBe(c.revision.sha256);
    expect(view.checksSnapshot).toEqual(revision.results.checks);
    expect(view.decidedAt).not.toBeNull();
    expect(view.reviewer?.id).toBe(world.users.reviewer.id);

    const [row] = await world.database.db.select().from(reviews).where(eq(reviews.id, c.review!.id));
    expect(row.checksSnapshot).toEqual(revision.results.checks);
    const design = (await priya.get(`/api/designs/${c.design.id}`).expect(200)).body;
    expect(design.reviewState).toBe('approved');
    const mail = (await mailTo('sam@northfold.example')).filter((m) => m.subject === `Approved: ${c.design.name}, revision 1`);
    expect(mail).toHaveLength(1);
    expect((mail[0].received as { text: string }).text).toContain('Margins are fine for the prototype.');
    const audit = await world.database.db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.action, 'review.approved'), eq(auditLog.entityId, c.review!.id)));
    expect(audit).toHaveLength(1);
    expect(audit[0].details).toEqual(expect.objectContaining({ sha256: c.revision.sha256 }));

    // Decided is final: the API says so, and the database refuses any change to the row.
    expect((await priya.post(`/api/reviews/${c.review!.id}/request-changes`).send({ reason: 'changed my mind' })).status).toBe(
      409,
    );
    await expect(
      world.database.pg.query(`update reviews set approved_sha256 = 'x' where id = $1`, [c.review!.id]),
    ).rejects.toThrow(/decided/);
  });

  it('requesting changes needs a reason and tells the author', async () => {
    const c = await makeChain(world, true);
    const priya = await world.as('reviewer');
    expect((await priya.post(`/api/reviews/${c.review!.id}/request-changes`).send({ reason: '  ' })).status).toBe(400);
    const res = await priya
      .post(`/api/reviews/${c.review!.id}/request-changes`)
      .send({ reason: 'Add an RC damping branch.' })
      .expect(200);
    expect(res.body).toMatchObject({
      state: 'changes-requested',
      decisionReason: 'Add an RC damping branch.',
      approvedSha256: null,
    });
    const mail = (await mailTo('sam@northfold.example')).filter(
      (m) => m.subject === `Changes requested: ${c.design.name}, revision 1`,
    );
    expect(mail).toHaveLength(1);
    expect(mail[0].text).toContain('Add an RC damping branch.');
    expect((await priya.get(`/api/designs/${c.design.id}`).expect(200)).body.reviewState).toBe('changes-requested');
  });

  it('nobody approves their own revision, even when a review of it names them', async () => {
    // Sam saves a revision, is then made a reviewer, and a review of his revision is forced onto
    // him by SQL (the API refuses to create it): the approval is still refused.
    const c = await makeChain(world);
    const [forced] = await world.database.db
      .insert(reviews)
      .values({
        requestId: c.revision.id,
        teamId: world.teamA.id,
        designId: c.design.id,
        revisionId: c.revision.id,
        requestedBy: world.users.admin.id,
        reviewerId: world.users.engineer.id,
      })
      .returning();
    await (await world.as('admin')).patch(`/api/team/members/${world.users.engineer.id}`).send({ role: 'reviewer' }).expect(200);
    try {
      const before = await world.counts();
      const res = await (await world.as('engineer')).post(`/api/reviews/${forced.id}/approve`).send({});
      expect(res.status).toBe(403);
      expect(res.body.error.code).toBe('self_review');
      expect(await world.counts()).toEqual(before);
      const [row] = await world.database.db.select().from(reviews).where(eq(reviews.id, forced.id));
      expect(row.state).toBe('requested');
    } finally {
      await (
        await world.as('admin')
      )
        .patch(`/api/team/members/${world.users.engineer.id}`)
        .send({ role: 'engineer' })
        .expect(200);
    }
  });

  it('a reviewer cannot decide a review requested from someone else', async () => {
    const other = await world.addUser('Jon Ekberg', 'jon@northfold.example', 'reviewer');
    const c = await makeChain(world, true);
    const agent = request.agent(world.app);
    await agent.post('/api/auth/sign-in').send({ email: other.email, password: 'northfold-test-password' }).expect(200);
    const res = await agent.post(`/api/reviews/${c.review!.id}/approve`).send({});
    expect(res.status).toBe(403);
  });
});

describe('a new revision', () => {
  it('supersedes the open review requests of the design', async () => {
    const c = await makeChain(world, true);
    await makeRevision(world, c.design.id, 'addressed the comments');
    const view = (await (await world.as('reviewer')).get(`/api/reviews/${c.review!.id}`).expect(200)).body;
    expect(view.state).toBe('superseded');
    expect(view.canDecide).toBe(false);
    const res = await (await world.as('reviewer')).post(`/api/reviews/${c.review!.id}/approve`).send({});
    expect(res.status).toBe(409);
    expect(res.body.error.message).toMatch(/superseded/);
    expect((await (await world.as('viewer')).get(`/api/designs/${c.design.id}`).expect(200)).body.reviewState).toBe('none');
  });
});
