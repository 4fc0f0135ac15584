// Accounts: sign-in, sign-up (by invitation or with a new team), password change, and the "me"
// answer. Handlers in routes/auth.ts stay short by calling these.
import type { Request, Response } from 'express';
import { and, eq, sql } from 'drizzle-orm';
import type { MeResponse } from '../../lib/contracts/auth';
import { TEAM_HEADER } from '../../lib/contracts/common';
import { invitations, memberships, teams, users, type User } from '../../db/schema';
import { setSessionCookies } from '../auth/cookies';
import { loadAuthState } from '../auth/middleware';
import { hashPassword, verifyPassword } from '../auth/passwords';
import { createSession } from '../auth/sessions';
import type { AppContext, AuthState } from '../context';
import { conflict, HttpError } from '../errors';
import { recordAudit } from './audit';
import { sha256Hex } from './canonical';

export async function findUserByEmail(ctx: AppContext, email: string): Promise<User | undefined> {
  const [user] = await ctx.db
    .select()
    .from(users)
    .where(sql`lower(${users.email}) = lower(${email})`);
  return user;
}

let dummyHash: Promise<string> | null = null;
/** Spend the same time on an unknown address as on a wrong password. */
export async function verifyAgainstNobody(password: string): Promise<false> {
  dummyHash ??= hashPassword('ringwell-timing-equaliser');
  await verifyPassword(await dummyHash, password);
  return false;
}

export async function checkPassword(user: User | undefined, password: string): Promise<boolean> {
  return user ? verifyPassword(user.passwordHash, password) : verifyAgainstNobody(password);
}

/** Opens a session for the user: refresh row, both cookies; returns the me answer. */
export async function startSession(ctx: AppContext, req: Request, res: Response, userId: string): Promise<MeResponse> {
  const refresh = await createSession(ctx.db, userId, ctx.refreshTtlSeconds, { userAgent: req.get('user-agent'), ip: req.ip });
  const access = await ctx.tokens.issue({ userId, familyId: refresh.familyId });
  setSessionCookies(ctx, res, access, refresh);
  const auth = await loadAuthState(ctx, userId, refresh.familyId);
  if (!auth) throw new Error('a session was opened for a user that does not exist');
  req.auth = auth;
  return meResponse(auth, req.get(TEAM_HEADER), access.expiresAt);
}

/** The current team is the one named by X-Team-Id when the user is in it, else the first team. A
 * header naming a team the user is not in gives null (the app then picks from `teams`). */
export function meResponse(auth: AuthState, teamHeader: string | undefined, accessExpiresAt?: Date): MeResponse {
  const teamsOut = auth.memberships.map((m) => ({ id: m.teamId, name: m.teamName, role: m.role }));
  const current = teamHeader ? teamsOut.find((t) => t.id === teamHeader.trim()) : teamsOut[0];
  return {
    user: auth.user,
    teams: teamsOut,
    currentTeam: current ?? null,
    ...(accessExpiresAt ? { accessExpiresAt: accessExpiresAt.toISOString() } : {}),
  };
}

export interface SignUpInput {
  name: string;
  email: string;
  password: string;
  invitationToken?: string;
  teamName?: string;
}

export async function signUp(ctx: AppContext, input: SignUpInput, ip: string | null): Promise<string> {
  if (await findUserByEmail(ctx, input.email)) {
    throw conflict('An account with this e-mail address exists. Sign in instead; an invitation can be accepted once signed in.');
  }
  const invitation = input.invitationToken ? await findPendingInvitation(ctx, input.invitationToken) : null;
  if (input.invitationToken && !invitation)
    throw new HttpError(404, 'not_found', 'This invitation does not exist, was used, or has expired.');
  if (invitation && invitation.email.toLowerCase() !== input.email.toLowerCase()) {
    throw new HttpError(
      422,
      'invitation_email_mismatch',
      `This invitation is for ${invitation.email}. Sign up with that address.`,
      [{ path: 'email', message: `The invitation is for ${invitation.email}.` }],
    );
  }
  const passwordHash = await hashPassword(input.password);
  try {
    return await ctx.db.transaction(async (tx) => {
      const [user] = await tx.insert(users).values({ email: input.email, name: input.name, passwordHash }).returning();
      const actor = { id: user.id, email: user.email };
      if (invitation) {
        const accepted = await tx
          .update(invitations)
          .set({ acceptedAt: new Date(), acceptedBy: user.id })
          .where(
            and(eq(invitations.id, invitation.id), sql`${invitations.acceptedAt} is null`, sql`${invitations.revokedAt} is null`),
          )
          .returning({ id: invitations.id });
        if (accepted.length === 0) throw new HttpError(409, 'conflict', 'This invitation was used a moment ago.');
        await tx.insert(memberships).values({ teamId: invitation.teamId, userId: user.id, role: invitation.role });
        await recordAudit(tx, {
          action: 'auth.sign-up',
          teamId: invitation.teamId,
          actor,
          entity: { type: 'user', id: user.id },
          ip,
        });
        await recordAudit(tx, {
          action: 'invitation.accepted',
          teamId: invitation.teamId,
          actor,
          entity: { type: 'invitation', id: invitation.id },
          details: { role: invitation.role },
          ip,
        });
      } else {
        const [team] = await tx
          .insert(teams)
          .values({ name: input.teamName ?? `${input.name}'s team` })
          .returning();
        await tx.insert(memberships).values({ teamId: team.id, userId: user.id, role: 'admin' });
        await recordAudit(tx, {
          action: 'auth.sign-up',
          teamId: team.id,
          actor,
          entity: { type: 'user', id: user.id },
          details: { createdTeam: team.name },
          ip,
        });
      }
      return user.id;
    });
  } catch (error) {
    if (isUniqueViolation(error)) throw conflict('An account with this e-mail address exists. Sign in instead.');
    throw error;
  }
}

export async function findPendingInvitation(ctx: AppContext, token: string) {
  const [row] = await ctx.db
    .select()
    .from(invitations)
    .where(eq(invitations.tokenHash, sha256Hex(token)));
  if (!row || row.acceptedAt || row.revokedAt || row.expiresAt.getTime() <= Date.now()) return null;
  return row;
}

export function isUniqueViolation(error: unknown): boolean {
  const code =
    (error as { code?: string; cause?: { code?: string } })?.code ?? (error as { cause?: { code?: string } })?.cause?.code;
  return code === '23505';
}
