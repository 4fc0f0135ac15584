// The signed-in user: who they are, their teams, and the mail sent to them.
import { Router } from 'express';
import { TEAM_HEADER } from '../../lib/contracts/common';
import { listMailQuerySchema } from '../../lib/contracts/team';
import { actor, requireSignedIn } from '../auth/middleware';
import type { AppContext } from '../context';
import { meResponse } from '../services/accounts';
import { listMailTo } from '../services/admin';

export function meRouter(ctx: AppContext): Router {
  const router = Router();

  router.get('/me', requireSignedIn, (req, res) => {
    res.json(meResponse(req.auth!, req.get(TEAM_HEADER)));
  });

  router.get('/me/mail', requireSignedIn, async (req, res) => {
    res.json(await listMailTo(ctx, actor(req).email, listMailQuerySchema.parse(req.query)));
  });

  return router;
}
