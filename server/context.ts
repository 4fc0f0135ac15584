// What every router and service receives: the database, the mailer, the token service and the
// settings createApp was given. Built once per app.
import type { Database, DatabaseHandle } from '../db/client';
import type { Role } from '../db/schema';
import type { FixedWindowLimiter, RateLimitRule } from './auth/rateLimit';
import type { TokenService } from './auth/tokens';
import type { Mailer } from './mail/mailer';

export interface RateLimits {
  /** Sign-in attempts per client address (every attempt counts). Default 30 per 15 minutes. */
  signInPerIp: RateLimitRule;
  /** Failed sign-ins per account (e-mail address). Default 10 per 15 minutes. */
  signInPerAccount: RateLimitRule;
  /** Sign-ups and invitation look-ups per client address. Default 30 per 15 minutes. */
  signUpPerIp: RateLimitRule;
}

export interface AppContext {
  database: DatabaseHandle;
  db: Database;
  mailer: Mailer;
  tokens: TokenService;
  publicUrl: string;
  secureCookies: boolean;
  refreshTtlSeconds: number;
  invitationTtlSeconds: number;
  /** Where bench capture files are kept, one file per SHA-256. */
  uploadsDir: string;
  limiters: {
    signInIp: FixedWindowLimiter;
    signInAccount: FixedWindowLimiter;
    signUpIp: FixedWindowLimiter;
  };
  log: (message: string, error?: unknown) => void;
}

export interface TeamMembershipState {
  teamId: string;
  teamName: string;
  role: Role;
}

export interface AuthState {
  user: { id: string; email: string; name: string };
  familyId: string;
  /** Oldest first: the first is the default current team. */
  memberships: TeamMembershipState[];
}

declare global {
  namespace Express {
    interface Request {
      /** Set by authenticate when a valid access token came with the request. */
      auth?: AuthState;
      /** Set by a resource parameter (designId, revisionId, …): the team the resource belongs to. */
      resource?: { type: string; id: string; teamId: string; notFoundMessage: string };
      /** Set by requireRole: the team the request acts on and the user's role in it. */
      team?: { id: string; name: string; role: Role };
    }
  }
}
