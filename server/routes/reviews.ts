import { Router } from 'express';
import {
  addCommentRequestSchema,
  approveRequestSchema,
  listReviewsQuerySchema,
  requestChangesRequestSchema,
} from '../../lib/contracts/reviews';
import { ALL_ROLES, actor, bindResourceParams, currentTeam, requireRole, resourceId } from '../auth/middleware';
import type { AppContext } from '../context';
import { auditFrom } from '../services/audit';
import { addComment, decideReview, getReview, listReviews } from '../services/reviews';

export function reviewsRouter(ctx: AppContext): Router {
  const router = Router();
  bindResourceParams(router, ctx);

  router.get('/reviews', requireRole(...ALL_ROLES), async (req, res) => {
    res.json(await listReviews(ctx, currentTeam(req).id, actor(req).id, listReviewsQuerySchema.parse(req.query)));
  });

  router.get('/reviews/:reviewId', requireRole(...ALL_ROLES), async (req, res) => {
    res.json(await getReview(ctx, currentTeam(req).id, resourceId(req), { id: actor(req).id, role: currentTeam(req).role }));
  });

  router.post('/reviews/:reviewId/comments', requireRole('engineer', 'reviewer'), async (req, res) => {
    const body = addCommentRequestSchema.parse(req.body);
    res.status(201).json(await addComment(ctx, currentTeam(req).id, resourceId(req), { ...actor(req) }, body, auditFrom(req)));
  });

  router.post('/reviews/:reviewId/approve', requireRole('reviewer'), async (req, res) => {
    const { comment } = approveRequestSchema.parse(req.body ?? {});
    res.json(
      await decideReview(ctx, currentTeam(req).id, resourceId(req), { ...actor(req) }, 'approved', comment, auditFrom(req)),
    );
  });

  router.post('/reviews/:reviewId/request-changes', requireRole('reviewer'), async (req, res) => {
    const { reason } = requestChangesRequestSchema.parse(req.body);
    res.json(
      await decideReview(
        ctx,
        currentTeam(req).id,
        resourceId(req),
        { ...actor(req) },
        'changes-requested',
        reason,
        auditFrom(req),
      ),
    );
  });

  return router;
}
