/** The answer to a CSV import (doors or keys): a preview, or what was committed, with every problem by row. */
import { z } from 'zod';

export const ImportRowError = z.object({ row: z.number(), column: z.string().nullable(), message: z.string() });
export type ImportRowError = z.infer<typeof ImportRowError>;
export const ImportResult = z.object({
  rows: z.number(),
  errors: z.array(ImportRowError),
  warnings: z.array(ImportRowError).default([]),
  preview: z.array(z.record(z.string(), z.union([z.string(), z.boolean(), z.null()]))),
  committed: z.boolean(),
  created: z.number(),
});
export type ImportResult = z.infer<typeof ImportResult>;
