/** Doors (openings) as the API answers them: one, a list, and what happened at a door. */
import { z } from 'zod';
import { CoreState, Door } from './records';

export const DoorList = z.object({ doors: z.array(Door) });
export type DoorList = z.infer<typeof DoorList>;
export const DoorAnswer = z.object({ door: Door });
export type DoorAnswer = z.infer<typeof DoorAnswer>;
export const DoorHistoryEntry = z.object({
  id: z.uuid(),
  coreId: z.uuid(),
  coreTag: z.string(),
  coreState: CoreState,
  installedAt: z.string(),
  installedBy: z.string(),
  removedCoreTag: z.string().nullable(),
  notes: z.string().nullable(),
  builtBy: z.string().nullable(),
  builtAt: z.string().nullable(),
  /** Installed here although planned for another door (plannedDoorLabel), for the reason given. */
  doorMismatch: z.boolean(),
  mismatchReason: z.string().nullable(),
  mismatchReviewedAt: z.string().nullable(),
  plannedDoorLabel: z.string().nullable(),
});
export type DoorHistoryEntry = z.infer<typeof DoorHistoryEntry>;
export const DoorHistory = z.object({ history: z.array(DoorHistoryEntry) });
export type DoorHistory = z.infer<typeof DoorHistory>;
