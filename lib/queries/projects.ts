import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api, getActiveTeam } from '@/lib/api/client';
import { pageSchema, projectSchema, type CreateProjectRequest, type Project } from '@/lib/contracts';
import { designKeys, projectKeys } from './keys';
import { STALE } from './staleTimes';

const projectPage = pageSchema(projectSchema);

export function useProjects() {
  const teamId = getActiveTeam();
  return useQuery({
    queryKey: projectKeys.list(teamId),
    staleTime: STALE.list,
    queryFn: async (): Promise<Project[]> => (await api('/api/projects?limit=200', { schema: projectPage })).items,
  });
}

export function useCreateProject() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: CreateProjectRequest) => api('/api/projects', { method: 'POST', body, schema: projectSchema }),
    onSuccess: () => {
      queryClient.invalidateQueries({ queryKey: projectKeys.all });
      queryClient.invalidateQueries({ queryKey: designKeys.lists() });
    },
  });
}
