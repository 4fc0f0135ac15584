// The admin's views of the current team: its mail outbox and its audit log (the team's rows, plus
// the team-less rows — sign-in, sign-out, password — of its members).
import { and, desc, eq, gte, inArray, isNull, lte, or, sql } from 'drizzle-orm';
import type { z } from 'zod';
import { auditLog, mailOutbox, memberships } from '../../db/schema';
import type { Page } from '../../lib/contracts/common';
import type { AuditEntry, listAuditQuerySchema, listMailQuerySchema, MailMessage } from '../../lib/contracts/team';
import { isUuid } from '../auth/middleware';
import type { AppContext } from '../context';
import { afterCursor, afterSerialCursor, toPage } from './pagination';
import { auditItem, mailItem } from './shape';

export async function listOutbox(
  ctx: AppContext,
  teamId: string,
  query: z.infer<typeof listMailQuerySchema>,
): Promise<Page<MailMessage>> {
  const rows = await ctx.db
    .select()
    .from(mailOutbox)
    .where(
      and(
        eq(mailOutbox.teamId, teamId),
        query.status ? eq(mailOutbox.status, query.status) : undefined,
        afterCursor(query.cursor, mailOutbox.createdAt, mailOutbox.id),
      ),
    )
    .orderBy(desc(mailOutbox.createdAt), desc(mailOutbox.id))
    .limit(query.limit + 1);
  return toPage(rows, query.limit, (r) => [r.createdAt.toISOString(), r.id], mailItem);
}

/** Mail addressed to one person, in any team (GET /api/me/mail). */
export async function listMailTo(
  ctx: AppContext,
  email: string,
  query: z.infer<typeof listMailQuerySchema>,
): Promise<Page<MailMessage>> {
  const rows = await ctx.db
    .select()
    .from(mailOutbox)
    .where(
      and(
        sql`lower(${mailOutbox.toAddress}) = lower(${email})`,
        query.status ? eq(mailOutbox.status, query.status) : undefined,
        afterCursor(query.cursor, mailOutbox.createdAt, mailOutbox.id),
      ),
    )
    .orderBy(desc(mailOutbox.createdAt), desc(mailOutbox.id))
    .limit(query.limit + 1);
  return toPage(rows, query.limit, (r) => [r.createdAt.toISOString(), r.id], mailItem);
}

/** `review.*` matches every review action; anything else matches exactly. */
function actionFilter(action: string | undefined) {
  if (!action) return undefined;
  if (!action.endsWith('*')) return eq(auditLog.action, action);
  const prefix = action.slice(0, -1).replace(/[\\%_]/g, (c) => `\\${c}`);
  return sql`${auditLog.action} like ${`${prefix}%`}`;
}

export async function listAudit(
  ctx: AppContext,
  teamId: string,
  query: z.infer<typeof listAuditQuerySchema>,
): Promise<Page<AuditEntry>> {
  const members = ctx.db.select({ id: memberships.userId }).from(memberships).where(eq(memberships.teamId, teamId));
  const actor = query.actor
    ? isUuid(query.actor)
      ? eq(auditLog.actorId, query.actor)
      : sql`lower(${auditLog.actorEmail}) = lower(${query.actor})`
    : undefined;
  const rows = await ctx.db
    .select()
    .from(auditLog)
    .where(
      and(
        or(eq(auditLog.teamId, teamId), and(isNull(auditLog.teamId), inArray(auditLog.actorId, members))),
        actionFilter(query.action),
        actor,
        query.from ? gte(auditLog.createdAt, new Date(query.from)) : undefined,
        query.to ? lte(auditLog.createdAt, new Date(query.to)) : undefined,
        afterSerialCursor(query.cursor, auditLog.id),
      ),
    )
    .orderBy(desc(auditLog.id))
    .limit(query.limit + 1);
  return toPage(rows, query.limit, (r) => [r.id], auditItem);
}
