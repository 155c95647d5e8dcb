import { z } from 'zod';
import { Id, IsoDate, TzOffset } from './common';
import { KeyLevel } from './records';
import { Attempt } from './sync';

export const completionSorts = ['finishedAt', 'startedAt', 'technician', 'door', 'core', 'result', 'workOrder'] as const;

export const CompletionQuery = z.strictObject({
  workOrderId: Id.optional(),
  technicianId: Id.optional(),
  doorId: Id.optional(),
  coreId: Id.optional(),
  result: z.enum(['passed', 'failed']).optional(),
  /** 1: only cores that had a failed key check at some point, whatever their final result. */
  hadFailedCheck: z.enum(['1'], { error: 'hadFailedCheck is 1 or left out' }).optional(),
  from: IsoDate.optional(),
  to: IsoDate.optional(),
  tz: TzOffset,
  sort: z.enum(completionSorts, { error: `sort is one of ${completionSorts.join(', ')}` }).default('finishedAt'),
  order: z.enum(['asc', 'desc']).default('desc'),
  page: z.coerce.number().int().min(1, { error: 'page starts at 1' }).default(1),
  pageSize: z.coerce.number().int().min(1).max(200, { error: 'pageSize is at most 200' }).default(25),
});
export type CompletionQuery = z.infer<typeof CompletionQuery>;

export const CompletionRow = z.object({
  id: Id,
  coreId: Id,
  coreTag: z.string(),
  doorId: Id.nullable(),
  doorLabel: z.string().nullable(),
  workOrderId: Id.nullable(),
  workOrderNumber: z.number().nullable(),
  workOrderTitle: z.string().nullable(),
  technicianId: Id,
  technicianName: z.string(),
  startedAt: z.string(),
  finishedAt: z.string(),
  receivedAt: z.string(),
  result: z.enum(['passed', 'failed']),
  attemptCount: z.number(),
  failedChecks: z.number(),
  /** The core's newest install: where it IS (doorLabel above is the door it was built for). Null when not installed. */
  installId: Id.nullable(),
  installDoorId: Id.nullable(),
  installDoorLabel: z.string().nullable(),
  installedAt: z.string().nullable(),
  removedCoreTag: z.string().nullable(),
  /** Installed in another door than the planned one (the technician gave a reason); null when not installed. */
  doorMismatch: z.boolean().nullable(),
  mismatchReviewedAt: z.string().nullable(),
});
export type CompletionRow = z.infer<typeof CompletionRow>;

export const CompletionPage = z.object({
  rows: z.array(CompletionRow),
  total: z.number(),
  page: z.number(),
  pageSize: z.number(),
});
export type CompletionPage = z.infer<typeof CompletionPage>;

/** The core's newest install as the completion detail shows it. */
export const CompletionInstall = z.object({
  id: z.uuid(),
  doorLabel: z.string(),
  installedAt: z.string(),
  installedBy: z.string(),
  removedCoreTag: z.string().nullable(),
  notes: z.string().nullable(),
  doorMismatch: z.boolean(),
  mismatchReason: z.string().nullable(),
  plannedDoorLabel: z.string().nullable(),
  reviewedAt: z.string().nullable(),
  reviewedBy: z.string().nullable(),
});
export type CompletionInstall = z.infer<typeof CompletionInstall>;
export const CompletionDetail = CompletionRow.extend({
  attempts: z.array(Attempt),
  notes: z.string().nullable(),
  deviceId: z.string().nullable(),
  install: CompletionInstall.nullable(),
  /** The per-part sizes are sealed; they come back only on an audited reveal. */
  hasPinSizes: z.boolean(),
  /** Each key symbol of the core's system with its level, to name a master by its level. */
  keyLevels: z.record(z.string(), KeyLevel).default({}),
});
export type CompletionDetail = z.infer<typeof CompletionDetail>;
export const CompletionAnswer = z.object({ completion: CompletionDetail });
export type CompletionAnswer = z.infer<typeof CompletionAnswer>;
