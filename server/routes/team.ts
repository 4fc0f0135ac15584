// The current team (X-Team-Id or the first membership): members, roles, invitations, derating.
import { Router } from 'express';
import { eq } from 'drizzle-orm';
import { changeRoleRequestSchema, createInvitationRequestSchema, putDeratingRequestSchema } from '../../lib/contracts/team';
import { teams } from '../../db/schema';
import { ALL_ROLES, actor, bindResourceParams, currentTeam, isUuid, requireRole, resourceId } from '../auth/middleware';
import type { AppContext } from '../context';
import { notFound } from '../errors';
import { auditFrom } from '../services/audit';
import { getDerating, putDerating } from '../services/derating';
import { changeRole, createInvitation, listInvitations, listMembers, removeMember, revokeInvitation } from '../services/team';

const memberId = (value: unknown): string => {
  if (!isUuid(value)) throw notFound('No such member in this team.');
  return value;
};

export function teamRouter(ctx: AppContext): Router {
  const router = Router();
  bindResourceParams(router, ctx);

  router.get('/team/members', requireRole(...ALL_ROLES), async (req, res) => {
    res.json({ items: await listMembers(ctx, currentTeam(req).id) });
  });

  router.patch('/team/members/:userId', requireRole('admin'), async (req, res) => {
    const { role } = changeRoleRequestSchema.parse(req.body);
    res.json(await changeRole(ctx, currentTeam(req).id, memberId(req.params.userId), role, auditFrom(req)));
  });

  router.delete('/team/members/:userId', requireRole('admin'), async (req, res) => {
    await removeMember(ctx, currentTeam(req).id, memberId(req.params.userId), auditFrom(req));
    res.status(204).end();
  });

  router.get('/team/invitations', requireRole('admin'), async (req, res) => {
    res.json({ items: await listInvitations(ctx, currentTeam(req).id) });
  });

  router.post('/team/invitations', requireRole('admin'), async (req, res) => {
    const body = createInvitationRequestSchema.parse(req.body);
    res.status(201).json(await createInvitation(ctx, currentTeam(req), { ...actor(req) }, body, auditFrom(req)));
  });

  router.delete('/team/invitations/:invitationId', requireRole('admin'), async (req, res) => {
    await revokeInvitation(ctx, currentTeam(req).id, resourceId(req), auditFrom(req));
    res.status(204).end();
  });

  router.get('/team/derating', requireRole(...ALL_ROLES), async (req, res) => {
    const [team] = await ctx.db
      .select()
      .from(teams)
      .where(eq(teams.id, currentTeam(req).id));
    res.json(getDerating(team));
  });

  router.put('/team/derating', requireRole('admin'), async (req, res) => {
    const { policy } = putDeratingRequestSchema.parse(req.body);
    res.json(await putDerating(ctx, currentTeam(req).id, policy, auditFrom(req)));
  });

  return router;
}
