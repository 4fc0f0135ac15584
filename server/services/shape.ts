// Database rows → the JSON the contracts in lib/contracts describe. Dates become ISO strings; user
// references become { id, name, email } or null when the person's account is gone.
import { inArray } from 'drizzle-orm';
import type { Database } from '../../db/client';
import { users, type AuditRow, type MailOutboxRow } from '../../db/schema';
import type { UserSummary } from '../../lib/contracts/common';
import type { AuditEntry, MailMessage } from '../../lib/contracts/team';

export const iso = (date: Date) => date.toISOString();
export const isoOrNull = (date: Date | null) => (date ? date.toISOString() : null);

export type UserMap = Map<string, UserSummary>;

/** One query for every user a page of rows refers to. */
export async function loadUsers(db: Database, ids: (string | null | undefined)[]): Promise<UserMap> {
  const wanted = [...new Set(ids.filter((id): id is string => typeof id === 'string'))];
  if (wanted.length === 0) return new Map();
  const rows = await db
    .select({ id: users.id, name: users.name, email: users.email })
    .from(users)
    .where(inArray(users.id, wanted));
  return new Map(rows.map((u) => [u.id, u]));
}

export const userRef = (map: UserMap, id: string | null | undefined): UserSummary | null => (id ? (map.get(id) ?? null) : null);

export function mailItem(row: MailOutboxRow): MailMessage {
  return {
    id: row.id,
    to: row.toAddress,
    subject: row.subject,
    text: row.text,
    html: row.html,
    status: row.status,
    error: row.error,
    relatedType: row.relatedType,
    relatedId: row.relatedId,
    createdAt: iso(row.createdAt),
    sentAt: isoOrNull(row.sentAt),
    receivedAt: isoOrNull(row.receivedAt),
  };
}

export function auditItem(row: AuditRow): AuditEntry {
  return {
    id: row.id,
    teamId: row.teamId,
    actorId: row.actorId,
    actorEmail: row.actorEmail,
    action: row.action,
    entityType: row.entityType,
    entityId: row.entityId,
    details: row.details,
    ip: row.ip,
    createdAt: iso(row.createdAt),
  };
}
