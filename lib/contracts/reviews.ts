// The review workflow: an engineer requests a review of a revision from one or more reviewers; each
// reviewer's part is one review (requested → approved | changes-requested, or superseded when a
// newer revision of the design is saved). Reviews of one request share requestId.
import { z } from 'zod';
import {
  checkStatusSchema,
  designStatusSchema,
  idSchema,
  paginationQuerySchema,
  queryBooleanSchema,
  userRefSchema,
} from './common';
import { checkResultSchema } from './designs';

export const reviewStates = ['requested', 'approved', 'changes-requested', 'superseded'] as const;
export const reviewStateSchema = z.enum(reviewStates);
export type ReviewState = z.infer<typeof reviewStateSchema>;

export const requestReviewRequestSchema = z.object({
  reviewerIds: z
    .array(idSchema)
    .min(1, 'Choose at least one reviewer.')
    .max(10, 'Choose at most ten reviewers.')
    .refine((ids) => new Set(ids).size === ids.length, 'Each reviewer once.'),
  note: z.string().max(4000).default(''),
});
export type RequestReviewRequest = z.input<typeof requestReviewRequestSchema>;

export const addCommentRequestSchema = z.object({
  body: z.string().trim().min(1, 'Write a comment.').max(4000),
  /** The id of a check in the revision's checks table, or absent for the revision as a whole. */
  checkId: z.string().min(1).max(100).optional(),
});
export type AddCommentRequest = z.infer<typeof addCommentRequestSchema>;

export const approveRequestSchema = z.object({ comment: z.string().max(4000).default('') });
export type ApproveRequest = z.input<typeof approveRequestSchema>;

export const requestChangesRequestSchema = z.object({
  reason: z.string().trim().min(1, 'Say what needs to change.').max(4000),
});
export type RequestChangesRequest = z.infer<typeof requestChangesRequestSchema>;

export const listReviewsQuerySchema = paginationQuerySchema.extend({
  state: reviewStateSchema.optional(),
  /** Only reviews assigned to the signed-in user (a reviewer's queue). */
  mine: queryBooleanSchema.optional(),
  designId: idSchema.optional(),
  revisionId: idSchema.optional(),
});
export type ListReviewsQuery = z.input<typeof listReviewsQuerySchema>;

export const reviewSummarySchema = z.object({
  id: idSchema,
  requestId: idSchema,
  teamId: idSchema,
  designId: idSchema,
  designName: z.string(),
  projectName: z.string(),
  revisionId: idSchema,
  revisionSequence: z.number().int(),
  revisionSha256: z.string(),
  worstStatus: designStatusSchema,
  requestedBy: userRefSchema,
  reviewer: userRefSchema,
  note: z.string(),
  state: reviewStateSchema,
  createdAt: z.string(),
  decidedAt: z.string().nullable(),
  decisionReason: z.string().nullable(),
});
export type ReviewSummary = z.infer<typeof reviewSummarySchema>;

export const reviewCommentSchema = z.object({
  id: idSchema,
  reviewId: idSchema,
  author: userRefSchema,
  checkId: z.string().nullable(),
  body: z.string(),
  createdAt: z.string(),
});
export type ReviewComment = z.infer<typeof reviewCommentSchema>;

/** The reviewer's view: checks sorted fail, warn, not-checked, pass. */
export const reviewDetailSchema = reviewSummarySchema.extend({
  checks: z.array(checkResultSchema),
  counts: z.record(checkStatusSchema, z.number().int()),
  /** Comments on this revision from every review of it, oldest first. */
  comments: z.array(reviewCommentSchema),
  /** On approval: the hash and the checks exactly as approved. */
  approvedSha256: z.string().nullable(),
  checksSnapshot: z.array(checkResultSchema).nullable(),
  /** Whether the signed-in user may decide this review (assigned, a reviewer, not the author). */
  canDecide: z.boolean(),
});
export type ReviewDetail = z.infer<typeof reviewDetailSchema>;
