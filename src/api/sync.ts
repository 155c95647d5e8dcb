import { SyncResponse, type SyncRecord } from '@shared/schemas/sync';
import { request } from './http';

export interface SyncBatch {
  deviceId: string;
  records: SyncRecord[];
}

export const sendSync = (batch: SyncBatch) => request('POST', '/api/sync', { body: batch, schema: SyncResponse });
