/** Installs into another door than the planned one (T4): the office's list and a supervisor's review. */
import { z } from 'zod';

export const InstallMismatch = z.object({
  id: z.uuid(),
  coreId: z.uuid(),
  coreTag: z.string(),
  doorId: z.uuid(),
  doorLabel: z.string(),
  plannedDoorLabel: z.string().nullable(),
  reason: z.string().nullable(),
  installedAt: z.string(),
  installedBy: z.string(),
  completionId: z.uuid().nullable(),
});
export type InstallMismatch = z.infer<typeof InstallMismatch>;
export const InstallMismatchList = z.object({ mismatches: z.array(InstallMismatch) });
export type InstallMismatchList = z.infer<typeof InstallMismatchList>;
export const InstallReview = z.object({ review: z.object({ id: z.uuid(), reviewedAt: z.string().nullable(), reviewedBy: z.string().nullable() }) });
export type InstallReview = z.infer<typeof InstallReview>;
