/**
 * Typed HTTP errors and the one error handler that turns anything thrown into the
 * JSON error shape from shared/errors.ts. Stack traces never leave the server.
 */
import type { ErrorRequestHandler, RequestHandler } from 'express';
import { MulterError } from 'multer';
import { ZodError } from 'zod';
import { errorCodes, type ApiErrorBody, type ErrorCode, type ErrorDetail } from '../shared/errors';

export class HttpError extends Error {
  readonly status: number;
  constructor(
    readonly code: ErrorCode,
    message: string,
    readonly details?: ErrorDetail[],
    status?: number,
  ) {
    super(message);
    this.status = status ?? errorCodes[code].status;
  }
}

export const badRequest = (message: string, details?: ErrorDetail[]) => new HttpError('validation', message, details);
export const unauthenticated = (message = 'Sign in to continue.') => new HttpError('unauthenticated', message);
export const forbidden = (message = 'Your role does not allow this.') => new HttpError('forbidden', message);
export const notFound = (what = 'That item') => new HttpError('not-found', `${what} was not found.`);
export const conflict = (message: string, details?: ErrorDetail[]) => new HttpError('conflict', message, details);

export function zodDetails(err: ZodError): ErrorDetail[] {
  return err.issues.map((issue) => {
    const field = issue.path.map(String).join('.');
    let message = issue.message;
    if (issue.code === 'unrecognized_keys') message = `remove ${issue.keys.map((k) => `"${k}"`).join(', ')}: not accepted here`;
    return field ? { field, message } : { message };
  });
}

export function fromZod(err: ZodError, what = 'The request'): HttpError {
  const details = zodDetails(err);
  const first = details[0];
  const summary = first ? `${first.field ? `${first.field}: ` : ''}${first.message}` : 'invalid';
  return badRequest(`${what} has ${details.length === 1 ? 'a problem' : `${details.length} problems`}: ${summary}`, details);
}

export const notFoundApi: RequestHandler = (req) => {
  throw new HttpError('not-found', `No API route ${req.method} ${req.path}.`);
};

/** Seconds a client waits before retrying while the database is unreachable. */
export const RETRY_AFTER_SECONDS = 5;

/** Socket and Postgres codes that mean "the database cannot be reached now" rather than "the request is wrong". */
const UNAVAILABLE_CODES = new Set(['ECONNREFUSED', 'ECONNRESET', 'ENOTFOUND', 'ETIMEDOUT', 'EAI_AGAIN', 'EPIPE', 'EHOSTUNREACH', '57P01', '57P02', '57P03', '53300', '08000', '08001', '08003', '08004', '08006', '08P01']);

/** True when err says Postgres is down or unreachable (pg socket errors, admin shutdown, pool timeouts). */
export function isDatabaseUnavailable(err: unknown, depth = 0): boolean {
  if (!err || typeof err !== 'object' || depth > 3) return false;
  const e = err as { code?: unknown; name?: unknown; message?: unknown; errors?: unknown[]; cause?: unknown };
  if (typeof e.code === 'string' && UNAVAILABLE_CODES.has(e.code)) return true;
  if (e.name === 'KnexTimeoutError') return true;
  if (typeof e.message === 'string' && /Connection terminated|connection error|terminating connection|the database system is (starting up|shutting down)/i.test(e.message)) return true;
  if (Array.isArray(e.errors) && e.errors.some((x) => isDatabaseUnavailable(x, depth + 1))) return true;
  return isDatabaseUnavailable(e.cause, depth + 1);
}

/** multer's upload errors in our shape: over the size limit is 413, anything else about the form is 400 naming the field. */
function fromMulter(err: MulterError): HttpError {
  if (err.code === 'LIMIT_FILE_SIZE') return new HttpError('payload-too-large', 'The file is larger than the 1 MB allowed; split it into smaller files.', [{ field: err.field ?? 'file', message: 'larger than 1 MB' }]);
  if (err.code === 'LIMIT_UNEXPECTED_FILE' || err.code === 'LIMIT_FILE_COUNT') {
    return badRequest(`Send one CSV file as the form field "file"${err.field && err.field !== 'file' ? `, not "${err.field}"` : ''}.`, [{ field: err.field ?? 'file', message: 'unexpected file field; use "file"' }]);
  }
  return badRequest(`The upload form is not accepted: ${err.message}.`, [{ field: err.field ?? 'file', message: err.message }]);
}

interface BodyParserError extends Error {
  type?: string;
  status?: number;
  limit?: number;
}

export function errorHandler(log: (msg: string, err: unknown) => void = (m, e) => console.error(m, e)): ErrorRequestHandler {
  return (err: unknown, _req, res, next) => {
    if (res.headersSent) return next(err);
    let httpErr: HttpError;
    const bp = err as BodyParserError;
    if (err instanceof HttpError) httpErr = err;
    else if (err instanceof ZodError) httpErr = fromZod(err);
    else if (err instanceof MulterError) httpErr = fromMulter(err);
    else if (isDatabaseUnavailable(err)) {
      log('database unavailable', (err as Error).message);
      httpErr = new HttpError('unavailable', 'The server cannot reach its database just now; nothing was changed. Try again in a few seconds.');
    }
    else if (bp?.type === 'entity.too.large') httpErr = new HttpError('payload-too-large', `The request body is larger than the ${Math.round((bp.limit ?? 0) / 1024)} KB allowed here.`);
    else if (bp?.type === 'entity.parse.failed') httpErr = new HttpError('malformed-json', 'The request body is not valid JSON; check quotes, commas and brackets.');
    else if (bp?.type === 'encoding.unsupported' || bp?.type === 'charset.unsupported') httpErr = new HttpError('unsupported-media-type', 'Send the body as UTF-8 JSON.');
    else if (typeof bp?.status === 'number' && bp.status >= 400 && bp.status < 500) httpErr = new HttpError('validation', bp.message || 'Bad request.', undefined, bp.status);
    else {
      log('unhandled error', err);
      httpErr = new HttpError('internal', 'Something went wrong on the server; the request changed nothing. Try again, and tell your administrator if it keeps happening.');
    }
    if (httpErr.code === 'unavailable') res.set('Retry-After', String(RETRY_AFTER_SECONDS));
    const body: ApiErrorBody = { error: { code: httpErr.code, message: httpErr.message, ...(httpErr.details ? { details: httpErr.details } : {}) } };
    res.status(httpErr.status).json(body);
  };
}
