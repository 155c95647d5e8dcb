import { SyncResponse, type SyncRecord } from '@shared/schemas/sync';
import { request } from './http';

export interface SyncBatch {
  deviceId: string;
  records: SyncRecord[];
  /** How many records the outbox holds as this batch goes, these included. */
  outbox?: { waiting: number };
}

export const sendSync = (batch: SyncBatch) => request('POST', '/api/sync', { body: batch, schema: SyncResponse });
