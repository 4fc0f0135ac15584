// The audit log: append-only (the database refuses UPDATE and DELETE on it). Writers pass the
// transaction they are in, so that an action and its audit row commit together or not at all.
import type { Request } from 'express';
import type { Database } from '../../db/client';
import { auditLog } from '../../db/schema';
import type { AuditAction } from '../../lib/contracts/team';

type Writer = Pick<Database, 'insert'>;

export interface AuditEntry {
  action: AuditAction;
  teamId?: string | null;
  actor?: { id: string; email: string } | null;
  entity?: { type: string; id: string } | null;
  details?: Record<string, unknown>;
  ip?: string | null;
}

export async function recordAudit(db: Writer, entry: AuditEntry): Promise<void> {
  await db.insert(auditLog).values({
    action: entry.action,
    teamId: entry.teamId ?? null,
    actorId: entry.actor?.id ?? null,
    actorEmail: entry.actor?.email ?? null,
    entityType: entry.entity?.type ?? null,
    entityId: entry.entity?.id ?? null,
    details: entry.details ?? {},
    ip: entry.ip ?? null,
  });
}

/** The parts of a request an audit row records: who (if signed in), from where, in which team. */
export function auditFrom(req: Request): Pick<AuditEntry, 'actor' | 'ip' | 'teamId'> {
  return {
    actor: req.auth ? { id: req.auth.user.id, email: req.auth.user.email } : null,
    ip: req.ip ?? null,
    teamId: req.team?.id ?? null,
  };
}
