// The review workflow. An engineer asks one or more reviewers to review the latest revision of a
// design; each reviewer's part is one review row. A reviewer approves (recording the revision hash
// and the checks exactly as approved) or requests changes with a reason. Nobody reviews a revision
// they wrote. Saving a newer revision supersedes open requests (services/revisions.ts).
import { randomUUID } from 'node:crypto';
import { and, asc, desc, eq, inArray } from 'drizzle-orm';
import {
  designs,
  memberships,
  projects,
  reviewComments,
  reviews,
  revisions,
  teams,
  users,
  type ReviewRow,
  type RevisionRow,
} from '../../db/schema';
import { checkStatusOrder, type Page } from '../../lib/contracts/common';
import type { CheckResult } from '../../lib/contracts/designs';
import type { z } from 'zod';
import type { listReviewsQuerySchema, ReviewDetail, ReviewSummary } from '../../lib/contracts/reviews';
import type { AppContext } from '../context';
import { conflict, HttpError, notFound } from '../errors';
import { commentAddedMail, reviewDecidedMail, reviewRequestedMail } from '../mail/messages';
import type { OutgoingMail } from '../mail/mailer';
import { recordAudit, type AuditEntry } from './audit';
import { refreshReviewState } from './designs';
import type { CheckOutcome } from './engine';
import { afterCursor, toPage } from './pagination';
import { iso, isoOrNull, loadUsers, userRef, type UserMap } from './shape';

type Actor = { id: string; email: string; name: string };
type AuditBase = Pick<AuditEntry, 'actor' | 'ip'>;

const selfReview = () =>
  new HttpError(403, 'self_review', 'Nobody approves or reviews their own revision. Ask another reviewer.');

export function sortChecksForReview<T extends { status: CheckResult['status'] }>(checks: T[]): T[] {
  // A stable sort keeps the engine's order within each status.
  return [...checks].sort((a, b) => checkStatusOrder[a.status] - checkStatusOrder[b.status]);
}

function counts(checks: { status: CheckResult['status'] }[]) {
  const out = { fail: 0, warn: 0, 'not-checked': 0, pass: 0 };
  for (const c of checks) out[c.status] += 1;
  return out;
}

interface ReviewContext {
  review: ReviewRow;
  revision: RevisionRow;
  designName: string;
  projectName: string;
  teamName: string;
}

async function loadReviewContext(ctx: AppContext, teamId: string, reviewId: string): Promise<ReviewContext> {
  const [row] = await ctx.db
    .select({ review: reviews, revision: revisions, designName: designs.name, projectName: projects.name, teamName: teams.name })
    .from(reviews)
    .innerJoin(revisions, eq(revisions.id, reviews.revisionId))
    .innerJoin(designs, eq(designs.id, reviews.designId))
    .innerJoin(projects, eq(projects.id, designs.projectId))
    .innerJoin(teams, eq(teams.id, reviews.teamId))
    .where(and(eq(reviews.id, reviewId), eq(reviews.teamId, teamId)));
  if (!row) throw notFound('No such review.');
  return row;
}

function shapeSummary(c: Omit<ReviewContext, 'teamName'>, people: UserMap): ReviewSummary {
  const { review, revision } = c;
  return {
    id: review.id,
    requestId: review.requestId,
    teamId: review.teamId,
    designId: review.designId,
    designName: c.designName,
    projectName: c.projectName,
    revisionId: review.revisionId,
    revisionSequence: revision.sequence,
    revisionSha256: revision.sha256,
    worstStatus: revision.worstStatus,
    requestedBy: userRef(people, review.requestedBy),
    reviewer: userRef(people, review.reviewerId),
    note: review.note,
    state: review.state,
    createdAt: iso(review.createdAt),
    decidedAt: isoOrNull(review.decidedAt),
    decisionReason: review.decisionReason,
  };
}

