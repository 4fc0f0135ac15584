import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import { api, getActiveTeam } from '@/lib/api/client';
import {
  pageSchema,
  reviewCommentSchema,
  reviewDetailSchema,
  reviewSummarySchema,
  type AddCommentRequest,
  type ApproveRequest,
  type RequestChangesRequest,
  type RequestReviewRequest,
  type ReviewSummary,
} from '@/lib/contracts';
import { designKeys, mailKeys, reviewKeys } from './keys';
import { STALE } from './staleTimes';

const reviewPage = pageSchema(reviewSummarySchema);
const requestAnswer = z.union([
  z.array(reviewSummarySchema),
  z
    .object({ reviews: z.array(reviewSummarySchema) })
    .loose()
    .transform((v) => v.reviews),
  z.unknown(),
]);

export type ReviewScope = 'mine' | 'all';

export function useReviews(scope: ReviewScope) {
  const teamId = getActiveTeam();
  return useQuery({
    queryKey: reviewKeys.list(teamId, scope),
    staleTime: STALE.list,
    queryFn: async (): Promise<ReviewSummary[]> => {
      const q = new URLSearchParams({ limit: '200' });
      if (scope === 'mine') q.set('mine', 'true');
      return (await api(`/api/reviews?${q}`, { schema: reviewPage })).items;
    },
  });
}

export function useDesignReviews(designId: string | undefined) {
  return useQuery({
    queryKey: reviewKeys.forDesign(designId ?? ''),
    enabled: !!designId,
    staleTime: STALE.list,
    queryFn: async (): Promise<ReviewSummary[]> =>
      (await api(`/api/reviews?designId=${designId}&limit=200`, { schema: reviewPage })).items,
  });
}

export function useReview(id: string | undefined) {
  return useQuery({
    queryKey: reviewKeys.detail(id ?? ''),
    enabled: !!id,
    staleTime: STALE.list,
    queryFn: () => api(`/api/reviews/${id}`, { schema: reviewDetailSchema }),
  });
}

export function useRequestReview(revisionId: string, designId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: RequestReviewRequest) =>
      api(`/api/revisions/${revisionId}/reviews`, { method: 'POST', body, schema: requestAnswer }),
    onSuccess: () => {
      queryClient.invalidateQueries({ queryKey: reviewKeys.all });
      queryClient.invalidateQueries({ queryKey: designKeys.detail(designId) });
      queryClient.invalidateQueries({ queryKey: designKeys.lists() });
      queryClient.invalidateQueries({ queryKey: mailKeys.all });
    },
  });
}

function useDecision<TBody>(reviewId: string, path: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: TBody) => api(`/api/reviews/${reviewId}/${path}`, { method: 'POST', body, schema: reviewDetailSchema }),
    onSuccess: (review) => {
      queryClient.setQueryData(reviewKeys.detail(reviewId), review);
      queryClient.invalidateQueries({ queryKey: reviewKeys.lists() });
      queryClient.invalidateQueries({ queryKey: reviewKeys.forDesign(review.designId) });
      queryClient.invalidateQueries({ queryKey: designKeys.detail(review.designId) });
      queryClient.invalidateQueries({ queryKey: designKeys.lists() });
      queryClient.invalidateQueries({ queryKey: mailKeys.all });
    },
  });
}

export const useApproveReview = (reviewId: string) => useDecision<ApproveRequest>(reviewId, 'approve');
export const useRequestChanges = (reviewId: string) => useDecision<RequestChangesRequest>(reviewId, 'request-changes');

export function useAddComment(reviewId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: AddCommentRequest) =>
      api(`/api/reviews/${reviewId}/comments`, { method: 'POST', body, schema: reviewCommentSchema }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: reviewKeys.detail(reviewId) }),
  });
}
