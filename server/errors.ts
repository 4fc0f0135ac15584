// One error type for the whole API and one middleware that maps anything thrown to the common JSON
// shape { error: { code, message, fields? } }. Stack traces and SQL never reach a response.
import type { ErrorRequestHandler, RequestHandler } from 'express';
import { ZodError } from 'zod';

export interface FieldError {
  path: string;
  message: string;
}

export class HttpError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly fields?: FieldError[],
  ) {
    super(message);
    this.name = 'HttpError';
  }
}

export const badRequest = (message: string, fields?: FieldError[]) => new HttpError(400, 'bad_request', message, fields);
export const unauthorized = (message = 'Sign in to continue.') => new HttpError(401, 'unauthorized', message);
export const forbidden = (message = 'Your role in this team does not allow that.') => new HttpError(403, 'forbidden', message);
export const notFound = (message = 'Not found.') => new HttpError(404, 'not_found', message);
export const conflict = (message: string) => new HttpError(409, 'conflict', message);

export function zodFields(error: ZodError): FieldError[] {
  return error.issues.map((issue) => ({
    path: issue.path.map(String).join('.') || '(body)',
    message: issue.message,
  }));
}

export const apiNotFound: RequestHandler = (req, _res, next) => {
  next(new HttpError(404, 'not_found', `No API route ${req.method} ${req.path}.`));
};

export function errorHandler(log: (message: string, error: unknown) => void): ErrorRequestHandler {
  return (err, _req, res, _next) => {
    if (res.headersSent) return;
    if (err instanceof HttpError) {
      res.status(err.status).json({ error: { code: err.code, message: err.message, ...(err.fields ? { fields: err.fields } : {}) } });
      return;
    }
    if (err instanceof ZodError) {
      const fields = zodFields(err);
      res.status(400).json({ error: { code: 'validation_failed', message: describeFields(fields), fields } });
      return;
    }
    // Errors raised by Express's own body parser carry a status and a type.
    const status = typeof err?.status === 'number' ? err.status : typeof err?.statusCode === 'number' ? err.statusCode : 500;
    if (err?.type === 'entity.parse.failed') {
      res.status(400).json({ error: { code: 'malformed_json', message: 'The request body is not valid JSON.' } });
      return;
    }
    if (err?.type === 'entity.too.large') {
      res.status(413).json({ error: { code: 'body_too_large', message: 'The request body is larger than the server accepts.' } });
      return;
    }
    if (status >= 400 && status < 500) {
      res.status(status).json({ error: { code: 'bad_request', message: 'The request could not be understood.' } });
      return;
    }
    log('unhandled error', err);
    res.status(500).json({ error: { code: 'internal', message: 'Something went wrong on the server. Try again; if it persists, tell your admin.' } });
  };
}

export function describeFields(fields: FieldError[]): string {
  const first = fields[0];
  if (!first) return 'The request is not valid.';
  const more = fields.length > 1 ? ` (and ${fields.length - 1} more)` : '';
  return `${first.path}: ${first.message}${more}`;
}
