/** Turns a thrown error into the words shown to the user, and the server's per-field messages. */
import { ApiError } from '@/api/http';

export function messageOf(err: unknown): string {
  if (err instanceof ApiError) return err.message;
  return 'Something went wrong unexpectedly; try again.';
}

/** field → message from ApiError.details, so each message shows beside its field. */
export function fieldErrors(err: unknown): Record<string, string> {
  const out: Record<string, string> = {};
  if (err instanceof ApiError) for (const d of err.details) if (d.field && !out[d.field]) out[d.field] = d.message;
  return out;
}
