// The workspace tables: what the database itself guarantees (immutable revisions, an append-only
// audit log, final review decisions), and the demo workspace seeded on first start.
import { eq } from 'drizzle-orm';
import type { DatabaseHandle } from '@/db/client';
import { auditLog, designs, mailOutbox, projects, reviews, revisions, teams, users } from '@/db/schema';
import { demoAccounts, seedDemo } from '@/db/seed';
import { createAppContext } from '@/server/app';
import { createRecordingMailer } from '@/server/mail/mailer';
import { seedDemoWorkspace } from '@/server/services/demoWorkspace';
import { openTestDatabase } from '@/tests/helpers/testDatabase';

jest.setTimeout(60_000);

let database: DatabaseHandle;
beforeAll(async () => {
  database = await openTestDatabase();
  const seeded = await seedDemo(database.db, async (p) => `plain:${p}`);
  const mailer = createRecordingMailer(database.db);
  await seedDemoWorkspace(createAppContext({ database, mailer, publicUrl: 'http://localhost:8080' }), seeded.teamId!);
  await mailer.flush();
});
afterAll(async () => {
  await database.close();
});

describe('the demo workspace', () => {
  it('holds the Northfold Motion designs from the engine presets, each with one revision', async () => {
    const rows = await database.db
      .select({ name: designs.name, project: projects.name, revisionCount: designs.revisionCount, status: designs.status })
      .from(designs)
      .innerJoin(projects, eq(projects.id, designs.projectId));
    expect(rows.map((r) => r.name).sort()).toEqual([
      'Cargo-bike drive, 96 V',
      'Depot charger DC link, 800 V',
      'Gate-drive test, 600 V',
      'Scooter controller, 48 V',
      'Wall charger front end, 230 V',
    ]);
    expect(rows.every((r) => r.revisionCount === 1 && r.status !== 'not-run')).toBe(true);
  });

  it('has the depot charger under review: requested by Sam from Priya, with the e-mail in the outbox', async () => {
    const [review] = await database.db.select().from(reviews);
    const [sam] = await database.db.select().from(users).where(eq(users.email, 'sam@northfold.example'));
    const [priya] = await database.db.select().from(users).where(eq(users.email, 'priya@northfold.example'));
    expect(review).toMatchObject({ state: 'requested', requestedBy: sam.id, reviewerId: priya.id });
    const [design] = await database.db.select().from(designs).where(eq(designs.id, review.designId));
    expect(design).toMatchObject({ name: 'Depot charger DC link, 800 V', reviewState: 'requested' });
    const mail = await database.db.select().from(mailOutbox).where(eq(mailOutbox.toAddress, 'priya@northfold.example'));
    expect(mail).toHaveLength(1);
    expect(mail[0].subject).toBe('Review requested: Depot charger DC link, 800 V, revision 1');
  });

  it('seeds only once', async () => {
    const again = await seedDemo(database.db, async (p) => `plain:${p}`);
    expect(again.seeded).toBe(false);
    expect(await database.db.select().from(teams)).toHaveLength(1);
    expect((await database.db.select().from(users)).map((u) => u.email).sort()).toEqual(demoAccounts.map((a) => a.email).sort());
  });
});

describe('what the database guarantees', () => {
  it('refuses UPDATE, DELETE and TRUNCATE of revisions', async () => {
    await expect(database.pg.query(`update revisions set sha256 = 'x'`)).rejects.toThrow(
      /rows of revisions are immutable \(UPDATE refused\)/,
    );
    await expect(database.pg.query(`delete from revisions`)).rejects.toThrow(/DELETE refused/);
    await expect(database.pg.query(`truncate revisions cascade`)).rejects.toThrow(/TRUNCATE refused/);
    expect(await database.db.select().from(revisions)).toHaveLength(5);
  });

  it('refuses UPDATE and DELETE of the audit log, and keeps appending', async () => {
    const before = (await database.db.select().from(auditLog)).length;
    expect(before).toBeGreaterThan(0);
    await expect(database.pg.query(`update audit_log set action = 'x'`)).rejects.toThrow(/immutable/);
    await expect(database.pg.query(`delete from audit_log`)).rejects.toThrow(/immutable/);
    await database.db.insert(auditLog).values({ action: 'auth.sign-in' });
    expect((await database.db.select().from(auditLog)).length).toBe(before + 1);
  });

  it('lets an open review be decided once, then refuses any change or deletion', async () => {
    const [review] = await database.db.select().from(reviews);
    await expect(database.pg.query(`delete from reviews where id = $1`, [review.id])).rejects.toThrow(/never deleted/);
    await database.pg.query(`update reviews set state = 'approved', decided_at = now() where id = $1`, [review.id]);
    await expect(database.pg.query(`update reviews set state = 'requested' where id = $1`, [review.id])).rejects.toThrow(
      /decided/,
    );
  });

  it('refuses a second revision with the same sequence number on a design', async () => {
    const [first] = await database.db.select().from(revisions);
    const { id: _id, createdAt: _c, ...copy } = first;
    await expect(database.db.insert(revisions).values(copy)).rejects.toThrow();
  });
});