const reviewUrl = (ctx: AppContext, reviewId: string) => `${ctx.publicUrl}/reviews/${reviewId}`;
const revisionRef = (c: Pick<ReviewContext, 'designName' | 'projectName' | 'revision'>) => ({
  designName: c.designName,
  projectName: c.projectName,
  sequence: c.revision.sequence,
  sha256: c.revision.sha256,
});

export async function requestReview(
  ctx: AppContext,
  teamId: string,
  revisionId: string,
  requester: Actor,
  input: { reviewerIds: string[]; note: string },
  audit: AuditBase,
): Promise<ReviewSummary[]> {
  const [row] = await ctx.db
    .select({ revision: revisions, design: designs, projectName: projects.name, teamName: teams.name })
    .from(revisions)
    .innerJoin(designs, eq(designs.id, revisions.designId))
    .innerJoin(projects, eq(projects.id, designs.projectId))
    .innerJoin(teams, eq(teams.id, revisions.teamId))
    .where(and(eq(revisions.id, revisionId), eq(revisions.teamId, teamId)));
  if (!row) throw notFound('No such revision.');
  if (row.design.latestRevisionId !== row.revision.id) {
    throw conflict(`A newer revision of ${row.design.name} exists; request a review of the latest revision.`);
  }
  const members = await ctx.db
    .select({ userId: memberships.userId, role: memberships.role, name: users.name, email: users.email })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(and(eq(memberships.teamId, teamId), inArray(memberships.userId, input.reviewerIds)));
  const byId = new Map(members.map((m) => [m.userId, m]));
  const fields = input.reviewerIds.flatMap((id, index) => {
    const member = byId.get(id);
    if (id === row.revision.authorId || id === requester.id)
      return [{ path: `reviewerIds.${index}`, message: 'The author of a revision cannot review it.' }];
    if (!member) return [{ path: `reviewerIds.${index}`, message: 'Not a member of this team.' }];
    if (member.role !== 'reviewer')
      return [{ path: `reviewerIds.${index}`, message: `${member.name} is not a reviewer in this team.` }];
    return [];
  });
  if (fields.some((f) => f.message.startsWith('The author')))
    throw new HttpError(422, 'self_review', 'Nobody reviews their own revision. Choose another reviewer.', fields);
  if (fields.length > 0) throw new HttpError(422, 'invalid_reviewer', `${fields[0].path}: ${fields[0].message}`, fields);

  const requestId = randomUUID();
  const created = await ctx.db.transaction(async (tx) => {
    const open = await tx
      .select({ reviewerId: reviews.reviewerId })
      .from(reviews)
      .where(
        and(eq(reviews.revisionId, revisionId), eq(reviews.state, 'requested'), inArray(reviews.reviewerId, input.reviewerIds)),
      );
    if (open.length > 0) {
      const names = open.map((o) => byId.get(o.reviewerId)?.name).join(', ');
      throw conflict(`A review of this revision is already open with ${names}.`);
    }
    const rows = await tx
      .insert(reviews)
      .values(
        input.reviewerIds.map((reviewerId) => ({
          requestId,
          teamId,
          designId: row.design.id,
          revisionId,
          requestedBy: requester.id,
          reviewerId,
          note: input.note,
        })),
      )
      .returning();
    await refreshReviewState(tx, row.design.id);
    await recordAudit(tx, {
      ...audit,
      action: 'review.requested',
      teamId,
      entity: { type: 'revision', id: revisionId },
      details: { requestId, reviewIds: rows.map((r) => r.id), reviewerIds: input.reviewerIds, sha256: row.revision.sha256 },
    });
    return rows;
  });

  const results = row.revision.results as CheckOutcome;
  const tally = counts(results.checks);
  for (const review of created) {
    const reviewer = byId.get(review.reviewerId)!;
    const mail = reviewRequestedMail({
      requester: requester.name,
      reviewer: reviewer.name,
      teamName: row.teamName,
      revision: revisionRef({ designName: row.design.name, projectName: row.projectName, revision: row.revision }),
      counts: { fail: tally.fail, warn: tally.warn, notChecked: tally['not-checked'], pass: tally.pass },
      note: input.note,
      url: reviewUrl(ctx, review.id),
    });
    await ctx.mailer.send({ to: reviewer.email, ...mail, teamId, related: { type: 'review', id: review.id } });
  }
  const people = await loadUsers(ctx.db, [requester.id, ...input.reviewerIds]);
  return created.map((review) =>
    shapeSummary({ review, revision: row.revision, designName: row.design.name, projectName: row.projectName }, people),
  );
}

