// Stateless computations: the live preview and the bench send a design and get the check back;
// nothing is stored. The current team's derating policy applies.
import { Router } from 'express';
import { checkRequestSchema, prechargeSizeRequestSchema } from '../../lib/contracts/designs';
import { ALL_ROLES, currentTeam, requireRole, requireSignedIn } from '../auth/middleware';
import type { AppContext } from '../context';
import { teamPolicyOverrides } from '../services/derating';
import {
  listPresets,
  mainsRequestSchema,
  parseMainsColdHotOptions,
  parseMainsSweepOptions,
  runCheck,
  storedOutcome,
} from '../services/engine';
import { offload } from '../services/offload';

export function computeRouter(ctx: AppContext): Router {
  const router = Router();

  router.get('/presets', requireSignedIn, (_req, res) => {
    res.json({ items: listPresets() });
  });

  router.post('/check', requireRole(...ALL_ROLES), async (req, res) => {
    const body = checkRequestSchema.parse(req.body);
    const check = runCheck(body.design, await teamPolicyOverrides(ctx, currentTeam(req).id), {
      points: body.points,
      fieldPrefix: 'design',
    });
    res.json({ ...storedOutcome(check), waveform: body.includeWaveform ? check.waveform : null, phases: check.phases });
  });

  router.post('/precharge/size', requireRole(...ALL_ROLES), async (req, res) => {
    const body = prechargeSizeRequestSchema.parse(req.body);
    res.json(await offload('sizePrechargeStateless', body, await teamPolicyOverrides(ctx, currentTeam(req).id)));
  });

  // Mains power-up screens (issue 9): the switch-on angle sweep and the NTC cold/hot comparison.
  router.post('/mains/sweep', requireRole(...ALL_ROLES), async (req, res) => {
    const body = mainsRequestSchema.parse(req.body);
    res.json(await offload('runMainsSweep', body.design, parseMainsSweepOptions(body.options)));
  });

  router.post('/mains/cold-hot', requireRole(...ALL_ROLES), async (req, res) => {
    const body = mainsRequestSchema.parse(req.body);
    const options = parseMainsColdHotOptions(body.options);
    res.json(await offload('runMainsColdHot', body.design, options, await teamPolicyOverrides(ctx, currentTeam(req).id)));
  });

  return router;
}
