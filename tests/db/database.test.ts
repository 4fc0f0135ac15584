import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { eq } from 'drizzle-orm';
import { openDatabase } from '@/db/client';
import { users, teams, memberships } from '@/db/schema';
import { demoAccounts, seedDemo } from '@/db/seed';
import { hashPassword, verifyPassword } from '@/server/auth/passwords';

jest.setTimeout(60_000);

describe('the embedded database', () => {
  it('migrates an in-memory database, then writes and reads a user', async () => {
    const handle = await openDatabase({ dataDir: null });
    try {
      await handle.db.insert(users).values({ email: 'kit@northfold.example', name: 'Kit', passwordHash: 'x' });
      const rows = await handle.db.select().from(users).where(eq(users.email, 'kit@northfold.example'));
      expect(rows).toHaveLength(1);
      expect(rows[0].name).toBe('Kit');
      expect(rows[0].id).toMatch(/^[0-9a-f-]{36}$/);
    } finally {
      await handle.close();
    }
  });

  it('keeps rows on disk across a close and a reopen, and seeds only once', async () => {
    const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'ringwell-db-'));
    try {
      const first = await openDatabase({ dataDir });
      const seeded = await seedDemo(first.db, async (p) => `plain:${p}`);
      expect(seeded.seeded).toBe(true);
      await first.close();

      const second = await openDatabase({ dataDir });
      const people = await second.db.select().from(users);
      expect(people.map((u) => u.email).sort()).toEqual(demoAccounts.map((a) => a.email).sort());
      const again = await seedDemo(second.db, async (p) => `plain:${p}`);
      expect(again.seeded).toBe(false);
      expect(await second.db.select().from(teams)).toHaveLength(1);
      const roles = (await second.db.select().from(memberships)).map((m) => m.role).sort();
      expect(roles).toEqual(['admin', 'engineer', 'reviewer', 'viewer']);
      await second.close();
    } finally {
      fs.rmSync(dataDir, { recursive: true, force: true });
    }
  });

  it('refuses a second user with the same address in another letter case', async () => {
    const handle = await openDatabase({ dataDir: null });
    try {
      await handle.db.insert(users).values({ email: 'Sam@northfold.example', name: 'Sam', passwordHash: 'x' });
      await expect(
        handle.db.insert(users).values({ email: 'sam@NORTHFOLD.example', name: 'Sam 2', passwordHash: 'y' }),
      ).rejects.toThrow();
    } finally {
      await handle.close();
    }
  });
});

describe('password hashing', () => {
  it('hashes with argon2id and verifies only the right password', async () => {
    const hash = await hashPassword('correct horse');
    expect(hash.startsWith('$argon2id$')).toBe(true);
    await expect(verifyPassword(hash, 'correct horse')).resolves.toBe(true);
    await expect(verifyPassword(hash, 'wrong horse')).resolves.toBe(false);
    await expect(verifyPassword('not-a-hash', 'x')).resolves.toBe(false);
  });
});
