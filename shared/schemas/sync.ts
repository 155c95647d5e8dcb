/**
 * Sync: the tablet's outbox sends finished work; the server answers per record.
 * A record's clientId is made on the tablet (UUID) and is the idempotency key: the same
 * record sent again is a duplicate, never a second row; the same clientId with another
 * payload is refused (conflict) and the stored row stays as it was.
 */
import { z } from 'zod';
import { chamberRange, partSizeRange } from '../keying/limits';
import { Id, IsoDateTime, Name, Notes, Text } from './common';

export const BenchStepKind = z.enum(['bottom', 'master', 'buildUp', 'top', 'level-check', 'springs', 'cap']);
export type BenchStepKind = z.infer<typeof BenchStepKind>;

export const BenchStep = z.strictObject({
  kind: BenchStepKind,
  chamber: z.number().int().min(1).max(chamberRange.max).nullable(),
  size: z.number().int().min(partSizeRange.min).max(partSizeRange.max).nullable(),
  at: IsoDateTime,
  /** true when the technician redid this chamber: the earlier steps stay in the record. */
  redo: z.boolean().optional(),
});
export type BenchStep = z.infer<typeof BenchStep>;

export const KeyCheckResult = z.strictObject({
  phase: z.enum(['before-cap', 'after-cap']),
  role: z.enum(['change', 'master', 'cross', 'control', 'must-not-turn']),
  symbol: Name(24, 'the key symbol'),
  result: z.enum(['passed', 'failed']),
  /** What happened, asked for on a failure. */
  note: Notes(500, 'the note').optional(),
  at: IsoDateTime,
});
export type KeyCheckResult = z.infer<typeof KeyCheckResult>;

/** A core is loaded at most this many times in one completion record (the Bench stops offering a rebuild). */
export const BUILD_ATTEMPT_LIMIT = 50;

export const Attempt = z.strictObject({
  n: z.number().int().min(1).max(BUILD_ATTEMPT_LIMIT),
  startedAt: IsoDateTime,
  finishedAt: IsoDateTime,
  result: z.enum(['passed', 'failed']),
  steps: z.array(BenchStep).max(400),
  keyChecks: z.array(KeyCheckResult).max(100),
});
export type Attempt = z.infer<typeof Attempt>;

/** What every record the tablet sends starts with: its own id (the idempotency key), its kind and its core. */
const recordOf = <K extends string>(kind: K) => ({ clientId: Id, kind: z.literal(kind), coreId: Id });

export const CompletionRecord = z.strictObject({
  ...recordOf('completion'),
  workOrderId: Id,
  startedAt: IsoDateTime,
  finishedAt: IsoDateTime,
  /** passed: built, checked, capped and checked again; failed: set aside for a rebuild. */
  result: z.enum(['passed', 'failed']),
  attempts: z.array(Attempt).min(1, { error: 'a completion has at least one attempt' }).max(BUILD_ATTEMPT_LIMIT),
  notes: Notes(2000, 'the notes').optional(),
});
export type CompletionRecord = z.infer<typeof CompletionRecord>;

export const InstallRecord = z.strictObject({
  ...recordOf('install'),
  doorId: Id,
  /** The tag of the core taken out of the door, when there was one. */
  removedCoreTag: Text(24, 'the removed core tag').nullable(),
  installedAt: IsoDateTime,
  notes: Notes(1000, 'the notes').optional(),
  /** Why the core goes into another door than the planned one; required then (the office reviews it). */
  mismatchReason: Notes(500, 'the reason').optional(),
});
export type InstallRecord = z.infer<typeof InstallRecord>;

export const SyncRecord = z.discriminatedUnion('kind', [CompletionRecord, InstallRecord], { error: "kind must be 'completion' or 'install'" });
export type SyncRecord = z.infer<typeof SyncRecord>;

export const MAX_SYNC_RECORDS = 100;
/** Records are checked one by one, so one bad record never stops the others. */
export const SyncRequest = z.strictObject({
  deviceId: Id,
  /** What the tablet's outbox holds as it sends (these records included), so the office sees what is still out there. */
  outbox: z.strictObject({ waiting: z.number().int().min(0).max(1_000_000) }).optional(),
  records: z.array(z.unknown()).min(1, { error: 'send at least one record' }).max(MAX_SYNC_RECORDS, { error: `send at most ${MAX_SYNC_RECORDS} records per request` }),
});
export type SyncRequest = z.infer<typeof SyncRequest>;

export const SyncRejection = z.object({
  clientId: z.string().nullable(),
  index: z.number(),
  error: z.object({ code: z.string(), message: z.string(), details: z.array(z.object({ field: z.string().optional(), message: z.string() })).optional() }),
});
export type SyncRejection = z.infer<typeof SyncRejection>;

export const SyncResponse = z.object({
  accepted: z.array(z.string()),
  duplicates: z.array(z.string()),
  rejected: z.array(SyncRejection),
  /** Set when an administrator revoked this device: the tablet must wipe its packets. */
  deviceRevoked: z.boolean().optional(),
});
export type SyncResponse = z.infer<typeof SyncResponse>;
