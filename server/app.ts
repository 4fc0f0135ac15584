// Builds the Express application without listening, so that tests drive it through supertest and
// server/index.ts serves it.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import express, { type Express } from 'express';
import cookieParser from 'cookie-parser';
import helmet from 'helmet';
import type { DatabaseHandle } from '../db/client';
import { authenticate } from './auth/middleware';
import { FixedWindowLimiter, type RateLimitRule } from './auth/rateLimit';
import { randomJwtSecret } from './auth/secret';
import { createTokenService } from './auth/tokens';
import type { AppContext, RateLimits } from './context';
import { apiNotFound, errorHandler } from './errors';
import { createRecordingMailer, type Mailer } from './mail/mailer';
import { analysisJobRunner } from './services/analyses';
import { startJobWorker } from './services/jobs';
import { adminRouter } from './routes/admin';
import { analysesRouter } from './routes/analyses';
import { benchRouter } from './routes/bench';
import { authRouter } from './routes/auth';
import { computeRouter } from './routes/compute';
import { designsRouter } from './routes/designs';
import { healthRouter } from './routes/health';
import { invitationsRouter } from './routes/invitations';
import { meRouter } from './routes/me';
import { projectsRouter } from './routes/projects';
import { reviewsRouter } from './routes/reviews';
import { revisionsRouter } from './routes/revisions';
import { teamRouter } from './routes/team';
import {
  analysisRateLimit,
  cors,
  corsOriginsFromEnv,
  defaultAnalysisRateLimit,
  defaultRequestTimeoutMs,
  requestTimeout,
  webHelmet,
} from './http/hardening';

export interface AppOptions {
  database: DatabaseHandle;
  /** Exported web build to serve with an SPA fallback; null serves the API only. */
  webDir?: string | null;
  log?: (message: string, error?: unknown) => void;
  /** HS256 key, at least 32 bytes. Default: a random secret (sessions end with the process). */
  jwtSecret?: string | Uint8Array;
  /** Outgoing mail. Default: messages are recorded in the outbox and delivered nowhere. */
  mailer?: Mailer;
  /** The address people open the app at, for links in e-mail. Default http://localhost:8080. */
  publicUrl?: string;
  /** Send cookies with Secure. Default: true when publicUrl is https. */
  secureCookies?: boolean;
  /** Lifetime of an access token. Default 900 s (15 minutes). */
  accessTokenTtlSeconds?: number;
  /** Lifetime of a refresh token (renewed on each refresh). Default 14 days. */
  refreshTokenTtlSeconds?: number;
  /** Lifetime of an invitation link. Default 7 days. */
  invitationTtlSeconds?: number;
  /** Override any of the rate limits (tests trip them with small numbers). */
  rateLimits?: Partial<RateLimits>;
  /** DATA_DIR; uploads go under <dataDir>/uploads unless uploadsDir says otherwise. */
  dataDir?: string;
  /** Bench capture files. Default <dataDir>/uploads, or a fresh temp dir without a dataDir (tests). */
  uploadsDir?: string;
  /** POST /api/check, /api/precharge/size and /api/revisions/:id/analyses per user; null: no limit. */
  analysisRateLimit?: RateLimitRule | null;
  /** Answer 503 after this many milliseconds. Default 30 s. */
  requestTimeoutMs?: number;
  /** Origins allowed to call the API from a browser (CORS). Default: CORS_ORIGINS, else none. */
  corsOrigins?: string[];
  /** Run a background-analysis worker in this process. Default true (JOB_WORKER=false turns it off). */
  jobWorker?: boolean;
}

const FIFTEEN_MINUTES = 15 * 60 * 1000;
export const defaultRateLimits: RateLimits = {
  signInPerIp: { limit: 30, windowMs: FIFTEEN_MINUTES },
  signInPerAccount: { limit: 10, windowMs: FIFTEEN_MINUTES },
  signUpPerIp: { limit: 30, windowMs: FIFTEEN_MINUTES },
};

