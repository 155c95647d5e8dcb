import type { z } from 'zod';
import { fromZod } from '../errors';

/** Parses with a shared zod schema; a failure is a 400 naming every field to fix. */
export function parse<S extends z.ZodType>(schema: S, value: unknown, what = 'The request'): z.infer<S> {
  const result = schema.safeParse(value ?? {});
  if (!result.success) throw fromZod(result.error, what);
  return result.data;
}
