// The team: members and roles, invitations, the derating policy, the mail outbox and the audit log.
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import { api, getActiveTeam } from '@/lib/api/client';
import {
  auditEntrySchema,
  deratingResponseSchema,
  invitationPreviewSchema,
  invitationSchema,
  mailMessageSchema,
  memberSchema,
  meResponseSchema,
  pageSchema,
  type AuditEntry,
  type CreateInvitationRequest,
  type Invitation,
  type MailMessage,
  type Member,
  type PutDeratingRequest,
  type Role,
  type SignUpRequest,
} from '@/lib/contracts';
import { adminKeys, authKeys, mailKeys } from './keys';
import { STALE } from './staleTimes';

const list = <T extends z.ZodType>(item: T) =>
  z.union([
    z.array(item),
    // The team routes answer { items } without a cursor (the lists are short).
    z.object({ items: z.array(item) }).transform((p) => p.items),
  ]);

export function useMembers() {
  const teamId = getActiveTeam();
  return useQuery({
    queryKey: adminKeys.members(teamId),
    staleTime: STALE.list,
    queryFn: async (): Promise<Member[]> => api('/api/team/members', { schema: list(memberSchema) }) as Promise<Member[]>,
  });
}

export function useChangeRole() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ userId, role }: { userId: string; role: Role }) =>
      api(`/api/team/members/${userId}`, { method: 'PATCH', body: { role } }),
    onSuccess: () => {
      queryClient.invalidateQueries({ queryKey: adminKeys.all });
      queryClient.invalidateQueries({ queryKey: authKeys.me() });
    },
  });
}

export function useRemoveMember() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (userId: string) => api(`/api/team/members/${userId}`, { method: 'DELETE' }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: adminKeys.all }),
  });
}

export function useInvitations() {
  const teamId = getActiveTeam();
  return useQuery({
    queryKey: adminKeys.invitations(teamId),
    staleTime: STALE.list,
    queryFn: async (): Promise<Invitation[]> =>
      api('/api/team/invitations', { schema: list(invitationSchema) }) as Promise<Invitation[]>,
  });
}

export function useCreateInvitation() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: CreateInvitationRequest) => api('/api/team/invitations', { method: 'POST', body }),
    onSuccess: () => {
      queryClient.invalidateQueries({ queryKey: adminKeys.all });
      queryClient.invalidateQueries({ queryKey: mailKeys.all });
    },
  });
}

export function useRevokeInvitation() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (id: string) => api(`/api/team/invitations/${id}`, { method: 'DELETE' }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: adminKeys.all }),
  });
}

export function useDerating() {
  const teamId = getActiveTeam();
  return useQuery({
    queryKey: adminKeys.policy(teamId),
    staleTime: STALE.config,
    queryFn: () => api('/api/team/derating', { schema: deratingResponseSchema }),
  });
}

export function usePutDerating() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: PutDeratingRequest) => api('/api/team/derating', { method: 'PUT', body, schema: deratingResponseSchema }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: adminKeys.all }),
  });
}

const mailPage = pageSchema(mailMessageSchema);
const auditPage = pageSchema(auditEntrySchema);

export function useOutbox() {
  const teamId = getActiveTeam();
  return useQuery({
    queryKey: adminKeys.outbox(teamId),
    staleTime: STALE.feed,
    queryFn: async (): Promise<MailMessage[]> => (await api('/api/admin/outbox?limit=200', { schema: mailPage })).items,
  });
}

export function useAudit(action: string) {
  const teamId = getActiveTeam();
  return useQuery({
    queryKey: [...adminKeys.audit(teamId), action] as const,
    staleTime: STALE.feed,
    queryFn: async (): Promise<AuditEntry[]> => {
      const q = new URLSearchParams({ limit: '200' });
      if (action) q.set('action', action);
      return (await api(`/api/admin/audit?${q}`, { schema: auditPage })).items;
    },
  });
}

/** The signed-in user's own messages from the local mail outbox. */
export function useMyMail() {
  return useQuery({
    queryKey: mailKeys.mine(),
    staleTime: STALE.feed,
    queryFn: async (): Promise<MailMessage[]> => (await api('/api/me/mail?limit=200', { schema: mailPage })).items,
  });
}

export function useInvitation(token: string | undefined) {
  return useQuery({
    queryKey: authKeys.invitation(token ?? ''),
    enabled: !!token,
    staleTime: STALE.config,
    queryFn: () => api(`/api/invitations/${token}`, { schema: invitationPreviewSchema, noRefresh: true }),
  });
}

export function useAcceptInvitation(token: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: () => api(`/api/invitations/${token}/accept`, { method: 'POST', schema: meResponseSchema }),
    onSuccess: (me) => {
      queryClient.clear();
      queryClient.setQueryData(authKeys.me(), me);
    },
  });
}

/** A new account, joining a team by invitation (or founding a new team). */
export function useSignUp() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: SignUpRequest) =>
      api('/api/auth/sign-up', { method: 'POST', body, noRefresh: true, schema: meResponseSchema }),
    onSuccess: (me) => {
      queryClient.clear();
      queryClient.setQueryData(authKeys.me(), me);
    },
  });
}
