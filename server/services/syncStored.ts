/**
 * Client ids already stored: answered from what is stored, never written again. Asked only after
 * authorise (T10: another technician must not learn that a record exists), and again for records
 * a parallel request landed first.
 */
import type { Knex } from 'knex';
import type { CompletionRecord, InstallRecord } from '../../shared/schemas/sync';
import { CONFLICT, type BatchAnswer, type Item } from './syncValidate';

type Stored = Map<string, 'duplicate' | 'conflict'>;
type Records = { completions: Item<CompletionRecord>[]; installs: Item<InstallRecord>[] };

/** A duplicate when the stored payload matches, else a conflict. */
async function storedOutcomes(db: Knex, table: 'completions' | 'installs', items: Item<{ clientId: string }>[]): Promise<Stored> {
  const out: Stored = new Map();
  if (!items.length) return out;
  const rows = await db(table).whereIn('id', items.map((i) => i.record.clientId)).select('id', 'payload_hash');
  const hashOf = new Map(rows.map((r: { id: string; payload_hash: string }) => [r.id, r.payload_hash]));
  for (const i of items) {
    const stored = hashOf.get(i.record.clientId);
    if (stored) out.set(i.record.clientId, stored === i.hash ? 'duplicate' : 'conflict');
  }
  return out;
}

/** Answers the records whose client id is stored already; returns the others. */
export async function withoutStored<B extends Records>(db: Knex, batch: B, answer: BatchAnswer): Promise<B> {
  const storedC = await storedOutcomes(db, 'completions', batch.completions);
  const storedI = await storedOutcomes(db, 'installs', batch.installs);
  const fresh = <R extends { clientId: string }>(items: Item<R>[], stored: Stored) =>
    items.filter((i) => {
      const s = stored.get(i.record.clientId);
      if (s === 'duplicate') answer.response.duplicates.push(i.record.clientId);
      else if (s === 'conflict') answer.reject(i.index, i.record.clientId, 'conflict', CONFLICT);
      return !s;
    });
  const installs = fresh(batch.installs, storedI);
  const completions = fresh(batch.completions, storedC);
  return { ...batch, completions, installs };
}

/** Records neither landed nor refused: a parallel request landed them first, so the stored one answers. */
export async function answerLost(db: Knex, lost: Item<CompletionRecord | InstallRecord>[], answer: BatchAnswer): Promise<void> {
  if (!lost.length) return;
  const again = new Map([
    ...(await storedOutcomes(db, 'completions', lost.filter((i) => i.record.kind === 'completion'))),
    ...(await storedOutcomes(db, 'installs', lost.filter((i) => i.record.kind === 'install'))),
  ]);
  for (const i of lost) {
    if (again.get(i.record.clientId) === 'duplicate') answer.response.duplicates.push(i.record.clientId);
    else answer.reject(i.index, i.record.clientId, 'conflict', CONFLICT);
  }
}
