// Members, roles and invitations of a team. The last admin can be neither demoted nor removed.
import { randomBytes } from 'node:crypto';
import { and, asc, count, desc, eq, isNull, sql } from 'drizzle-orm';
import { invitations, memberships, teams, users, type Role } from '../../db/schema';
import type { Invitation, Member } from '../../lib/contracts/team';
import type { AppContext } from '../context';
import { conflict, HttpError, notFound } from '../errors';
import { invitationMail } from '../mail/messages';
import { recordAudit, type AuditEntry } from './audit';
import { sha256Hex } from './canonical';
import { iso, loadUsers, userRef } from './shape';

type Actor = { id: string; email: string; name: string };
type AuditBase = Pick<AuditEntry, 'actor' | 'ip'>;

export async function listMembers(ctx: AppContext, teamId: string): Promise<Member[]> {
  const rows = await ctx.db
    .select({ userId: users.id, name: users.name, email: users.email, role: memberships.role, joinedAt: memberships.createdAt })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(eq(memberships.teamId, teamId))
    .orderBy(asc(users.name), asc(users.id));
  return rows.map((r) => ({ ...r, joinedAt: iso(r.joinedAt) }));
}

const lastAdmin = () => new HttpError(409, 'last_admin', 'A team needs at least one admin. Make someone else an admin first.');

export async function changeRole(ctx: AppContext, teamId: string, userId: string, role: Role, audit: AuditBase): Promise<Member> {
  await ctx.db.transaction(async (tx) => {
    const [member] = await tx
      .select()
      .from(memberships)
      .where(and(eq(memberships.teamId, teamId), eq(memberships.userId, userId)));
    if (!member) throw notFound('No such member in this team.');
    if (member.role === role) return;
    if (member.role === 'admin') {
      const [{ admins }] = await tx
        .select({ admins: count() })
        .from(memberships)
        .where(and(eq(memberships.teamId, teamId), eq(memberships.role, 'admin')));
      if (admins <= 1) throw lastAdmin();
    }
    await tx.update(memberships).set({ role }).where(eq(memberships.id, member.id));
    await recordAudit(tx, {
      ...audit,
      action: 'member.role-changed',
      teamId,
      entity: { type: 'user', id: userId },
      details: { from: member.role, to: role },
    });
  });
  const member = (await listMembers(ctx, teamId)).find((m) => m.userId === userId);
  if (!member) throw notFound('No such member in this team.');
  return member;
}

export async function removeMember(ctx: AppContext, teamId: string, userId: string, audit: AuditBase): Promise<void> {
  await ctx.db.transaction(async (tx) => {
    const [member] = await tx
      .select()
      .from(memberships)
      .where(and(eq(memberships.teamId, teamId), eq(memberships.userId, userId)));
    if (!member) throw notFound('No such member in this team.');
    if (member.role === 'admin') {
      const [{ admins }] = await tx
        .select({ admins: count() })
        .from(memberships)
        .where(and(eq(memberships.teamId, teamId), eq(memberships.role, 'admin')));
      if (admins <= 1) throw lastAdmin();
    }
    await tx.delete(memberships).where(eq(memberships.id, member.id));
    await recordAudit(tx, {
      ...audit,
      action: 'member.removed',
      teamId,
      entity: { type: 'user', id: userId },
      details: { role: member.role },
    });
  });
}

function invitationState(row: typeof invitations.$inferSelect): Invitation['state'] {
  if (row.acceptedAt) return 'accepted';
  if (row.revokedAt) return 'revoked';
  if (row.expiresAt.getTime() <= Date.now()) return 'expired';
  return 'pending';
}

export async function listInvitations(ctx: AppContext, teamId: string): Promise<Invitation[]> {
  const rows = await ctx.db.select().from(invitations).where(eq(invitations.teamId, teamId)).orderBy(desc(invitations.createdAt));
  const people = await loadUsers(
    ctx.db,
    rows.map((r) => r.invitedBy),
  );
  return rows.map((r) => ({
    id: r.id,
    email: r.email,
    role: r.role,
    invitedBy: userRef(people, r.invitedBy),
    createdAt: iso(r.createdAt),
    expiresAt: iso(r.expiresAt),
    state: invitationState(r),
  }));
}

