// An invitation link, seen by the person invited: who invites them to which team, and accepting it
// from an account they already have (a new account accepts through POST /api/auth/sign-up).
import { Router } from 'express';
import { actor, loadAuthState, requireSignedIn } from '../auth/middleware';
import type { AppContext } from '../context';
import { HttpError } from '../errors';
import { findPendingInvitation, meResponse } from '../services/accounts';
import { acceptInvitation, invitationPreview } from '../services/team';

const gone = () => new HttpError(404, 'not_found', 'This invitation does not exist, was used, or has expired.');

export function invitationsRouter(ctx: AppContext): Router {
  const router = Router();

  router.get('/invitations/:token', async (req, res) => {
    const row = await findPendingInvitation(ctx, String(req.params.token));
    if (!row) throw gone();
    res.json(await invitationPreview(ctx, row));
  });

  router.post('/invitations/:token/accept', requireSignedIn, async (req, res) => {
    const row = await findPendingInvitation(ctx, String(req.params.token));
    if (!row) throw gone();
    await acceptInvitation(ctx, row, actor(req), req.ip ?? null);
    const auth = await loadAuthState(ctx, actor(req).id, req.auth!.familyId);
    res.json(meResponse(auth!, row.teamId));
  });

  return router;
}
