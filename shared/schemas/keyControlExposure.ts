/**
 * What a key exposes (the cores it turns or removes as installed, and who else holds it), the
 * lost or stolen report that records it, and who can open a door / what a holder can open.
 * `how`: intended (the key is one of the core's operating keys), incidental (it turns the core
 * only through master wafers) or control (it lines up the control shear line: removes the core).
 */
import { z } from 'zod';
import { Id, Notes } from './common';

export const ExposureHow = z.enum(['intended', 'incidental', 'control']);
export type ExposureHow = z.infer<typeof ExposureHow>;

export const ExposedCore = z.object({ id: Id, tag: z.string(), doorId: Id.nullable(), doorLabel: z.string().nullable(), how: ExposureHow });
export type ExposedCore = z.infer<typeof ExposedCore>;

export const ExposedHolder = z.object({ issueId: Id, holderId: Id, name: z.string(), department: z.string(), copyNumber: z.number(), status: z.enum(['out', 'lost', 'stolen']) });
export type ExposedHolder = z.infer<typeof ExposedHolder>;

export const Exposure = z.object({
  keySystemId: Id,
  /** The key, or the control key on record; null for the system's control key read without a record (control-exposure). */
  keyId: Id.nullable(),
  keySymbol: z.string(),
  cores: z.array(ExposedCore),
  /** Every other holder of a copy of this key (copies out, or reported lost or stolen). */
  holders: z.array(ExposedHolder),
  counts: z.object({ cores: z.number(), intended: z.number(), incidental: z.number(), control: z.number(), doors: z.number(), holders: z.number() }),
});
export type Exposure = z.infer<typeof Exposure>;
export const ExposureAnswer = z.object({ exposure: Exposure });
export type ExposureAnswer = z.infer<typeof ExposureAnswer>;

export const KeyReportInput = z.strictObject({
  kind: z.enum(['lost', 'stolen'], { error: 'kind is lost or stolen' }),
  note: Notes(1000, 'the note').optional(),
});
export type KeyReportInput = z.infer<typeof KeyReportInput>;

/** A core an old key still turned when the report was last checked after its rebuild: the key by symbol, no bitting. */
export const RemainingCore = z.object({ coreId: Id, tag: z.string(), doorId: Id.nullable(), doorLabel: z.string().nullable(), keySymbol: z.string(), how: ExposureHow });
export type RemainingCore = z.infer<typeof RemainingCore>;

/** Closing a report by hand: the supervisor accepts the cores the old keys still turn, and says why. */
export const KeyReportCloseInput = z.strictObject({
  note: Notes(1000, 'the note').refine((s) => s.length >= 3, { error: 'the note says why the cores the old key still turns are accepted (3 characters or more)' }),
});
export type KeyReportCloseInput = z.infer<typeof KeyReportCloseInput>;

export const KeyReport = z.object({
  id: Id,
  issueId: Id,
  holderId: Id,
  holderName: z.string(),
  keyId: Id,
  keySymbol: z.string(),
  /** A copy of the system's control key: its exposure is every core built for it. */
  control: z.boolean(),
  copyNumber: z.number(),
  kind: z.enum(['lost', 'stolen']),
  note: z.string().nullable(),
  status: z.enum(['open', 'closed']),
  workOrderId: Id.nullable(),
  createdAt: z.string(),
  closedAt: z.string().nullable(),
  /** When the rekey work order was all installed: the old keys retired, their holders' re-issue tasks made. */
  rebuiltAt: z.string().nullable(),
  /** The installed cores the old keys still turned at the last check after the rebuild (null: not checked yet). */
  remaining: z.array(RemainingCore).nullable(),
  /** Closed by hand, accepting `remaining`: who, and why. */
  closedByName: z.string().nullable(),
  closeNote: z.string().nullable(),
  exposure: Exposure,
});
export type KeyReport = z.infer<typeof KeyReport>;
export const KeyReportAnswer = z.object({ report: KeyReport });
export type KeyReportAnswer = z.infer<typeof KeyReportAnswer>;
export const KeyReportList = z.object({ reports: z.array(KeyReport.omit({ exposure: true }).extend({ counts: Exposure.shape.counts })) });
export type KeyReportList = z.infer<typeof KeyReportList>;

/** Every holder whose key turns the door's installed core. */
export const DoorAccess = z.object({
  coreId: Id.nullable(),
  coreTag: z.string().nullable(),
  holders: z.array(z.object({ holderId: Id, name: z.string(), department: z.string(), issueId: Id, keyId: Id, keySymbol: z.string(), copyNumber: z.number(), how: ExposureHow })),
});
export type DoorAccess = z.infer<typeof DoorAccess>;

/** Every door the holder's keys (copies out) turn. */
export const HolderAccess = z.object({
  doors: z.array(z.object({ doorId: Id, doorLabel: z.string(), coreId: Id, coreTag: z.string(), issueId: Id, keyId: Id, keySymbol: z.string(), copyNumber: z.number(), how: ExposureHow })),
});
export type HolderAccess = z.infer<typeof HolderAccess>;
