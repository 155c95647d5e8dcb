/**
 * Error codes the API answers with, shared so the client can show the right words.
 * Every API error is `{ error: { code, message, details? } }`.
 */
export const errorCodes = {
  validation: { status: 400, title: 'Some fields need fixing' },
  'malformed-json': { status: 400, title: 'The request body is not valid JSON' },
  unauthenticated: { status: 401, title: 'Please sign in again' },
  forbidden: { status: 403, title: 'Your role does not allow this' },
  'device-revoked': { status: 403, title: 'This tablet was revoked by an administrator' },
  'not-found': { status: 404, title: 'Not found' },
  conflict: { status: 409, title: 'This conflicts with what is stored' },
  'payload-too-large': { status: 413, title: 'The request is too large' },
  'unsupported-media-type': { status: 415, title: 'Send JSON (Content-Type: application/json)' },
  unprocessable: { status: 422, title: 'The request cannot be carried out' },
  'rate-limited': { status: 429, title: 'Too many attempts; wait and try again' },
  internal: { status: 500, title: 'Something went wrong on the server' },
  unavailable: { status: 503, title: 'The server is not ready' },
} as const;

export type ErrorCode = keyof typeof errorCodes;

export type { ApiErrorBody, ErrorDetail } from './schemas/errors';
