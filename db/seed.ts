// Demo data for a local install, in Ringwell's own fictional world (DESIGN.md): the team
// Northfold Motion and one account per role. Runs once: a database that already has users is left
// alone.
import { count } from 'drizzle-orm';
import type { Database } from './client';
import { demoParts } from '../sim/parts';
import { componentParts, memberships, teams, users, type Role } from './schema';

export interface DemoAccount {
  name: string;
  email: string;
  role: Role;
  password: string;
}

export const DEMO_TEAM = 'Northfold Motion';

export const demoAccounts: DemoAccount[] = [
  { name: 'Ada Reyes', email: 'ada@northfold.example', role: 'admin', password: 'northfold-admin' },
  { name: 'Sam Okafor', email: 'sam@northfold.example', role: 'engineer', password: 'northfold-engineer' },
  { name: 'Priya Lindqvist', email: 'priya@northfold.example', role: 'reviewer', password: 'northfold-reviewer' },
  { name: 'Tomás Berg', email: 'tomas@northfold.example', role: 'viewer', password: 'northfold-viewer' },
];

export interface SeedResult {
  seeded: boolean;
  teamId: string | null;
}

export async function seedDemo(db: Database, hashPassword: (password: string) => Promise<string>): Promise<SeedResult> {
  const [{ value: userCount }] = await db.select({ value: count() }).from(users);
  if (userCount > 0) return { seeded: false, teamId: null };
  const hashes = await Promise.all(demoAccounts.map((a) => hashPassword(a.password)));
  const teamId = await db.transaction(async (tx) => {
    const [team] = await tx.insert(teams).values({ name: DEMO_TEAM }).returning();
    for (const [index, account] of demoAccounts.entries()) {
      const [user] = await tx
        .insert(users)
        .values({ email: account.email, name: account.name, passwordHash: hashes[index] })
        .returning();
      await tx.insert(memberships).values({ teamId: team.id, userId: user.id, role: account.role });
    }
    // The parts library starts with the demo parts (fictional NF-… numbers).
    await tx.insert(componentParts).values(
      demoParts().map(({ id: _id, ...part }) => ({ teamId: team.id, type: part.kind, name: part.partNumber, ratings: part })),
    );
    return team.id;
  });
  return { seeded: true, teamId };
}