export async function createInvitation(
  ctx: AppContext,
  team: { id: string; name: string },
  inviter: Actor,
  input: { email: string; role: Role },
  audit: AuditBase,
): Promise<Invitation> {
  const [existing] = await ctx.db
    .select({ id: users.id })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(and(eq(memberships.teamId, team.id), sql`lower(${users.email}) = lower(${input.email})`));
  if (existing) throw conflict(`${input.email} is already a member of ${team.name}.`);
  const token = randomBytes(24).toString('base64url');
  const expiresAt = new Date(Date.now() + ctx.invitationTtlSeconds * 1000);
  const row = await ctx.db.transaction(async (tx) => {
    // A new invitation to the same address replaces the pending one.
    await tx
      .update(invitations)
      .set({ revokedAt: new Date() })
      .where(
        and(
          eq(invitations.teamId, team.id),
          sql`lower(${invitations.email}) = lower(${input.email})`,
          isNull(invitations.acceptedAt),
          isNull(invitations.revokedAt),
        ),
      );
    const [created] = await tx
      .insert(invitations)
      .values({
        teamId: team.id,
        email: input.email,
        role: input.role,
        tokenHash: sha256Hex(token),
        invitedBy: inviter.id,
        expiresAt,
      })
      .returning();
    await recordAudit(tx, {
      ...audit,
      action: 'invitation.created',
      teamId: team.id,
      entity: { type: 'invitation', id: created.id },
      details: { email: input.email, role: input.role },
    });
    return created;
  });
  const mail = invitationMail({
    inviter: inviter.name,
    teamName: team.name,
    role: input.role,
    expiresAt,
    url: `${ctx.publicUrl}/invite/${token}`,
  });
  await ctx.mailer.send({ to: input.email, ...mail, teamId: team.id, related: { type: 'invitation', id: row.id } });
  return {
    id: row.id,
    email: row.email,
    role: row.role,
    invitedBy: { id: inviter.id, name: inviter.name, email: inviter.email },
    createdAt: iso(row.createdAt),
    expiresAt: iso(row.expiresAt),
    state: 'pending',
  };
}

export async function revokeInvitation(ctx: AppContext, teamId: string, invitationId: string, audit: AuditBase): Promise<void> {
  await ctx.db.transaction(async (tx) => {
    const [row] = await tx
      .select()
      .from(invitations)
      .where(and(eq(invitations.id, invitationId), eq(invitations.teamId, teamId)));
    if (!row) throw notFound('No such invitation.');
    if (row.acceptedAt) throw conflict('This invitation was accepted already; change the member instead.');
    if (row.revokedAt) return;
    await tx.update(invitations).set({ revokedAt: new Date() }).where(eq(invitations.id, row.id));
    await recordAudit(tx, {
      ...audit,
      action: 'invitation.revoked',
      teamId,
      entity: { type: 'invitation', id: row.id },
      details: { email: row.email },
    });
  });
}

export async function invitationPreview(ctx: AppContext, row: typeof invitations.$inferSelect) {
  const [team] = await ctx.db.select({ id: teams.id, name: teams.name }).from(teams).where(eq(teams.id, row.teamId));
  const people = await loadUsers(ctx.db, [row.invitedBy]);
  const inviter = userRef(people, row.invitedBy);
  return {
    team,
    inviter: inviter ? { name: inviter.name } : null,
    email: row.email,
    role: row.role,
    expiresAt: iso(row.expiresAt),
  };
}

export async function acceptInvitation(
  ctx: AppContext,
  row: typeof invitations.$inferSelect,
  user: Actor,
  ip: string | null,
): Promise<void> {
  if (row.email.toLowerCase() !== user.email.toLowerCase()) {
    throw new HttpError(403, 'forbidden', `This invitation is for ${row.email}; you are signed in as ${user.email}.`);
  }
  await ctx.db.transaction(async (tx) => {
    const [already] = await tx
      .select()
      .from(memberships)
      .where(and(eq(memberships.teamId, row.teamId), eq(memberships.userId, user.id)));
    if (already) throw conflict('You are already a member of this team.');
    const used = await tx
      .update(invitations)
      .set({ acceptedAt: new Date(), acceptedBy: user.id })
      .where(and(eq(invitations.id, row.id), isNull(invitations.acceptedAt), isNull(invitations.revokedAt)))
      .returning({ id: invitations.id });
    if (used.length === 0) throw conflict('This invitation was used a moment ago.');
    await tx.insert(memberships).values({ teamId: row.teamId, userId: user.id, role: row.role });
    await recordAudit(tx, {
      action: 'invitation.accepted',
      teamId: row.teamId,
      actor: { id: user.id, email: user.email },
      entity: { type: 'invitation', id: row.id },
      details: { role: row.role },
      ip,
    });
  });
}
