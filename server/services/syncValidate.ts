/**
 * Sync step 1, validate: each record alone, before anything is read from the database. A bad
 * record is rejected naming its field and the others go on (reliability.md S5, T2).
 */
import { SyncRecord, type CompletionRecord, type InstallRecord, type SyncRejection, type SyncResponse } from '../../shared/schemas/sync';
import { zodDetails } from '../errors';
import { hashRecord } from './canonical';

export interface Item<R> {
  index: number;
  record: R;
  hash: string;
}

export const CONFLICT = 'A different record with this client id is stored already; the stored one was kept.';

/** The answer being built for one batch. */
export class BatchAnswer {
  readonly response: SyncResponse = { accepted: [], duplicates: [], rejected: [] };
  reject(index: number, clientId: string | null, code: string, message: string, details?: SyncRejection['error']['details']): false {
    this.response.rejected.push({ clientId, index, error: { code, message, ...(details ? { details } : {}) } });
    return false;
  }
  isRejected(clientId: string): boolean {
    return this.response.rejected.some((x) => x.clientId === clientId);
  }
}

/** The path of the first string holding a NUL (Postgres text and jsonb cannot store one), or null. */
export function nulPath(value: unknown, path: string[] = []): string | null {
  if (typeof value === 'string') return value.includes('\u0000') ? path.join('.') : null;
  if (Array.isArray(value)) {
    for (const [i, v] of value.entries()) {
      const p = nulPath(v, [...path, String(i)]);
      if (p !== null) return p;
    }
    return null;
  }
  if (value && typeof value === 'object') {
    for (const [k, v] of Object.entries(value)) {
      const p = nulPath(v, [...path, k]);
      if (p !== null) return p;
    }
  }
  return null;
}

export function validateBatch(raw: unknown[], answer: BatchAnswer): { completions: Item<CompletionRecord>[]; installs: Item<InstallRecord>[] } {
  const completions: Item<CompletionRecord>[] = [];
  const installs: Item<InstallRecord>[] = [];
  const seen = new Map<string, string>();
  raw.forEach((item, index) => {
    const result = SyncRecord.safeParse(item);
    const clientId = typeof (item as { clientId?: unknown })?.clientId === 'string' ? (item as { clientId: string }).clientId : null;
    if (!result.success) {
      const details = zodDetails(result.error);
      return answer.reject(index, clientId, 'validation', `Record ${index + 1}: ${details[0]?.field ? `${details[0].field}: ` : ''}${details[0]?.message ?? 'invalid'}`, details);
    }
    const nul = nulPath(result.data);
    if (nul !== null) return answer.reject(index, clientId, 'validation', `Record ${index + 1}: ${nul}: holds a NUL character; remove it`, [{ field: nul, message: 'holds a NUL character; remove it' }]);
    const hash = hashRecord(result.data);
    // The same client id twice in one batch: the second is a duplicate or a conflict of the first.
    const earlier = seen.get(result.data.clientId);
    if (earlier !== undefined) {
      if (earlier === hash) answer.response.duplicates.push(result.data.clientId);
      else answer.reject(index, result.data.clientId, 'conflict', CONFLICT);
      return;
    }
    seen.set(result.data.clientId, hash);
    if (result.data.kind === 'completion') {
      if (new Date(result.data.finishedAt) < new Date(result.data.startedAt)) return answer.reject(index, result.data.clientId, 'validation', `Record ${index + 1}: finishedAt is before startedAt.`, [{ field: 'finishedAt', message: 'is before startedAt' }]);
      completions.push({ index, record: result.data, hash });
    } else installs.push({ index, record: result.data, hash });
  });
  return { completions, installs };
}
