// What every part of the API shares: the error shape, pagination, the team-selection scheme and the
// status words. Imported by the server and by the app, so nothing here may touch Node.
import { z } from 'zod';

/**
 * Team selection. A user can belong to several teams with a role in each.
 * - Collection routes (lists, creation: `GET /api/designs`, `POST /api/projects`, `/api/team/*`, …)
 *   act on the *current team*: the team named by the `X-Team-Id` header, or, without the header,
 *   the user's first membership (oldest first). A header naming a team the user is not in → 404.
 * - Resource routes (`/api/designs/:id`, `/api/revisions/:id`, `/api/reviews/:id`, …) act on the
 *   resource's own team, with the user's role in that team, whatever the header says. A resource of
 *   a team the user is not in answers 404, exactly like one that does not exist.
 * `GET /api/me` returns every membership and the current team as the server resolved it.
 */
export const TEAM_HEADER = 'X-Team-Id';

export const ACCESS_COOKIE = 'rw_access';
export const REFRESH_COOKIE = 'rw_refresh';

export const roles = ['admin', 'engineer', 'reviewer', 'viewer'] as const;
export const roleSchema = z.enum(roles);
export type Role = z.infer<typeof roleSchema>;

export const idSchema = z.uuid();
export const isoDateSchema = z.string();

/** A margin's status. */
export const checkStatusSchema = z.enum(['pass', 'warn', 'fail', 'not-checked']);
export type CheckStatus = z.infer<typeof checkStatusSchema>;

/** A design's worst status from its latest revision (fail > warn > not-checked > pass, as the engine
 * ranks them), or 'not-run' before the first revision. */
export const designStatusSchema = z.enum(['pass', 'warn', 'fail', 'not-checked', 'not-run']);
export type DesignStatus = z.infer<typeof designStatusSchema>;

/** Order in which a reviewer reads checks: what failed first, then what warned. */
export const checkStatusOrder: Record<CheckStatus, number> = { fail: 0, warn: 1, 'not-checked': 2, pass: 3 };

/**
 * Pagination: keyset, newest first. Send `?limit=` (1–200, default 50) and, for the next page, the
 * `nextCursor` of the previous answer as `?cursor=`. `nextCursor` is null on the last page.
 * Cursors are opaque strings.
 */
export const PAGE_LIMIT_DEFAULT = 50;
export const PAGE_LIMIT_MAX = 200;

export const paginationQuerySchema = z.object({
  limit: z.coerce.number().int().min(1).max(PAGE_LIMIT_MAX).default(PAGE_LIMIT_DEFAULT),
  cursor: z.string().max(500).optional(),
});
export type PaginationQuery = z.infer<typeof paginationQuerySchema>;

export function pageSchema<T extends z.ZodType>(item: T) {
  return z.object({ items: z.array(item), nextCursor: z.string().nullable() });
}
export interface Page<T> {
  items: T[];
  nextCursor: string | null;
}

/** A boolean in a query string: "true"/"1" or "false"/"0". */
export const queryBooleanSchema = z.enum(['true', 'false', '1', '0']).transform((v) => v === 'true' || v === '1');

/** Every error: `{ error: { code, message, fields? } }`; `fields` name the offending paths. */
export const fieldErrorSchema = z.object({ path: z.string(), message: z.string() });
export type FieldError = z.infer<typeof fieldErrorSchema>;

export const errorBodySchema = z.object({
  error: z.object({ code: z.string(), message: z.string(), fields: z.array(fieldErrorSchema).optional() }),
});
export type ErrorBody = z.infer<typeof errorBodySchema>;

/** Error codes the app may branch on (others can appear; show their message). */
export const errorCodes = [
  'bad_request',
  'validation_failed',
  'malformed_json',
  'unauthorized',
  'forbidden',
  'not_found',
  'conflict',
  'rate_limited',
  'invalid_credentials',
  'invalid_design',
  'analysis_unavailable',
  'self_review',
  'last_admin',
  'internal',
] as const;
export type ErrorCode = (typeof errorCodes)[number];

export const userSummarySchema = z.object({ id: idSchema, name: z.string(), email: z.string() });
export type UserSummary = z.infer<typeof userSummarySchema>;

/** A nullable user reference: the person may have left (account removed). */
export const userRefSchema = userSummarySchema.nullable();
