/** Every API error answer: `{ error: { code, message, details? } }` with a code of shared/errors.ts. */
import { z } from 'zod';
import { errorCodes, type ErrorCode } from '../errors';

const codes = Object.keys(errorCodes) as [ErrorCode, ...ErrorCode[]];
export const ErrorDetail = z.strictObject({
  /** Dotted path of the field, e.g. `records.3.clientId`; absent for the whole body. */
  field: z.string().optional(),
  message: z.string(),
});
export type ErrorDetail = z.infer<typeof ErrorDetail>;
/** Strict: nothing else (a stack trace, a query) ever rides along. */
export const ApiErrorBody = z.strictObject({
  error: z.strictObject({ code: z.enum(codes), message: z.string().min(1), details: z.array(ErrorDetail).optional() }),
});
export type ApiErrorBody = z.infer<typeof ApiErrorBody>;
