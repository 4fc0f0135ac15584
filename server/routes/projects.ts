import { Router } from 'express';
import { createProjectRequestSchema, listProjectsQuerySchema, updateProjectRequestSchema } from '../../lib/contracts/designs';
import { ALL_ROLES, actor, bindResourceParams, currentTeam, requireRole, resourceId } from '../auth/middleware';
import type { AppContext } from '../context';
import { auditFrom } from '../services/audit';
import { createProject, deleteProject, getProject, listProjects, updateProject } from '../services/projects';

export function projectsRouter(ctx: AppContext): Router {
  const router = Router();
  bindResourceParams(router, ctx);

  router.get('/projects', requireRole(...ALL_ROLES), async (req, res) => {
    res.json(await listProjects(ctx, currentTeam(req).id, listProjectsQuerySchema.parse(req.query)));
  });

  router.post('/projects', requireRole('engineer'), async (req, res) => {
    const body = createProjectRequestSchema.parse(req.body);
    res.status(201).json(await createProject(ctx, currentTeam(req).id, actor(req).id, body, auditFrom(req)));
  });

  router.get('/projects/:projectId', requireRole(...ALL_ROLES), async (req, res) => {
    res.json(await getProject(ctx, currentTeam(req).id, resourceId(req)));
  });

  router.patch('/projects/:projectId', requireRole('engineer'), async (req, res) => {
    const body = updateProjectRequestSchema.parse(req.body);
    res.json(await updateProject(ctx, currentTeam(req).id, resourceId(req), body, auditFrom(req)));
  });

  router.delete('/projects/:projectId', requireRole('engineer'), async (req, res) => {
    await deleteProject(ctx, currentTeam(req).id, resourceId(req), auditFrom(req));
    res.status(204).end();
  });

  return router;
}