export async function listReviews(
  ctx: AppContext,
  teamId: string,
  userId: string,
  query: z.infer<typeof listReviewsQuerySchema>,
): Promise<Page<ReviewSummary>> {
  const rows = await ctx.db
    .select({ review: reviews, revision: revisions, designName: designs.name, projectName: projects.name })
    .from(reviews)
    .innerJoin(revisions, eq(revisions.id, reviews.revisionId))
    .innerJoin(designs, eq(designs.id, reviews.designId))
    .innerJoin(projects, eq(projects.id, designs.projectId))
    .where(
      and(
        eq(reviews.teamId, teamId),
        query.state ? eq(reviews.state, query.state) : undefined,
        query.mine ? eq(reviews.reviewerId, userId) : undefined,
        query.designId ? eq(reviews.designId, query.designId) : undefined,
        query.revisionId ? eq(reviews.revisionId, query.revisionId) : undefined,
        afterCursor(query.cursor, reviews.createdAt, reviews.id),
      ),
    )
    .orderBy(desc(reviews.createdAt), desc(reviews.id))
    .limit(query.limit + 1);
  const people = await loadUsers(
    ctx.db,
    rows.flatMap((r) => [r.review.requestedBy, r.review.reviewerId]),
  );
  return toPage(
    rows,
    query.limit,
    (r) => [iso(r.review.createdAt), r.review.id],
    (r) => shapeSummary(r, people),
  );
}

export async function getReview(
  ctx: AppContext,
  teamId: string,
  reviewId: string,
  viewer: { id: string; role: string },
): Promise<ReviewDetail> {
  const c = await loadReviewContext(ctx, teamId, reviewId);
  const comments = await ctx.db
    .select()
    .from(reviewComments)
    .where(eq(reviewComments.revisionId, c.review.revisionId))
    .orderBy(asc(reviewComments.createdAt), asc(reviewComments.id));
  const people = await loadUsers(ctx.db, [c.review.requestedBy, c.review.reviewerId, ...comments.map((x) => x.authorId)]);
  const checks = (c.revision.results as CheckOutcome).checks as CheckResult[];
  return {
    ...shapeSummary(c, people),
    checks: sortChecksForReview(checks),
    counts: counts(checks),
    comments: comments.map((x) => ({
      id: x.id,
      reviewId: x.reviewId,
      author: userRef(people, x.authorId),
      checkId: x.checkId,
      body: x.body,
      createdAt: iso(x.createdAt),
    })),
    approvedSha256: c.review.approvedSha256,
    checksSnapshot: (c.review.checksSnapshot as CheckResult[] | null) ?? null,
    canDecide:
      c.review.state === 'requested' &&
      viewer.role === 'reviewer' &&
      c.review.reviewerId === viewer.id &&
      c.revision.authorId !== viewer.id,
  };
}

