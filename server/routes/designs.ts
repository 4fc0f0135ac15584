import { Router } from 'express';
import {
  createDesignRequestSchema,
  createRevisionRequestSchema,
  listDesignsQuerySchema,
  listRevisionsQuerySchema,
  updateDesignRequestSchema,
} from '../../lib/contracts/designs';
import { ALL_ROLES, actor, bindResourceParams, currentTeam, requireRole, resourceId } from '../auth/middleware';
import type { AppContext } from '../context';
import { auditFrom } from '../services/audit';
import { createDesign, deleteDesign, getDesign, listDesigns, updateDesign } from '../services/designs';
import { listRevisions, saveRevision } from '../services/revisions';

export function designsRouter(ctx: AppContext): Router {
  const router = Router();
  bindResourceParams(router, ctx);

  router.get('/designs', requireRole(...ALL_ROLES), async (req, res) => {
    res.json(await listDesigns(ctx, currentTeam(req).id, listDesignsQuerySchema.parse(req.query)));
  });

  router.post('/designs', requireRole('engineer'), async (req, res) => {
    const body = createDesignRequestSchema.parse(req.body);
    res.status(201).json(await createDesign(ctx, currentTeam(req).id, actor(req).id, body, auditFrom(req)));
  });

  router.get('/designs/:designId', requireRole(...ALL_ROLES), async (req, res) => {
    res.json(await getDesign(ctx, currentTeam(req).id, resourceId(req)));
  });

  router.patch('/designs/:designId', requireRole('engineer'), async (req, res) => {
    const body = updateDesignRequestSchema.parse(req.body);
    res.json(await updateDesign(ctx, currentTeam(req).id, resourceId(req), body, auditFrom(req)));
  });

  router.delete('/designs/:designId', requireRole('engineer'), async (req, res) => {
    await deleteDesign(ctx, currentTeam(req).id, resourceId(req), auditFrom(req));
    res.status(204).end();
  });

  router.get('/designs/:designId/revisions', requireRole(...ALL_ROLES), async (req, res) => {
    res.json(await listRevisions(ctx, currentTeam(req).id, resourceId(req), listRevisionsQuerySchema.parse(req.query)));
  });

  router.post('/designs/:designId/revisions', requireRole('engineer'), async (req, res) => {
    const body = createRevisionRequestSchema.parse(req.body ?? {});
    res.status(201).json(await saveRevision(ctx, currentTeam(req).id, resourceId(req), actor(req).id, body, auditFrom(req)));
  });

  return router;
}
