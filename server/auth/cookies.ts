// The two session cookies. Both httpOnly and SameSite=Lax; the refresh cookie is only sent to
// /api/auth, where it is used.
import type { Response } from 'express';
import { ACCESS_COOKIE, REFRESH_COOKIE } from '../../lib/contracts/common';
import type { AppContext } from '../context';

const REFRESH_PATH = '/api/auth';

export function setSessionCookies(
  ctx: AppContext,
  res: Response,
  access: { token: string; expiresAt: Date },
  refresh: { refreshToken: string; expiresAt: Date },
): void {
  const base = { httpOnly: true, sameSite: 'lax' as const, secure: ctx.secureCookies };
  res.cookie(ACCESS_COOKIE, access.token, { ...base, path: '/', expires: access.expiresAt });
  res.cookie(REFRESH_COOKIE, refresh.refreshToken, { ...base, path: REFRESH_PATH, expires: refresh.expiresAt });
}

export function clearSessionCookies(ctx: AppContext, res: Response): void {
  const base = { httpOnly: true, sameSite: 'lax' as const, secure: ctx.secureCookies };
  res.clearCookie(ACCESS_COOKIE, { ...base, path: '/' });
  res.clearCookie(REFRESH_COOKIE, { ...base, path: REFRESH_PATH });
}
