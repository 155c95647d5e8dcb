/**
 * Owns Bench progress ("bench:<coreId>"). It is sealed with the outbox key, which the
 * server's escrow key also wraps, so a half-built core survives a lock, a reload, a
 * forgotten passphrase and a lockout (it comes back after a fresh online sign-in), as
 * finished work does. Progress saved before that (meta without `escrowed`) was sealed with
 * the packet key and still opens with it until a wipe. The Bench UI decides what progress
 * holds; this module needs only which core and work order it belongs to.
 */
import { z } from 'zod';
import { KEY, commit, keysWithPrefix, readOne, readPrefix } from './db';
import { IntegrityError, reportProblem, resultOf, type WriteResult } from './errors';
import { openRecord, sealRecord, type SealedRecord } from './sealedRecord';

export const BenchProgress = z.looseObject({ coreId: z.string(), workOrderId: z.string(), updatedAt: z.string() });
export type BenchProgress = z.infer<typeof BenchProgress>;

export interface BenchMeta {
  workOrderId: string;
  /** true: sealed with the (escrowed) outbox key; absent on progress saved by older versions. */
  escrowed?: true;
}

const keyNameOf = (stored: SealedRecord<BenchMeta>) => (stored.meta?.escrowed ? 'outbox' : 'packet');

export async function progressEntry(coreId: string, progress: BenchProgress): Promise<[string, SealedRecord<BenchMeta>]> {
  const key = KEY.bench(coreId);
  return [key, await sealRecord<BenchMeta>('outbox', key, progress, { workOrderId: progress.workOrderId, escrowed: true })];
}

/** Keys of progress a wipe cannot keep (sealed with the packet key, which the wipe drops). */
export async function unescrowedKeys(): Promise<string[]> {
  return (await readPrefix<SealedRecord<BenchMeta>>('bench:')).filter(([, s]) => !s.meta?.escrowed).map(([key]) => key);
}

export interface ProgressSummary {
  /** Cores in progress that a forgotten passphrase or a lockout does not lose. */
  kept: number;
  /** Cores in progress that a wipe loses (saved by an older version, under the packet key). */
  lost: number;
  /** Work orders whose progress it is. */
  workOrders: number;
  /** Packets kept on this tablet: every wipe takes them. */
  packets: number;
}

/** Works while locked: counts from the plain metadata only. */
export async function progressSummary(): Promise<ProgressSummary> {
  const all = await readPrefix<SealedRecord<BenchMeta>>('bench:');
  const kept = all.filter(([, s]) => s.meta?.escrowed).length;
  const packets = (await keysWithPrefix('packet:')).length;
  return { kept, lost: all.length - kept, workOrders: new Set(all.map(([, s]) => s.meta?.workOrderId)).size, packets };
}

export async function getProgress(coreId: string): Promise<BenchProgress | null> {
  const key = KEY.bench(coreId);
  const stored = await readOne<SealedRecord<BenchMeta>>(key);
  if (!stored) return null;
  try {
    return await openRecord<BenchProgress>(keyNameOf(stored), key, stored);
  } catch (err) {
    if (!(err instanceof IntegrityError)) throw err;
    reportProblem({ key, kind: 'damaged', message: err.message });
    return null;
  }
}

export async function saveProgress(coreId: string, progress: BenchProgress): Promise<WriteResult> {
  const key = KEY.bench(coreId);
  try {
    await commit([await progressEntry(coreId, progress)]);
    return resultOf([key]);
  } catch (err) {
    return resultOf([key], err);
  }
}

export async function clearProgress(coreId: string): Promise<WriteResult> {
  const key = KEY.bench(coreId);
  try {
    await commit([], [key]);
    return resultOf([key]);
  } catch (err) {
    return resultOf([key], err);
  }
}
