// Who is signed in, their teams and roles; signing in and out; the active team.
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { useCallback, useEffect, useState } from 'react';
import { api, ApiError, getActiveTeam, setActiveTeam } from '@/lib/api/client';
import { meResponseSchema, type MeResponse, type SignInRequest, type TeamMembership } from '@/lib/contracts/auth';
import type { Role } from '@/lib/contracts/common';
import { authKeys } from './keys';
import { STALE } from './staleTimes';

export type { Role, TeamMembership };
export type Me = MeResponse;

/** The signed-in user, or null when nobody is (a 401 is an answer here, not an error). */
export function useMe() {
  return useQuery({
    queryKey: authKeys.me(),
    staleTime: STALE.me,
    queryFn: async (): Promise<Me | null> => {
      try {
        return await api('/api/me', { schema: meResponseSchema });
      } catch (error) {
        if (error instanceof ApiError && error.status === 401) return null;
        throw error;
      }
    },
  });
}

const TEAM_STORAGE = 'ringwell.activeTeam';

function storedTeam(): string | null {
  try {
    return typeof localStorage === 'undefined' ? null : localStorage.getItem(TEAM_STORAGE);
  } catch {
    return null;
  }
}

/** The team the user works in now: remembered per browser, the first team by default. */
export function useActiveTeam(me: Me | null | undefined) {
  const queryClient = useQueryClient();
  const [teamId, setTeamId] = useState<string | null>(() => getActiveTeam() ?? storedTeam() ?? me?.currentTeam?.id ?? null);
  const teams = me?.teams ?? [];
  const active = teams.find((t) => t.id === teamId) ?? teams[0] ?? null;

  useEffect(() => {
    if (active && getActiveTeam() !== active.id) {
      setActiveTeam(active.id);
    }
  }, [active]);

  const choose = useCallback(
    (id: string) => {
      setActiveTeam(id);
      setTeamId(id);
      try {
        localStorage.setItem(TEAM_STORAGE, id);
      } catch {
        // Private mode: the choice lasts for this page only.
      }
      // Everything but who-am-I belongs to a team.
      queryClient.removeQueries({ predicate: (q) => q.queryKey[0] !== 'auth' });
    },
    [queryClient],
  );
  return { team: active, teams, choose };
}

export function can(role: Role | undefined, action: 'edit' | 'review' | 'admin'): boolean {
  if (!role) return false;
  if (action === 'admin') return role === 'admin';
  if (action === 'review') return role === 'admin' || role === 'reviewer';
  return role === 'admin' || role === 'engineer';
}

export function useSignIn() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: SignInRequest) =>
      api('/api/auth/sign-in', { method: 'POST', body, noRefresh: true, schema: meResponseSchema }),
    onSuccess: (me) => {
      queryClient.clear();
      queryClient.setQueryData(authKeys.me(), me);
    },
  });
}

export function useSignOut() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: () => api<unknown>('/api/auth/sign-out', { method: 'POST', noRefresh: true }),
    onSettled: () => {
      setActiveTeam(null);
      queryClient.clear();
      queryClient.setQueryData(authKeys.me(), null);
    },
  });
}

export interface DemoAccount {
  name: string;
  email: string;
  role: Role;
  password: string;
}

const DEMO_FALLBACK: DemoAccount[] = [
  { name: 'Ada Reyes', email: 'ada@northfold.example', role: 'admin', password: 'northfold-admin' },
  { name: 'Sam Okafor', email: 'sam@northfold.example', role: 'engineer', password: 'northfold-engineer' },
  { name: 'Priya Lindqvist', email: 'priya@northfold.example', role: 'reviewer', password: 'northfold-reviewer' },
  { name: 'Tomás Berg', email: 'tomas@northfold.example', role: 'viewer', password: 'northfold-viewer' },
];

function isLocalHost(): boolean {
  if (typeof window === 'undefined') return false;
  return /^(localhost|127\.\d+\.\d+\.\d+|\[::1\])$/.test(window.location.hostname);
}

/**
 * The demo accounts to offer on the sign-in page: what the server says (GET /api/auth/demo), or,
 * when it has no such route, the seeded accounts on a local install only.
 */
export function useDemoAccounts() {
  return useQuery({
    queryKey: authKeys.demo(),
    staleTime: STALE.config,
    queryFn: async (): Promise<DemoAccount[]> => {
      try {
        const raw = await api<unknown>('/api/auth/demo', { noRefresh: true });
        const r = raw as { accounts?: DemoAccount[]; enabled?: boolean } | DemoAccount[];
        if (Array.isArray(r)) return r;
        if (r?.enabled === false) return [];
        return Array.isArray(r?.accounts) ? r.accounts : [];
      } catch (error) {
        if (error instanceof ApiError && error.status === 404) return isLocalHost() ? DEMO_FALLBACK : [];
        return [];
      }
    },
  });
}
