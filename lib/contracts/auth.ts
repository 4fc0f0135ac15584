// Accounts and sessions. Sessions live in two httpOnly cookies set by the server (rw_access: a
// 15-minute signed token; rw_refresh: a 14-day token, rotated by POST /api/auth/refresh); the app
// never reads them, it only sends requests with credentials.
import { z } from 'zod';
import { idSchema, roleSchema, userSummarySchema } from './common';

export const PASSWORD_MIN = 10;
export const PASSWORD_MAX = 200;

const emailSchema = z.email('Enter an e-mail address such as name@example.com.').max(254);
const passwordSchema = z
  .string()
  .min(PASSWORD_MIN, `Use at least ${PASSWORD_MIN} characters.`)
  .max(PASSWORD_MAX, `Use at most ${PASSWORD_MAX} characters.`);
const personNameSchema = z.string().trim().min(1, 'Enter your name.').max(120);

export const signInRequestSchema = z.object({
  email: emailSchema,
  // Any length is accepted at sign-in: the rules apply when a password is chosen.
  password: z.string().min(1, 'Enter your password.').max(PASSWORD_MAX),
});
export type SignInRequest = z.infer<typeof signInRequestSchema>;

/** Sign-up joins a team by invitation, or creates a new team (the new user becomes its admin). */
export const signUpRequestSchema = z.union([
  z.object({
    name: personNameSchema,
    email: emailSchema,
    password: passwordSchema,
    invitationToken: z.string().min(10).max(200),
  }),
  z.object({
    name: personNameSchema,
    email: emailSchema,
    password: passwordSchema,
    teamName: z.string().trim().min(1, 'Name the team.').max(120),
  }),
]);
export type SignUpRequest = z.infer<typeof signUpRequestSchema>;

export const changePasswordRequestSchema = z.object({
  currentPassword: z.string().min(1).max(PASSWORD_MAX),
  newPassword: passwordSchema,
});
export type ChangePasswordRequest = z.infer<typeof changePasswordRequestSchema>;

export const teamMembershipSchema = z.object({ id: idSchema, name: z.string(), role: roleSchema });
export type TeamMembership = z.infer<typeof teamMembershipSchema>;

/** GET /api/me, and the answer to sign-in, sign-up and refresh. */
export const meResponseSchema = z.object({
  user: userSummarySchema,
  teams: z.array(teamMembershipSchema),
  /** The team collection routes act on (X-Team-Id or the first membership); null with no team. */
  currentTeam: teamMembershipSchema.nullable(),
  /** When the access token expires; refresh before then. */
  accessExpiresAt: z.string().optional(),
});
export type MeResponse = z.infer<typeof meResponseSchema>;

/** The public view of an invitation (GET /api/invitations/:token). */
export const invitationPreviewSchema = z.object({
  team: z.object({ id: idSchema, name: z.string() }),
  inviter: z.object({ name: z.string() }).nullable(),
  email: z.string(),
  role: roleSchema,
  expiresAt: z.string(),
});
export type InvitationPreview = z.infer<typeof invitationPreviewSchema>;
