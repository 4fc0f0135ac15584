// Builds the Express application without listening, so that tests drive it through supertest and
// server/index.ts serves it.
import fs from 'node:fs';
import path from 'node:path';
import express, { type Express } from 'express';
import type { DatabaseHandle } from '../db/client';
import { apiNotFound, errorHandler } from './errors';
import { healthRouter } from './routes/health';

export interface AppOptions {
  database: DatabaseHandle;
  /** Exported web build to serve with an SPA fallback; null serves the API only. */
  webDir?: string | null;
  log?: (message: string, error?: unknown) => void;
}

export function createApp(options: AppOptions): Express {
  const startedAt = Date.now();
  const log = options.log ?? ((message: string, error?: unknown) => console.error(`[ringwell] ${message}`, error ?? ''));
  const app = express();
  app.disable('x-powered-by');
  app.set('trust proxy', 'loopback');

  const api = express.Router();
  api.use(express.json({ limit: '1mb' }));
  api.use(healthRouter(options.database, startedAt));
  api.use(apiNotFound);
  app.use('/api', api);

  const webDir = options.webDir;
  if (webDir && fs.existsSync(path.join(webDir, 'index.html'))) {
    app.use(express.static(webDir, { index: false, maxAge: '1h' }));
    // Client-side routes (deep links) all get the app's single page.
    app.get('/{*splat}', (_req, res) => {
      res.setHeader('Cache-Control', 'no-cache');
      res.sendFile(path.join(webDir, 'index.html'));
    });
  }

  app.use(errorHandler(log));
  return app;
}
