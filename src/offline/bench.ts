/**
 * Owns Bench progress ("bench:<coreId>"), sealed with the packet key so it survives a lock
 * and a reload but goes with the packets on a wipe. The Bench UI decides what progress
 * holds; this module needs only which core and work order it belongs to.
 */
import { z } from 'zod';
import { KEY, commit, readOne } from './db';
import { IntegrityError, reportProblem, resultOf, type WriteResult } from './errors';
import { openRecord, sealRecord, type SealedRecord } from './sealedRecord';

export const BenchProgress = z.looseObject({ coreId: z.string(), workOrderId: z.string(), updatedAt: z.string() });
export type BenchProgress = z.infer<typeof BenchProgress>;

export interface BenchMeta {
  workOrderId: string;
}

export async function progressEntry(coreId: string, progress: BenchProgress): Promise<[string, SealedRecord<BenchMeta>]> {
  const key = KEY.bench(coreId);
  return [key, await sealRecord<BenchMeta>('packet', key, progress, { workOrderId: progress.workOrderId })];
}

export async function getProgress(coreId: string): Promise<BenchProgress | null> {
  const key = KEY.bench(coreId);
  const stored = await readOne<SealedRecord<BenchMeta>>(key);
  if (!stored) return null;
  try {
    return await openRecord<BenchProgress>('packet', key, stored);
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
