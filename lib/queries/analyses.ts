// Spread, stability and snubber. The spread runs on a saved revision as a background job (start,
// poll, cancel); stability and the snubber proposal are stateless, on the draft.
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api/client';
import type { SnubberComparison, SnubberProposal, Parasitics } from '@/sim/snubber';
import type { SpreadComplete } from '@/sim/spread';
import type { OptimalDamping, StabilityResult } from '@/sim/stability';
import { revisionKeys } from './keys';

export type JobState = 'queued' | 'running' | 'done' | 'cancelled' | 'failed';

export interface AnalysisJob {
  id: string;
  revisionId: string;
  kind: string;
  state: JobState;
  done: number;
  total: number;
  createdAt: string;
  result?: { id: string; result: SpreadComplete; cached: boolean };
  error?: { message: string };
}

export interface SpreadRunResponse {
  /** Present when the run was queued (202). */
  job?: AnalysisJob;
  /** Present when the run was in the cache. */
  result?: SpreadComplete;
  cached?: boolean;
  id?: string;
}

export const analysisKeys = {
  all: ['analyses'] as const,
  job: (id: string) => [...analysisKeys.all, 'job', id] as const,
};

export function useStartSpread(revisionId: string | null) {
  return useMutation({
    mutationFn: (options: Record<string, unknown>) =>
      api<SpreadRunResponse>(`/api/revisions/${revisionId}/analyses`, { method: 'POST', body: { kind: 'spread', options } }),
  });
}

/** Polls a job every 400 ms until it ends. */
export function useAnalysisJob(jobId: string | null) {
  const queryClient = useQueryClient();
  return useQuery({
    queryKey: analysisKeys.job(jobId ?? ''),
    enabled: !!jobId,
    queryFn: async () => {
      const job = await api<AnalysisJob>(`/api/analysis-jobs/${jobId}`);
      if (job.state === 'done') queryClient.invalidateQueries({ queryKey: revisionKeys.analyses(job.revisionId) });
      return job;
    },
    refetchInterval: (query) => {
      const state = query.state.data?.state;
      return state === 'done' || state === 'cancelled' || state === 'failed' ? false : 400;
    },
  });
}

export function useCancelJob() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (jobId: string) => api<AnalysisJob>(`/api/analysis-jobs/${jobId}/cancel`, { method: 'POST' }),
    onSuccess: (job) => queryClient.setQueryData(analysisKeys.job(job.id), job),
  });
}

export type StabilityAnswer = StabilityResult & { damping: OptimalDamping & { n: number } };

export function useStability() {
  return useMutation({
    mutationFn: (body: { design: unknown; options?: Record<string, unknown> }) =>
      api<StabilityAnswer>('/api/stability', { method: 'POST', body }),
  });
}

export interface SnubberAnswer {
  parasitics: Parasitics;
  proposal: SnubberProposal & { busVoltage: number; switchingFrequency: number };
  comparison: SnubberComparison;
}

export function useSnubberProposal() {
  return useMutation({
    mutationFn: (body: { design: unknown; options: Record<string, unknown> }) =>
      api<SnubberAnswer>('/api/snubber/propose', { method: 'POST', body }),
  });
}
