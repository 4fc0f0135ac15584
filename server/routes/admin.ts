// Admins' views of the current team: the mail outbox and the audit log.
import { Router } from 'express';
import { listAuditQuerySchema, listMailQuerySchema } from '../../lib/contracts/team';
import { currentTeam, requireRole } from '../auth/middleware';
import type { AppContext } from '../context';
import { listAudit, listOutbox } from '../services/admin';

export function adminRouter(ctx: AppContext): Router {
  const router = Router();

  router.get('/admin/outbox', requireRole('admin'), async (req, res) => {
    res.json(await listOutbox(ctx, currentTeam(req).id, listMailQuerySchema.parse(req.query)));
  });

  router.get('/admin/audit', requireRole('admin'), async (req, res) => {
    res.json(await listAudit(ctx, currentTeam(req).id, listAuditQuerySchema.parse(req.query)));
  });

  return router;
}
