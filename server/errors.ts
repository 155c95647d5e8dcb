/**
 * Typed HTTP errors and the one error handler that turns anything thrown into the
 * JSON error shape from shared/errors.ts. Stack traces never leave the server.
 */
import type { ErrorRequestHandler, RequestHandler } from 'express';
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
    else if (bp?.type === 'entity.too.large') httpErr = new HttpError('payload-too-large', `The request body is larger than the ${Math.round((bp.limit ?? 0) / 1024)} KB allowed here.`);
    else if (bp?.type === 'entity.parse.failed') httpErr = new HttpError('malformed-json', 'The request body is not valid JSON; check quotes, commas and brackets.');
    else if (bp?.type === 'encoding.unsupported' || bp?.type === 'charset.unsupported') httpErr = new HttpError('unsupported-media-type', 'Send the body as UTF-8 JSON.');
    else if (typeof bp?.status === 'number' && bp.status >= 400 && bp.status < 500) httpErr = new HttpError('validation', bp.message || 'Bad request.', undefined, bp.status);
    else {
      log('unhandled error', err);
      httpErr = new HttpError('internal', 'Something went wrong on the server; the request changed nothing. Try again, and tell your administrator if it keeps happening.');
    }
    const body: ApiErrorBody = { error: { code: httpErr.code, message: httpErr.message, ...(httpErr.details ? { details: httpErr.details } : {}) } };
    res.status(httpErr.status).json(body);
  };
}
