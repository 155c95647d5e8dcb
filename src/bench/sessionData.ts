/**
 * The stored form of a Bench session. The offline layer keeps sessions in IndexedDB, so
 * the shape carries `v` and every read goes through up(): it checks the data and lifts
 * an older version to the current one, or refuses data it cannot trust.
 */
import { z } from 'zod';
import { KeyCheckItem } from '@shared/schemas/packet';
import { BenchStep, BenchStepKind, KeyCheckResult } from '@shared/schemas/sync';
import { IsoDateTime } from '@shared/schemas/common';
import { BENCH_SESSION_VERSION, type BenchSession } from './session';

const Count = z.number().int().min(0);
const Redo = z.strictObject({ chamber: Count, resumeAt: Count });

const LoadingStepData = z.strictObject({
  id: z.string(),
  kind: BenchStepKind,
  chamber: Count.nullable(),
  size: Count.nullable(),
  partLabel: z.string(),
  indexInChamber: Count.nullable(),
  ofKind: z.strictObject({ n: Count, of: Count }).nullable(),
  stackHeightAfter: Count.nullable(),
});

const Trail = z.discriminatedUnion('t', [
  z.strictObject({ t: z.literal('step'), i: Count, redo: Redo.nullable() }),
  z.strictObject({ t: z.literal('redo'), cursor: Count, redo: Redo.nullable() }),
  z.strictObject({ t: z.literal('cap') }),
  z.strictObject({ t: z.literal('check') }),
]);

const Outcome = z.enum(['passed', 'failed']);

export const BenchSessionV1 = z.strictObject({
  v: z.literal(1),
  coreId: z.string(),
  plan: z.array(LoadingStepData),
  checks: z.array(KeyCheckItem),
  phase: z.enum(['loading', 'key-check-before-cap', 'capping', 'key-check-after-cap', 'rebuild', 'done']),
  cursor: Count,
  checkIndex: Count,
  redo: Redo.nullable(),
  trail: z.array(Trail),
  attempts: z.array(z.strictObject({
    n: z.number().int().min(1),
    startedAt: IsoDateTime,
    finishedAt: IsoDateTime.nullable(),
    result: Outcome.nullable(),
    steps: z.array(BenchStep),
    keyChecks: z.array(KeyCheckResult),
  })).min(1),
  startedAt: IsoDateTime,
  updatedAt: IsoDateTime,
  finishedAt: IsoDateTime.nullable(),
  result: Outcome.nullable(),
  notes: z.string().nullable(),
});

/** JSON for storage; plain data already, so this is only the one place that says so. */
export function serialise(s: BenchSession): string {
  return JSON.stringify(s);
}

export function deserialise(text: string): BenchSession {
  return up(JSON.parse(text));
}

/**
 * Stored data to the current shape. Version 1 is the first, so today this checks and
 * returns; a v2 adds a `case 1:` that maps v1 onto v2 before the check.
 * Throws on data from a newer app or data that does not check, so the caller can keep
 * the raw entry rather than resume a corrupt session.
 */
export function up(raw: unknown): BenchSession {
  const v = typeof raw === 'object' && raw !== null ? (raw as { v?: unknown }).v : undefined;
  if (typeof v !== 'number') throw new Error('This stored Bench session has no version: it cannot be resumed.');
  if (v > BENCH_SESSION_VERSION) throw new Error(`This Bench session was saved by a newer version (v${v}): update the app to resume it.`);
  return BenchSessionV1.parse(raw);
}