export async function addComment(
  ctx: AppContext,
  teamId: string,
  reviewId: string,
  author: Actor,
  input: { body: string; checkId?: string },
  audit: AuditBase,
): Promise<ReviewDetail['comments'][number]> {
  const c = await loadReviewContext(ctx, teamId, reviewId);
  const checks = (c.revision.results as CheckOutcome).checks;
  const check = input.checkId ? checks.find((x) => x.id === input.checkId) : undefined;
  if (input.checkId && !check) {
    throw new HttpError(422, 'unknown_check', `This revision has no check "${input.checkId}".`, [
      { path: 'checkId', message: 'No such check in this revision.' },
    ]);
  }
  const row = await ctx.db.transaction(async (tx) => {
    const [inserted] = await tx
      .insert(reviewComments)
      .values({
        teamId,
        reviewId,
        revisionId: c.review.revisionId,
        authorId: author.id,
        checkId: input.checkId ?? null,
        body: input.body,
      })
      .returning();
    await recordAudit(tx, {
      ...audit,
      action: 'review.commented',
      teamId,
      entity: { type: 'review', id: reviewId },
      details: { commentId: inserted.id, checkId: input.checkId ?? null },
    });
    return inserted;
  });
  const recipients = await loadUsers(ctx.db, [c.revision.authorId, c.review.requestedBy, c.review.reviewerId]);
  for (const person of recipients.values()) {
    if (person.id === author.id) continue;
    const mail = commentAddedMail({
      commenter: author.name,
      recipient: person.name,
      teamName: c.teamName,
      revision: revisionRef(c),
      checkLabel: check?.label ?? null,
      body: input.body,
      url: reviewUrl(ctx, reviewId),
    });
    await ctx.mailer.send({ to: person.email, ...mail, teamId, related: { type: 'review', id: reviewId } });
  }
  return {
    id: row.id,
    reviewId,
    author: { id: author.id, name: author.name, email: author.email },
    checkId: row.checkId,
    body: row.body,
    createdAt: iso(row.createdAt),
  };
}

export async function decideReview(
  ctx: AppContext,
  teamId: string,
  reviewId: string,
  reviewer: Actor,
  decision: 'approved' | 'changes-requested',
  reason: string,
  audit: AuditBase,
): Promise<ReviewDetail> {
  const c = await loadReviewContext(ctx, teamId, reviewId);
  if (c.revision.authorId === reviewer.id || c.review.requestedBy === reviewer.id) throw selfReview();
  if (c.review.reviewerId !== reviewer.id)
    throw new HttpError(403, 'forbidden', 'This review was requested from another reviewer.');
  if (c.review.state !== 'requested') {
    throw conflict(
      c.review.state === 'superseded'
        ? 'A newer revision superseded this review request.'
        : 'This review has been decided already.',
    );
  }
  const results = c.revision.results as CheckOutcome;
  await ctx.db.transaction(async (tx) => {
    const now = new Date();
    const updated = await tx
      .update(reviews)
      .set({
        state: decision,
        decidedAt: now,
        decisionReason: reason || null,
        ...(decision === 'approved' ? { approvedSha256: c.revision.sha256, checksSnapshot: results.checks } : {}),
      })
      .where(and(eq(reviews.id, reviewId), eq(reviews.state, 'requested')))
      .returning({ id: reviews.id });
    if (updated.length === 0) throw conflict('This review changed a moment ago; reload it.');
    await refreshReviewState(tx, c.review.designId);
    await recordAudit(tx, {
      ...audit,
      action: decision === 'approved' ? 'review.approved' : 'review.changes-requested',
      teamId,
      entity: { type: 'review', id: reviewId },
      details: { revisionId: c.revision.id, sha256: c.revision.sha256, reason: reason || null },
    });
  });
  const people = await loadUsers(ctx.db, [c.revision.authorId, c.review.requestedBy]);
  for (const person of people.values()) {
    const mail = reviewDecidedMail({
      decision,
      reviewer: reviewer.name,
      recipient: person.name,
      teamName: c.teamName,
      revision: revisionRef(c),
      reason,
      url: reviewUrl(ctx, reviewId),
    });
    const out: OutgoingMail = { to: person.email, ...mail, teamId, related: { type: 'review', id: reviewId } };
    await ctx.mailer.send(out);
  }
  return getReview(ctx, teamId, reviewId, { id: reviewer.id, role: 'reviewer' });
}
