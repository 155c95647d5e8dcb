/** Turns a thrown error into the words shown to the user, and the server's per-field messages. */
import { ApiError } from '@/api/http';

export function messageOf(err: unknown): string {
  if (err instanceof ApiError) return err.message;
  return 'Something went wrong unexpectedly; try again.';
}

/** A form field's error props (`v-bind="fieldProps(fields, 'title')"`): red with the server's message beside it. */
export function fieldProps(fields: Record<string, string>, name: string): { error: boolean; errorMessage: string | undefined } {
  return { error: name in fields, errorMessage: fields[name] };
}

/** field → message from ApiError.details, so each message shows beside its field. */
export function fieldErrors(err: unknown): Record<string, string> {
  const out: Record<string, string> = {};
  if (err instanceof ApiError) for (const d of err.details) if (d.field && !out[d.field]) out[d.field] = d.message;
  return out;
}
