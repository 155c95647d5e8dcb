import type { SyncRecord } from '@shared/schemas/sync';
import { progressEntry, type BenchProgress } from './bench';
import { KEY, commit } from './db';
import { resultOf, type WriteResult } from './errors';
import { entry } from './outbox';

export interface ProgressUpdate {
  coreId: string;
  /** null clears the core's Bench progress in the same transaction. */
  progress: BenchProgress | null;
}

/**
 * The state change and the outbox entry recording it commit in one IndexedDB transaction:
 * after a crash both exist or neither (reliability.md S10). Both are sealed before the
 * transaction opens, because an IndexedDB transaction closes while awaiting WebCrypto.
 */
export async function recordFinished(update: ProgressUpdate, record: SyncRecord): Promise<WriteResult> {
  const keys = [KEY.bench(update.coreId), KEY.outbox(record.clientId)];
  try {
    const outboxEntry = await entry(record);
    const puts = update.progress ? [await progressEntry(update.coreId, update.progress), outboxEntry] : [outboxEntry];
    await commit(puts, update.progress ? [] : [KEY.bench(update.coreId)]);
    return resultOf(keys);
  } catch (err) {
    return resultOf(keys, err);
  }
}
