// Analysis jobs (the background spread: poll and cancel) and the stateless stability and snubber
// computations the live editor calls with the draft design. Nothing stateless is stored.
import { Router } from 'express';
import { ALL_ROLES, currentTeam, requireRole } from '../auth/middleware';
import type { AppContext } from '../context';
import { HttpError } from '../errors';
import { teamPolicyOverrides } from '../services/derating';
import { snubberRequestSchema, stabilityRequestSchema, type SnubberRequest } from '../services/engine';
import { offload } from '../services/offload';
import { cancelJobView, getJobView } from '../services/analyses';

const notFound = () => new HttpError(404, 'not_found', 'No such analysis job in this team.');

export function analysesRouter(ctx: AppContext): Router {
  const router = Router();

  router.get('/analysis-jobs/:jobId', requireRole(...ALL_ROLES), async (req, res) => {
    const job = await getJobView(ctx, currentTeam(req).id, String(req.params.jobId));
    if (!job) throw notFound();
    res.json(job);
  });

  router.post('/analysis-jobs/:jobId/cancel', requireRole('engineer'), async (req, res) => {
    const job = await cancelJobView(ctx, currentTeam(req).id, String(req.params.jobId));
    if (!job) throw notFound();
    res.json(job);
  });

  router.post('/stability', requireRole(...ALL_ROLES), async (req, res) => {
    const body = stabilityRequestSchema.parse(req.body);
    res.json(await offload('runStability', body.design, body.options));
  });

  router.post('/snubber/propose', requireRole(...ALL_ROLES), async (req, res) => {
    const body = snubberRequestSchema.parse(req.body);
    res.json(
      await offload('runSnubber', body.design, body.options as unknown as SnubberRequest, await teamPolicyOverrides(ctx, currentTeam(req).id)),
    );
  });

  return router;
}
