// HTTP hardening for the API and the web app (issue 10): a rate limit on the analysis endpoints, a
// request timeout, CORS closed unless origins are listed, and the web app's security headers.
// Every refusal uses the common error shape { error: { code, message } }.
import type { RequestHandler } from 'express';
import helmet from 'helmet';
import { FixedWindowLimiter, type RateLimitRule } from '../auth/rateLimit';

/** Analyses per signed-in user (or client address) and window. Default 600 per minute (a live preview debounced to 100 ms stays under it). */
export const defaultAnalysisRateLimit: RateLimitRule = { limit: 600, windowMs: 60_000 };
/** A request that has not answered within this many milliseconds gets a 503. Default 30 s. */
export const defaultRequestTimeoutMs = 30_000;

/** Limits POST requests to the analysis endpoints it is mounted on. */
export function analysisRateLimit(rule: RateLimitRule): RequestHandler {
  const limiter = new FixedWindowLimiter(rule);
  return (req, res, next) => {
    if (req.method !== 'POST') return next();
    const key = req.auth?.user.id ?? `ip:${req.ip}`;
    const wait = limiter.blockedFor(key);
    if (wait > 0) {
      res.setHeader('Retry-After', String(Math.ceil(wait / 1000)));
      res.status(429).json({
        error: { code: 'rate_limited', message: `Too many analyses; try again in ${Math.ceil(wait / 1000)} s.` },
      });
      return;
    }
    limiter.hit(key);
    next();
  };
}

/**
 * Answers 503 when a request has not been answered in `ms`. The engine runs synchronously, so the
 * timer fires once the event loop is free again; the late handler's answer is then dropped.
 */
export function requestTimeout(ms: number): RequestHandler {
  return (_req, res, next) => {
    const timer = setTimeout(() => {
      if (res.headersSent) return;
      res.status(503).json({ error: { code: 'timeout', message: `The server did not finish within ${Math.round(ms / 1000)} s. Try again.` } });
    }, ms);
    timer.unref();
    const clear = () => clearTimeout(timer);
    res.once('finish', clear);
    res.once('close', clear);
    next();
  };
}

/** CORS, closed by default: only origins listed (CORS_ORIGINS, comma-separated) get the headers. */
export function cors(origins: readonly string[]): RequestHandler {
  const allowed = new Set(origins.map((o) => o.trim().replace(/\/+$/, '')).filter(Boolean));
  return (req, res, next) => {
    const origin = req.headers.origin;
    if (!origin || !allowed.has(origin)) return next();
    res.setHeader('Access-Control-Allow-Origin', origin);
    res.setHeader('Access-Control-Allow-Credentials', 'true');
    res.append('Vary', 'Origin');
    if (req.method === 'OPTIONS') {
      res.setHeader('Access-Control-Allow-Methods', 'GET, POST, PATCH, PUT, DELETE');
      res.setHeader('Access-Control-Allow-Headers', 'Content-Type, X-Team-Id');
      res.setHeader('Access-Control-Max-Age', '600');
      res.status(204).end();
      return;
    }
    next();
  };
}

/** Reads CORS_ORIGINS ("https://a.example, https://b.example"); unset means none. */
export function corsOriginsFromEnv(env: NodeJS.ProcessEnv = process.env): string[] {
  return (env.CORS_ORIGINS ?? '').split(',').map((o) => o.trim()).filter(Boolean);
}

/**
 * Security headers for the exported web app. The Expo web export loads its bundle from /_expo as
 * an external script (no inline scripts); react-native-web injects <style> elements, and fonts and
 * images may be data: URLs.
 */
export const webHelmet = () =>
  helmet({
    contentSecurityPolicy: {
      directives: {
        defaultSrc: ["'self'"],
        scriptSrc: ["'self'"],
        styleSrc: ["'self'", "'unsafe-inline'"],
        imgSrc: ["'self'", 'data:', 'blob:'],
        fontSrc: ["'self'", 'data:'],
        connectSrc: ["'self'"],
        objectSrc: ["'none'"],
        baseUri: ["'self'"],
        frameAncestors: ["'none'"],
        formAction: ["'self'"],
      },
    },
  });
