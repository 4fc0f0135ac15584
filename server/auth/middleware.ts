// Who is asking, and may they. authenticate runs on every API request and only reads; each route
// then carries exactly one guard: requireSignedIn, or requireRole(...roles) for anything inside a
// team. Refusals happen before a handler runs, so a refused request writes nothing.
import type { Request, RequestHandler, Router } from 'express';
import { asc, eq, sql } from 'drizzle-orm';
import { ACCESS_COOKIE, TEAM_HEADER } from '../../lib/contracts/common';
import { designs, invitations, memberships, projects, reviews, revisions, sessions, teams, users, type Role } from '../../db/schema';
import type { Database } from '../../db/client';
import type { AppContext, AuthState } from '../context';
import { forbidden, notFound, unauthorized } from '../errors';

export const ALL_ROLES: Role[] = ['admin', 'engineer', 'reviewer', 'viewer'];

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;
export const isUuid = (value: unknown): value is string => typeof value === 'string' && UUID.test(value);

export function authenticate(ctx: AppContext): RequestHandler {
  return async (req, _res, next) => {
    const token: unknown = req.cookies?.[ACCESS_COOKIE];
    if (typeof token !== 'string' || token === '') return next();
    const claims = await ctx.tokens.verify(token);
    if (!claims || !isUuid(claims.userId) || !isUuid(claims.familyId)) return next();
    req.auth = (await loadAuthState(ctx, claims.userId, claims.familyId)) ?? undefined;
    next();
  };
}

/** The signed-in state's query, prepared once per database: it runs before every signed-in request. */
function authStateQuery(db: Database) {
  const userId = sql.placeholder('userId');
  const familyId = sql.placeholder('familyId');
  const familyActive = sql<boolean>`exists (select 1 from ${sessions} where ${sessions.familyId} = ${familyId}
    and ${sessions.userId} = ${userId} and ${sessions.revokedAt} is null and ${sessions.expiresAt} > now())`;
  return db
    .select({
      id: users.id,
      email: users.email,
      name: users.name,
      familyActive,
      teamId: memberships.teamId,
      teamName: teams.name,
      role: memberships.role,
    })
    .from(users)
    .leftJoin(memberships, eq(memberships.userId, users.id))
    .leftJoin(teams, eq(teams.id, memberships.teamId))
    .where(eq(users.id, userId))
    .orderBy(asc(memberships.createdAt), asc(memberships.id))
    .prepare('ringwell_auth_state');
}
const preparedAuthState = new WeakMap<Database, ReturnType<typeof authStateQuery>>();

/**
 * The user (gone if the account was deleted), whether their session family is live, and their
 * teams, in one prepared query.
 */
export async function loadAuthState(ctx: AppContext, userId: string, familyId: string): Promise<AuthState | null> {
  let query = preparedAuthState.get(ctx.db);
  if (!query) {
    query = authStateQuery(ctx.db);
    preparedAuthState.set(ctx.db, query);
  }
  const rows = await query.execute({ userId, familyId });
  const first = rows[0];
  if (!first || !first.familyActive) return null;
  return {
    user: { id: first.id, email: first.email, name: first.name },
    familyId,
    memberships: rows.flatMap((r) => (r.teamId && r.teamName !== null && r.role ? [{ teamId: r.teamId, teamName: r.teamName, role: r.role }] : [])),
  };
}

export const requireSignedIn: RequestHandler = (req, _res, next) => {
  next(req.auth ? undefined : unauthorized());
};

/**
 * The team a request acts on: the resource's own team for resource routes; otherwise the team in
 * the X-Team-Id header, or the user's first team. A team the user is not in answers 404, with the
 * same words as a resource that does not exist.
 */
