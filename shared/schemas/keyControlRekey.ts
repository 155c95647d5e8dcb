/**
 * The rekey plan after a lost or stolen key: for a change key, a new change key from the unused
 * keys of its master's progression that passes the system audit, and the cores to re-pin; for a
 * master, the choices with the cores to build and the keys to re-issue. Never a bitting.
 */
import { z } from 'zod';
import { Id, IsoDate } from './common';
import { KeySymbol } from './records';

export const PlanCore = z.object({ coreId: Id, tag: z.string(), doorId: Id.nullable(), doorLabel: z.string().nullable() });
export type PlanCore = z.infer<typeof PlanCore>;

/** `new-control-key`: a lost control key; a new control key for the system and every core it removes rebuilt for it. */
export const RekeyOption = z.enum(['new-change-key', 're-master', 'rekey-under-master', 'new-control-key'], { error: 'option is new-change-key, re-master, rekey-under-master or new-control-key' });
export type RekeyOption = z.infer<typeof RekeyOption>;

export const RekeyChoice = z.object({
  option: RekeyOption,
  description: z.string(),
  coresToBuild: z.number(),
  keysToReissue: z.number(),
  /** Why this choice cannot be made in one step on this system (no key that shuts the lost one out), or null. */
  blocked: z.string().nullable(),
});
export type RekeyChoice = z.infer<typeof RekeyChoice>;

export const RekeyPlan = z.object({
  reportId: Id,
  /** `control`: the lost key is a control key of the system (its id is the control key's record). */
  lostKey: z.object({ id: Id, symbol: z.string(), level: z.enum(['ggm', 'gm', 'master', 'change', 'control']) }),
  /** The symbol the lost key's replacement would take (the new change key, or the new master of the first choice that can be made); null when none can be made. */
  newKeySymbol: z.string().nullable(),
  /** Unused keys of the progression that pass the system audit (the first is proposed). */
  unusedKeysPassing: z.number(),
  coresToRepin: z.array(PlanCore),
  /** Cores the lost key turns only through master wafers: re-pinning them for the same keys does not shut it out. */
  incidentalCores: z.array(PlanCore),
  /** Copies out of the lost key (and, for a master, of the keys under it) and the reported copy: each holder gets the new key. */
  copiesToReissue: z.array(z.object({ issueId: Id, holderId: Id, holderName: z.string(), keySymbol: z.string(), copyNumber: z.number() })),
  choices: z.array(RekeyChoice),
  workOrderId: Id.nullable(),
  /** The choice the work order was made with, once it is. */
  chosen: RekeyOption.nullable(),
});
export type RekeyPlan = z.infer<typeof RekeyPlan>;
export const RekeyPlanAnswer = z.object({ plan: RekeyPlan });
export type RekeyPlanAnswer = z.infer<typeof RekeyPlanAnswer>;

export const RekeyWorkOrderInput = z.strictObject({
  /** One of the plan's choices; its first choice when left out. */
  option: RekeyOption.optional(),
  assigneeId: Id.nullable().optional(),
  dueDate: IsoDate.nullable().optional(),
  /** The new key's symbol (the lost key's replacement); the plan's suggestion when left out. */
  newKeySymbol: KeySymbol.optional(),
});
export type RekeyWorkOrderInput = z.infer<typeof RekeyWorkOrderInput>;

export const RekeyWorkOrderDone = z.object({ workOrderId: Id, newKeyId: Id, newKeySymbol: z.string(), plan: RekeyPlan });
export type RekeyWorkOrderDone = z.infer<typeof RekeyWorkOrderDone>;
