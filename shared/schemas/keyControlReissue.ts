/**
 * Re-issue tasks: when a lost key's rekey is installed and the old key retired, every holder of a
 * copy of it gets one; the office closes it by issuing the new key (symbol and copy number only).
 */
import { z } from 'zod';
import { Id, IsoDate } from './common';
import { Acknowledgement } from './keyControl';

export const ReissueTask = z.object({
  id: Id,
  reportId: Id,
  holderId: Id,
  holderName: z.string(),
  department: z.string(),
  oldKeySymbol: z.string(),
  oldCopyNumber: z.number(),
  /** What became of the old copy: out (to take back), returned, or the reported lost or stolen one. */
  oldCopyStatus: z.enum(['out', 'returned', 'lost', 'stolen']),
  newKeyId: Id,
  newKeySymbol: z.string(),
  status: z.enum(['open', 'done']),
  /** The copy issued to close the task. */
  newCopyNumber: z.number().nullable(),
  createdAt: z.string(),
  doneAt: z.string().nullable(),
});
export type ReissueTask = z.infer<typeof ReissueTask>;
export const ReissueTaskList = z.object({ tasks: z.array(ReissueTask) });
export type ReissueTaskList = z.infer<typeof ReissueTaskList>;
export const ReissueTaskAnswer = z.object({ task: ReissueTask });
export type ReissueTaskAnswer = z.infer<typeof ReissueTaskAnswer>;

export const ReissueTaskQuery = z.strictObject({ status: z.enum(['open', 'done'], { error: 'status is open or done' }).optional() });
export const ReissueInput = z.strictObject({ dueDate: IsoDate.optional(), acknowledgement: Acknowledgement });
export type ReissueInput = z.infer<typeof ReissueInput>;
