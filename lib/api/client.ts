// The app's one way to reach the API: same origin, cookie auth (credentials: 'include'), JSON in and
// out, the common error shape { error: { code, message, fields? } } turned into a typed ApiError,
// and one silent refresh of the session on a 401 before giving up.
import type { ZodType } from 'zod';

export interface FieldIssue {
  path: string;
  message: string;
}

export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly fields: FieldIssue[] = [],
  ) {
    super(message);
    this.name = 'ApiError';
  }

  /** The message for one field (by dotted path), when the server named it. */
  fieldMessage(path: string): string | undefined {
    return this.fields.find((f) => f.path === path)?.message;
  }
}

export const isApiError = (error: unknown): error is ApiError => error instanceof ApiError;

/** A plain sentence for an unexpected failure; validation and permission messages pass through. */
export function describeError(error: unknown): string {
  if (isApiError(error)) {
    if (error.status === 0) return 'The server could not be reached. Check the connection and try again.';
    return error.message;
  }
  if (error instanceof Error && error.message) return error.message;
  return 'Something went wrong. Try again.';
}

// The active team travels with every request so that the server scopes designs, members and
// reviews; the team switcher sets it (see lib/queries/auth.ts).
let activeTeamId: string | null = null;
export const TEAM_HEADER = 'X-Team-Id';

export function setActiveTeam(teamId: string | null): void {
  activeTeamId = teamId;
}

export function getActiveTeam(): string | null {
  return activeTeamId;
}

export interface RequestOptions<T> {
  method?: 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';
  body?: unknown;
  /** Validates the response; a mismatch is reported as an ApiError with code "bad_response". */
  schema?: ZodType<T>;
  /** Skip the refresh-on-401 (the auth endpoints themselves). */
  noRefresh?: boolean;
  signal?: AbortSignal;
}

let baseUrl = '';
/** For tests: where the API lives (same origin in the app). */
export function setApiBase(url: string): void {
  baseUrl = url.replace(/\/$/, '');
}

let refreshing: Promise<boolean> | null = null;

async function refreshSession(): Promise<boolean> {
  // Several requests may fail together; they share one refresh.
  if (!refreshing) {
    refreshing = fetch(`${baseUrl}/api/auth/refresh`, { method: 'POST', credentials: 'include' })
      .then((res) => res.ok)
      .catch(() => false)
      .finally(() => {
        setTimeout(() => (refreshing = null), 0);
      });
  }
  return refreshing;
}

async function send(path: string, options: RequestOptions<unknown>): Promise<Response> {
  const headers: Record<string, string> = { Accept: 'application/json' };
  if (options.body !== undefined) headers['Content-Type'] = 'application/json';
  if (activeTeamId) headers[TEAM_HEADER] = activeTeamId;
  try {
    return await fetch(`${baseUrl}${path}`, {
      method: options.method ?? (options.body === undefined ? 'GET' : 'POST'),
      credentials: 'include',
      headers,
      body: options.body === undefined ? undefined : JSON.stringify(options.body),
      signal: options.signal,
    });
  } catch (error) {
    if ((error as { name?: string })?.name === 'AbortError') throw error;
    throw new ApiError(0, 'network', 'The server could not be reached. Check the connection and try again.');
  }
}

async function errorFrom(res: Response): Promise<ApiError> {
  let body: unknown = null;
  try {
    body = await res.json();
  } catch {
    // Not JSON (a proxy's page, an empty body): fall through to a plain message.
  }
  const error = (body as { error?: { code?: unknown; message?: unknown; fields?: unknown } } | null)?.error;
  if (error && typeof error.message === 'string') {
    const fields = Array.isArray(error.fields)
      ? error.fields.filter((f): f is FieldIssue => typeof f?.path === 'string' && typeof f?.message === 'string')
      : [];
    return new ApiError(res.status, typeof error.code === 'string' ? error.code : 'error', error.message, fields);
  }
  return new ApiError(res.status, 'http_' + res.status, `The server answered ${res.status} ${res.statusText}`.trim() + '.');
}

/** Sends a request and returns the parsed JSON body (or undefined for 204). */
export async function api<T = unknown>(path: string, options: RequestOptions<T> = {}): Promise<T> {
  let res = await send(path, options as RequestOptions<unknown>);
  if (res.status === 401 && !options.noRefresh && !path.startsWith('/api/auth/')) {
    if (await refreshSession()) res = await send(path, options as RequestOptions<unknown>);
  }
  if (!res.ok) throw await errorFrom(res);
  if (res.status === 204) return undefined as T;
  const text = await res.text();
  const data: unknown = text ? JSON.parse(text) : undefined;
  if (options.schema) {
    const parsed = options.schema.safeParse(data);
    if (!parsed.success) {
      throw new ApiError(res.status, 'bad_response', `The server's answer to ${path} did not have the expected shape.`);
    }
    return parsed.data;
  }
  return data as T;
}

/** Fetches a binary file (the margin report, exports) with the same auth, for download. */
export async function apiBlob(path: string): Promise<Blob> {
  let res = await send(path, {});
  if (res.status === 401 && (await refreshSession())) res = await send(path, {});
  if (!res.ok) throw await errorFrom(res);
  return res.blob();
}

/** Saves a blob as a file in the browser. */
export function saveBlob(blob: Blob, filename: string): void {
  if (typeof document === 'undefined') return;
  const url = URL.createObjectURL(blob);
  const a = document.createElement('a');
  a.href = url;
  a.download = filename;
  document.body.appendChild(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}