/** The context routers and services share; createApp builds one, the seed can build its own. */
export function createAppContext(options: AppOptions): AppContext {
  const log = options.log ?? ((message: string, error?: unknown) => console.error(`[ringwell] ${message}`, error ?? ''));
  const publicUrl = (options.publicUrl ?? 'http://localhost:8080').replace(/\/+$/, '');
  const limits = { ...defaultRateLimits, ...options.rateLimits };
  const limiter = (rule: RateLimitRule) => new FixedWindowLimiter(rule);
  const ctx: AppContext = {
    database: options.database,
    db: options.database.db,
    mailer: options.mailer ?? createRecordingMailer(options.database.db),
    tokens: createTokenService(options.jwtSecret ?? randomJwtSecret(), options.accessTokenTtlSeconds ?? 900),
    publicUrl,
    secureCookies: options.secureCookies ?? publicUrl.startsWith('https:'),
    refreshTtlSeconds: options.refreshTokenTtlSeconds ?? 14 * 24 * 3600,
    invitationTtlSeconds: options.invitationTtlSeconds ?? 7 * 24 * 3600,
    uploadsDir:
      options.uploadsDir ??
      (options.dataDir ? path.join(options.dataDir, 'uploads') : fs.mkdtempSync(path.join(os.tmpdir(), 'ringwell-uploads-'))),
    limiters: {
      signInIp: limiter(limits.signInPerIp),
      signInAccount: limiter(limits.signInPerAccount),
      signUpIp: limiter(limits.signUpPerIp),
    },
    log,
  };
  return ctx;
}

export function createApp(options: AppOptions): Express {
  const startedAt = Date.now();
  const ctx = createAppContext(options);
  if (options.jobWorker ?? process.env.JOB_WORKER !== 'false')
    startJobWorker({ database: options.database, runner: analysisJobRunner(ctx), log: ctx.log });
  const app = express();
  app.disable('x-powered-by');
  app.set('trust proxy', 'loopback');

  const api = express.Router();
  // The API sends JSON, PDFs and CSV only; a strict policy costs nothing here.
  api.use(helmet({ contentSecurityPolicy: { directives: { defaultSrc: ["'none'"], frameAncestors: ["'none'"] } } }));
  api.use((_req, res, next) => {
    res.setHeader('Cache-Control', 'no-store');
    next();
  });
  api.use(cors(options.corsOrigins ?? corsOriginsFromEnv()));
  api.use(requestTimeout(options.requestTimeoutMs ?? defaultRequestTimeoutMs));
  api.use(express.json({ limit: '1mb' }));
  api.use(cookieParser());
  api.use(healthRouter(options.database, startedAt));
  api.use(authenticate(ctx));
  const analysisLimit = options.analysisRateLimit === undefined ? defaultAnalysisRateLimit : options.analysisRateLimit;
  if (analysisLimit) api.use(['/check', '/precharge/size', '/revisions/:revisionId/analyses'], analysisRateLimit(analysisLimit));
  api.use(authRouter(ctx));
  api.use(meRouter(ctx));
  api.use(invitationsRouter(ctx));
  api.use(teamRouter(ctx));
  api.use(adminRouter(ctx));
  api.use(projectsRouter(ctx));
  api.use(designsRouter(ctx));
  api.use(revisionsRouter(ctx));
  api.use(reviewsRouter(ctx));
  api.use(computeRouter(ctx));
  api.use(analysesRouter(ctx));
  api.use(benchRouter(ctx));
  api.use(apiNotFound);
  app.use('/api', api);

  const webDir = options.webDir;
  if (webDir && fs.existsSync(path.join(webDir, 'index.html'))) {
    app.use(webHelmet());
    app.use(express.static(webDir, { index: false, maxAge: '1h' }));
    // Client-side routes (deep links) all get the app's single page.
    app.get('/{*splat}', (_req, res) => {
      res.setHeader('Cache-Control', 'no-cache');
      res.sendFile(path.join(webDir, 'index.html'));
    });
  }

  app.use(errorHandler(ctx.log));
  return app;
}
