// Designs (their working copy, the draft), presets, revisions and the server-side check.
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api, getActiveTeam } from '@/lib/api/client';
import {
  designDetailSchema,
  designSummarySchema,
  pageSchema,
  presetSchema,
  revisionDetailSchema,
  revisionSummarySchema,
  type CreateDesignRequest,
  type CreateRevisionRequest,
  type DesignDetail,
  type DesignSummary,
  type Preset,
  type RevisionSummary,
  type UpdateDesignRequest,
} from '@/lib/contracts';
import { z } from 'zod';
import { designKeys, reviewKeys, revisionKeys } from './keys';
import { STALE } from './staleTimes';

const designPage = pageSchema(designSummarySchema);
const revisionPage = pageSchema(revisionSummarySchema);
const presetList = z.union([
  z.array(presetSchema),
  z.object({ presets: z.array(presetSchema) }).transform((v) => v.presets),
  z.object({ items: z.array(presetSchema) }).transform((v) => v.items),
]);

export function useDesigns(search: string) {
  const teamId = getActiveTeam();
  return useQuery({
    queryKey: designKeys.list(teamId, search),
    staleTime: STALE.list,
    queryFn: async (): Promise<DesignSummary[]> => {
      const q = new URLSearchParams({ limit: '200' });
      if (search.trim()) q.set('search', search.trim());
      return (await api(`/api/designs?${q}`, { schema: designPage })).items;
    },
  });
}

export function useDesign(id: string | undefined) {
  return useQuery({
    queryKey: designKeys.detail(id ?? ''),
    enabled: !!id,
    staleTime: STALE.design,
    queryFn: () => api(`/api/designs/${id}`, { schema: designDetailSchema }),
  });
}

export function usePresets() {
  return useQuery({
    queryKey: ['presets'] as const,
    staleTime: STALE.config,
    queryFn: async (): Promise<Preset[]> => api('/api/presets', { schema: presetList }),
  });
}

export function useCreateDesign() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: CreateDesignRequest) => api('/api/designs', { method: 'POST', body, schema: designDetailSchema }),
    onSuccess: (design) => {
      queryClient.setQueryData(designKeys.detail(design.id), design);
      queryClient.invalidateQueries({ queryKey: designKeys.lists() });
    },
  });
}

/** Saves the working copy (or the name); the editor calls it debounced as the engineer types. */
export function useUpdateDesign(id: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: UpdateDesignRequest) => api(`/api/designs/${id}`, { method: 'PATCH', body, schema: designDetailSchema }),
    onSuccess: (design) => {
      // The editor keeps its own copy while open; the cache holds what the server stored, which other
      // screens (precharge sizing, revisions) read.
      queryClient.setQueryData<DesignDetail>(designKeys.detail(id), design);
      queryClient.invalidateQueries({ queryKey: designKeys.lists() });
    },
  });
}

export function useRevisions(designId: string | undefined) {
  return useQuery({
    queryKey: designKeys.revisions(designId ?? ''),
    enabled: !!designId,
    staleTime: STALE.list,
    queryFn: async (): Promise<RevisionSummary[]> =>
      (await api(`/api/designs/${designId}/revisions?limit=200`, { schema: revisionPage })).items,
  });
}

export function useRevision(id: string | null | undefined) {
  return useQuery({
    queryKey: revisionKeys.detail(id ?? ''),
    enabled: !!id,
    staleTime: STALE.immutable,
    queryFn: () => api(`/api/revisions/${id}`, { schema: revisionDetailSchema }),
  });
}

export function useSaveRevision(designId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: CreateRevisionRequest) =>
      api(`/api/designs/${designId}/revisions`, { method: 'POST', body, schema: revisionDetailSchema }),
    onSuccess: (revision) => {
      queryClient.setQueryData(revisionKeys.detail(revision.id), revision);
      queryClient.invalidateQueries({ queryKey: designKeys.revisions(designId) });
      queryClient.invalidateQueries({ queryKey: designKeys.detail(designId) });
      queryClient.invalidateQueries({ queryKey: designKeys.lists() });
      // A new revision supersedes open reviews of the older one.
      queryClient.invalidateQueries({ queryKey: reviewKeys.all });
    },
  });
}