export function requireRole(...allowed: Role[]): RequestHandler {
  return (req, _res, next) => {
    const auth = req.auth;
    if (!auth) return next(unauthorized());
    let teamId: string | undefined;
    let missing: string;
    if (req.resource) {
      teamId = req.resource.teamId;
      missing = req.resource.notFoundMessage;
    } else {
      const header = req.get(TEAM_HEADER);
      teamId = header ? header.trim() : auth.memberships[0]?.teamId;
      missing = header ? 'No such team.' : 'You are not a member of any team yet.';
    }
    const membership = auth.memberships.find((m) => m.teamId === teamId);
    if (!membership) return next(notFound(missing));
    if (!allowed.includes(membership.role)) return next(forbidden(roleRefusal(allowed)));
    req.team = { id: membership.teamId, name: membership.teamName, role: membership.role };
    next();
  };
}

function roleRefusal(allowed: Role[]): string {
  const names = allowed.map((r) => `${r}s`);
  const list = names.length > 1 ? `${names.slice(0, -1).join(', ')} or ${names[names.length - 1]}` : names[0];
  return `Only ${list} of this team can do that.`;
}

/** The signed-in user, in a handler behind a guard. */
export function actor(req: Request): AuthState['user'] {
  if (!req.auth) throw unauthorized();
  return req.auth.user;
}

/** The team and role requireRole resolved, in a handler behind requireRole. */
export function currentTeam(req: Request): NonNullable<Request['team']> {
  if (!req.team) throw new Error('currentTeam() used on a route without requireRole');
  return req.team;
}

type TeamLookup = (ctx: AppContext, id: string) => Promise<string | undefined>;

const lookups: Record<string, { lookup: TeamLookup; notFoundMessage: string }> = {
  projectId: {
    notFoundMessage: 'No such project.',
    lookup: async (ctx, id) =>
      (await ctx.db.select({ teamId: projects.teamId }).from(projects).where(eq(projects.id, id)))[0]?.teamId,
  },
  designId: {
    notFoundMessage: 'No such design.',
    lookup: async (ctx, id) =>
      (await ctx.db.select({ teamId: designs.teamId }).from(designs).where(eq(designs.id, id)))[0]?.teamId,
  },
  revisionId: {
    notFoundMessage: 'No such revision.',
    lookup: async (ctx, id) =>
      (await ctx.db.select({ teamId: revisions.teamId }).from(revisions).where(eq(revisions.id, id)))[0]?.teamId,
  },
  reviewId: {
    notFoundMessage: 'No such review.',
    lookup: async (ctx, id) =>
      (await ctx.db.select({ teamId: reviews.teamId }).from(reviews).where(eq(reviews.id, id)))[0]?.teamId,
  },
  invitationId: {
    notFoundMessage: 'No such invitation.',
    lookup: async (ctx, id) =>
      (await ctx.db.select({ teamId: invitations.teamId }).from(invitations).where(eq(invitations.id, id)))[0]?.teamId,
  },
};

/**
 * Registers the resource parameters on a router: each route naming :designId (etc.) first finds the
 * resource's team, so that requireRole judges the user's role in that team. Unknown ids, malformed
 * ids and other teams' ids all end in the same 404 (requireRole gives it for other teams).
 */
export function bindResourceParams(router: Router, ctx: AppContext): void {
  for (const [param, { lookup, notFoundMessage }] of Object.entries(lookups)) {
    router.param(param, async (req, _res, next, value: unknown) => {
      try {
        if (!req.auth) return next(unauthorized());
        if (!isUuid(value)) return next(notFound(notFoundMessage));
        const teamId = await lookup(ctx, value);
        if (!teamId) return next(notFound(notFoundMessage));
        req.resource = { type: param.replace(/Id$/, ''), id: value, teamId, notFoundMessage };
        next();
      } catch (error) {
        next(error);
      }
    });
  }
}

/** A route parameter requireRole has already vetted. */
export function resourceId(req: Request): string {
  if (!req.resource) throw new Error('resourceId() used on a route without a resource parameter');
  return req.resource.id;
}
