// The team: members and roles, invitations, the derating policy, and the admin's views of the
// mail outbox and the audit log.
import { z } from 'zod';
import { idSchema, paginationQuerySchema, roleSchema, userRefSchema } from './common';

export const memberSchema = z.object({
  userId: idSchema,
  name: z.string(),
  email: z.string(),
  role: roleSchema,
  joinedAt: z.string(),
});
export type Member = z.infer<typeof memberSchema>;

export const changeRoleRequestSchema = z.object({ role: roleSchema });
export type ChangeRoleRequest = z.infer<typeof changeRoleRequestSchema>;

export const createInvitationRequestSchema = z.object({
  email: z.email('Enter an e-mail address such as name@example.com.').max(254),
  role: roleSchema,
});
export type CreateInvitationRequest = z.infer<typeof createInvitationRequestSchema>;

export const invitationSchema = z.object({
  id: idSchema,
  email: z.string(),
  role: roleSchema,
  invitedBy: userRefSchema,
  createdAt: z.string(),
  expiresAt: z.string(),
  state: z.enum(['pending', 'accepted', 'revoked', 'expired']),
});
export type Invitation = z.infer<typeof invitationSchema>;

/** PUT /api/team/derating: the team's overrides, validated by the engine's deratingPolicySchema. */
export const putDeratingRequestSchema = z.object({ policy: z.record(z.string(), z.unknown()) });
export type PutDeratingRequest = z.infer<typeof putDeratingRequestSchema>;

export const deratingResponseSchema = z.object({
  /** The team's own overrides (null: the engine's defaults apply). */
  policy: z.unknown().nullable(),
  /** The policy checks are judged against: defaults with the overrides applied. */
  effective: z.unknown(),
  updatedAt: z.string().nullable(),
});
export type DeratingResponse = z.infer<typeof deratingResponseSchema>;

export const mailStatusSchema = z.enum(['queued', 'sent', 'failed', 'captured']);
export const mailMessageSchema = z.object({
  id: idSchema,
  to: z.string(),
  subject: z.string(),
  text: z.string(),
  html: z.string().nullable(),
  status: mailStatusSchema,
  error: z.string().nullable(),
  relatedType: z.string().nullable(),
  relatedId: z.string().nullable(),
  createdAt: z.string(),
  sentAt: z.string().nullable(),
  receivedAt: z.string().nullable(),
});
export type MailMessage = z.infer<typeof mailMessageSchema>;

export const listMailQuerySchema = paginationQuerySchema.extend({ status: mailStatusSchema.optional() });

/** Audit actions, as recorded. */
export const auditActions = [
  'auth.sign-in',
  'auth.sign-in-failed',
  'auth.sign-out',
  'auth.sign-up',
  'auth.password-changed',
  'member.role-changed',
  'member.removed',
  'invitation.created',
  'invitation.revoked',
  'invitation.accepted',
  'project.created',
  'project.updated',
  'project.deleted',
  'design.created',
  'design.updated',
  'design.deleted',
  'revision.saved',
  'analysis.run',
  'review.requested',
  'review.commented',
  'review.approved',
  'review.changes-requested',
  'report.downloaded',
  'revision.exported',
  'derating.changed',
] as const;
export type AuditAction = (typeof auditActions)[number];

export const listAuditQuerySchema = paginationQuerySchema.extend({
  action: z.string().max(60).optional(),
  /** The actor's user id or e-mail address. */
  actor: z.string().max(254).optional(),
  from: z.iso.datetime({ offset: true }).optional(),
  to: z.iso.datetime({ offset: true }).optional(),
});
export type ListAuditQuery = z.input<typeof listAuditQuerySchema>;

export const auditEntrySchema = z.object({
  id: z.number().int(),
  teamId: idSchema.nullable(),
  actorId: idSchema.nullable(),
  actorEmail: z.string().nullable(),
  action: z.string(),
  entityType: z.string().nullable(),
  entityId: z.string().nullable(),
  details: z.unknown(),
  ip: z.string().nullable(),
  createdAt: z.string(),
});
export type AuditEntry = z.infer<typeof auditEntrySchema>;
