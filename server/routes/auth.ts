// Sign-in, sign-out, refresh, sign-up and password change. Sign-in is rate-limited per client
// address (every attempt) and per account (failed attempts).
import { Router, type Request, type Response } from 'express';
import { eq } from 'drizzle-orm';
import { changePasswordRequestSchema, signInRequestSchema, signUpRequestSchema } from '../../lib/contracts/auth';
import { REFRESH_COOKIE, TEAM_HEADER } from '../../lib/contracts/common';
import { sessions, users } from '../../db/schema';
import { clearSessionCookies, setSessionCookies } from '../auth/cookies';
import { actor, loadAuthState, requireSignedIn } from '../auth/middleware';
import { hashPassword, verifyPassword } from '../auth/passwords';
import type { FixedWindowLimiter } from '../auth/rateLimit';
import { revokeFamily, revokeUserSessions, rotateSession } from '../auth/sessions';
import type { AppContext } from '../context';
import { HttpError, unauthorized } from '../errors';
import { checkPassword, findUserByEmail, meResponse, signUp, startSession } from '../services/accounts';
import { recordAudit } from '../services/audit';
import { sha256Hex } from '../services/canonical';

function refuseIfLimited(res: Response, limiter: FixedWindowLimiter, key: string, what: string): void {
  const waitMs = limiter.blockedFor(key);
  if (waitMs <= 0) return;
  const seconds = Math.ceil(waitMs / 1000);
  res.setHeader('Retry-After', String(seconds));
  const minutes = Math.ceil(seconds / 60);
  throw new HttpError(429, 'rate_limited', `Too many ${what}. Try again in ${minutes} minute${minutes === 1 ? '' : 's'}.`);
}

const clientKey = (req: Request) => req.ip ?? 'unknown';

export function authRouter(ctx: AppContext): Router {
  const router = Router();

  router.post('/auth/sign-in', async (req, res) => {
    refuseIfLimited(res, ctx.limiters.signInIp, clientKey(req), 'sign-in attempts from this address');
    ctx.limiters.signInIp.hit(clientKey(req));
    const body = signInRequestSchema.parse(req.body);
    const account = body.email.toLowerCase();
    refuseIfLimited(res, ctx.limiters.signInAccount, account, 'failed sign-ins for this account');
    const user = await findUserByEmail(ctx, body.email);
    if (!(await checkPassword(user, body.password))) {
      ctx.limiters.signInAccount.hit(account);
      await recordAudit(ctx.db, {
        action: 'auth.sign-in-failed',
        actor: user ? { id: user.id, email: user.email } : null,
        details: { email: account, reason: user ? 'wrong password' : 'unknown address' },
        ip: req.ip,
      });
      throw new HttpError(401, 'invalid_credentials', 'That e-mail address and password do not match an account.');
    }
    ctx.limiters.signInAccount.reset(account);
    const me = await startSession(ctx, req, res, user!.id);
    await recordAudit(ctx.db, { action: 'auth.sign-in', actor: { id: user!.id, email: user!.email }, ip: req.ip });
    res.json(me);
  });

  router.post('/auth/sign-out', async (req, res) => {
    const refresh: unknown = req.cookies?.[REFRESH_COOKIE];
    if (typeof refresh === 'string' && refresh) {
      const [row] = await ctx.db
        .select({ familyId: sessions.familyId })
        .from(sessions)
        .where(eq(sessions.tokenHash, sha256Hex(refresh)));
      if (row) await revokeFamily(ctx.db, row.familyId, 'signed-out');
    }
    if (req.auth) {
      await revokeFamily(ctx.db, req.auth.familyId, 'signed-out');
      await recordAudit(ctx.db, {
        action: 'auth.sign-out',
        actor: { id: req.auth.user.id, email: req.auth.user.email },
        ip: req.ip,
      });
    }
    clearSessionCookies(ctx, res);
    res.status(204).end();
  });

  router.post('/auth/refresh', async (req, res) => {
    const token: unknown = req.cookies?.[REFRESH_COOKIE];
    const outcome =
      typeof token === 'string' && token
        ? await rotateSession(ctx.db, token, ctx.refreshTtlSeconds, { userAgent: req.get('user-agent'), ip: req.ip })
        : null;
    const auth = outcome?.ok ? await loadAuthState(ctx, outcome.userId, outcome.session.familyId) : null;
    if (!outcome?.ok || !auth) {
      clearSessionCookies(ctx, res);
      throw unauthorized('Your session has ended. Sign in again.');
    }
    const access = await ctx.tokens.issue({ userId: outcome.userId, familyId: outcome.session.familyId });
    setSessionCookies(ctx, res, access, outcome.session);
    res.json(meResponse(auth, req.get(TEAM_HEADER), access.expiresAt));
  });

  router.post('/auth/sign-up', async (req, res) => {
    refuseIfLimited(res, ctx.limiters.signUpIp, clientKey(req), 'sign-ups from this address');
    ctx.limiters.signUpIp.hit(clientKey(req));
    const body = signUpRequestSchema.parse(req.body);
    const userId = await signUp(ctx, body, req.ip ?? null);
    res.status(201).json(await startSession(ctx, req, res, userId));
  });

  router.post('/auth/password', requireSignedIn, async (req, res) => {
    const me = actor(req);
    const body = changePasswordRequestSchema.parse(req.body);
    const account = me.email.toLowerCase();
    refuseIfLimited(res, ctx.limiters.signInAccount, account, 'failed password checks for this account');
    const [user] = await ctx.db.select().from(users).where(eq(users.id, me.id));
    if (!user || !(await verifyPassword(user.passwordHash, body.currentPassword))) {
      ctx.limiters.signInAccount.hit(account);
      throw new HttpError(422, 'invalid_credentials', 'The current password is not right.', [
        { path: 'currentPassword', message: 'This is not your current password.' },
      ]);
    }
    const passwordHash = await hashPassword(body.newPassword);
    await ctx.db.update(users).set({ passwordHash }).where(eq(users.id, me.id));
    // Other browsers signed in with the old password are signed out; this one stays.
    await revokeUserSessions(ctx.db, me.id, 'password-changed', req.auth!.familyId);
    await recordAudit(ctx.db, { action: 'auth.password-changed', actor: { id: me.id, email: me.email }, ip: req.ip });
    res.status(204).end();
  });

  return router;
}
