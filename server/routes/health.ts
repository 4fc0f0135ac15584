import { Router } from 'express';
import { pingDatabase, type DatabaseHandle } from '../../db/client';
import { APP_VERSION } from '../version';

export function healthRouter(database: DatabaseHandle, startedAt: number): Router {
  const router = Router();
  router.get('/health', async (_req, res) => {
    const ok = await pingDatabase(database);
    res.status(ok ? 200 : 503).json({
      status: ok ? 'ok' : 'degraded',
      version: APP_VERSION,
      database: ok ? 'ok' : 'unavailable',
      databaseKind: database.kind === 'server' ? 'postgresql-server' : database.dataDir ? 'pglite-disk' : 'pglite-memory',
      uptimeSeconds: Math.round((Date.now() - startedAt) / 100) / 10,
    });
  });
  return router;
}
