// Refresh sessions. The refresh token is 32 random bytes; only its SHA-256 is stored. Using it
// rotates it: the row is revoked ('rotated') and a new row joins the same family. Presenting a
// rotated token again (after a short grace for two tabs refreshing at once) is taken as theft and
// revokes the whole family.
import { randomBytes, randomUUID } from 'node:crypto';
import { and, eq, isNull, ne } from 'drizzle-orm';
import type { Database } from '../../db/client';
import { sessions } from '../../db/schema';
import { sha256Hex } from '../services/canonical';

const REUSE_GRACE_MS = 30_000;

export interface SessionMeta {
  userAgent?: string | null;
  ip?: string | null;
}

export interface IssuedSession {
  refreshToken: string;
  familyId: string;
  expiresAt: Date;
}

export async function createSession(
  db: Database,
  userId: string,
  ttlSeconds: number,
  meta: SessionMeta,
  familyId: string = randomUUID(),
): Promise<IssuedSession> {
  const refreshToken = randomBytes(32).toString('base64url');
  const expiresAt = new Date(Date.now() + ttlSeconds * 1000);
  await db.insert(sessions).values({
    familyId,
    userId,
    tokenHash: sha256Hex(refreshToken),
    expiresAt,
    userAgent: meta.userAgent?.slice(0, 300) ?? null,
    ip: meta.ip ?? null,
  });
  return { refreshToken, familyId, expiresAt };
}

export type RotateOutcome =
  { ok: true; userId: string; session: IssuedSession } | { ok: false; reason: 'unknown' | 'expired' | 'revoked' | 'reused' };

export async function rotateSession(
  db: Database,
  refreshToken: string,
  ttlSeconds: number,
  meta: SessionMeta,
): Promise<RotateOutcome> {
  const [row] = await db
    .select()
    .from(sessions)
    .where(eq(sessions.tokenHash, sha256Hex(refreshToken)));
  if (!row) return { ok: false, reason: 'unknown' };
  if (row.revokedAt) {
    const recentlyRotated = row.revokedReason === 'rotated' && Date.now() - row.revokedAt.getTime() < REUSE_GRACE_MS;
    if (row.revokedReason === 'rotated' && !recentlyRotated) {
      await revokeFamily(db, row.familyId, 'reuse-detected');
      return { ok: false, reason: 'reused' };
    }
    return { ok: false, reason: 'revoked' };
  }
  if (row.expiresAt.getTime() <= Date.now()) return { ok: false, reason: 'expired' };
  const revoked = await db
    .update(sessions)
    .set({ revokedAt: new Date(), revokedReason: 'rotated' })
    .where(and(eq(sessions.id, row.id), isNull(sessions.revokedAt)))
    .returning({ id: sessions.id });
  // Another request rotated it between our read and our write.
  if (revoked.length === 0) return { ok: false, reason: 'revoked' };
  const session = await createSession(db, row.userId, ttlSeconds, meta, row.familyId);
  return { ok: true, userId: row.userId, session };
}

export async function revokeFamily(db: Database, familyId: string, reason: string): Promise<void> {
  await db
    .update(sessions)
    .set({ revokedAt: new Date(), revokedReason: reason })
    .where(and(eq(sessions.familyId, familyId), isNull(sessions.revokedAt)));
}

/** Ends every session of a user except, optionally, the one in use (after a password change). */
export async function revokeUserSessions(db: Database, userId: string, reason: string, keepFamilyId?: string): Promise<void> {
  const conditions = [eq(sessions.userId, userId), isNull(sessions.revokedAt)];
  if (keepFamilyId) conditions.push(ne(sessions.familyId, keepFamilyId));
  await db
    .update(sessions)
    .set({ revokedAt: new Date(), revokedReason: reason })
    .where(and(...conditions));
}
