import type { ErrorRequestHandler, RequestHandler } from 'express';
import { ZodError } from 'zod';

export type ErrorCode =
  | 'bad_request'
  | 'validation_failed'
  | 'unauthenticated'
  | 'forbidden'
  | 'not_found'
  | 'conflict'
  | 'payload_too_large'
  | 'rate_limited'
  | 'gone'
  | 'unsupported_media_type'
  | 'insufficient_storage'
  | 'busy'
  | 'internal';

/** An error with an HTTP status that the error middleware turns into {error: {code, message, details?}}. */
export class HttpError extends Error {
  readonly status: number;
  readonly code: ErrorCode;
  readonly details: unknown;
  /** Response headers to send with the error (e.g. Retry-After on a 503). */
  readonly headers: Record<string, string> | undefined;

  constructor(status: number, code: ErrorCode, message: string, details?: unknown, headers?: Record<string, string>) {
    super(message);
    this.status = status;
    this.code = code;
    this.details = details;
    this.headers = headers;
  }
}

/** 503 with Retry-After: the server is too busy to answer this now; the client may try again. */
export const busy = (message: string, retryAfterSeconds: number) =>
  new HttpError(503, 'busy', message, undefined, { 'retry-after': String(Math.max(1, Math.ceil(retryAfterSeconds))) });

export const notFound = (what: string) => new HttpError(404, 'not_found', `${what} was not found`);
export const forbidden = (message = 'You do not have access to this') => new HttpError(403, 'forbidden', message);
export const unauthenticated = (message = 'Sign in to continue') => new HttpError(401, 'unauthenticated', message);

/** Turns a ZodError into a list of {path, message} that name the field. */
export function zodDetails(error: ZodError): { path: string; message: string }[] {
  return error.issues.map((issue) => ({ path: issue.path.join('.'), message: issue.message }));
}

export const apiNotFound: RequestHandler = (req, _res, next) => {
  next(new HttpError(404, 'not_found', `No API route for ${req.method} ${req.path}`));
};

interface LoggerLike {
  error(obj: unknown, msg?: string): void;
}

export const DISK_FULL_MESSAGE = "The server's disk is full; nothing was written. Try again once space has been freed.";

/**
 * What an error that is not an HttpError means for the caller: a full disk (SQLite's
 * SQLITE_FULL, or ENOSPC from a file write) is 507 with nothing written (the transaction rolled
 * back); a locked database after the busy timeout is 503; the HTTP layer's own 4xx errors (body
 * parser, malformed percent-encoding in a path) keep their status with a plain message.
 */
export function classifyError(err: unknown): HttpError | null {
  const e = err as { code?: unknown; status?: unknown; type?: unknown; expose?: unknown; message?: unknown } | null;
  if (!e || typeof e !== 'object') return null;
  const code = typeof e.code === 'string' ? e.code : '';
  if (code === 'SQLITE_FULL' || code === 'ENOSPC' || code === 'SQLITE_IOERR_WRITE' || code === 'EDQUOT') {
    return new HttpError(507, 'insufficient_storage', DISK_FULL_MESSAGE);
  }
  if (code === 'SQLITE_BUSY' || code === 'SQLITE_LOCKED' || code.startsWith('SQLITE_BUSY_')) {
    return new HttpError(503, 'busy', 'The database is busy with another write. Try again in a moment.');
  }
  if (e.type === 'entity.too.large' || code === 'LIMIT_FILE_SIZE')
    return new HttpError(413, 'payload_too_large', 'The request body is too large');
  if (e.type === 'entity.parse.failed') return new HttpError(400, 'bad_request', 'The request body is not valid JSON');
  const status = typeof e.status === 'number' ? e.status : NaN;
  if (status >= 400 && status < 500) {
    if (status === 415)
      return new HttpError(415, 'unsupported_media_type', 'The request body’s encoding or character set is not supported: send UTF-8 JSON');
    if (status === 413) return new HttpError(413, 'payload_too_large', 'The request body is too large');
    const message = e.expose === true && typeof e.message === 'string' && e.message.length < 200 ? e.message : 'The request is not valid';
    return new HttpError(status, status === 404 ? 'not_found' : 'bad_request', message);
  }
  return null;
}

/** The one error middleware: a single JSON shape, and no stack traces outside development. */
export function errorHandler(options: { exposeStacks: boolean; logger?: LoggerLike }): ErrorRequestHandler {
  return (err: unknown, _req, res, _next) => {
    let error: HttpError;
    if (err instanceof HttpError) error = err;
    else if (err instanceof ZodError) error = new HttpError(400, 'validation_failed', 'The request is not valid', zodDetails(err));
    else {
      const classified = classifyError(err);
      if (classified) {
        if (classified.status >= 500) options.logger?.error({ err }, classified.message);
        error = classified;
      } else {
        options.logger?.error({ err }, 'unhandled error');
        error = new HttpError(500, 'internal', 'Something went wrong on the server');
      }
    }
    const body: { error: { code: ErrorCode; message: string; details?: unknown; stack?: string } } = {
      error: { code: error.code, message: error.message },
    };
    if (error.details !== undefined) body.error.details = error.details;
    if (options.exposeStacks && error.status >= 500 && error.status !== 503 && err instanceof Error) body.error.stack = err.stack;
    if (error.headers) res.set(error.headers);
    res.status(error.status).json(body);
  };
}
