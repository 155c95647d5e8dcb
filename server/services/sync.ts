/**
 * Sync: lands the tablet's finished work; the server decides what each record means
 * (reliability.md S1-S6, T2-T5, T9). A batch goes through four steps, record by record, a bad
 * record rejected with its reason while the rest go on:
 *   validate (syncValidate.ts)   shape, NUL bytes, the same client id twice in the batch;
 *   authorise (syncAuthorise.ts) core and work order assigned to this user, times in range;
 *     then stored client ids are answered duplicate or conflict (only after access);
 *   derive (here)                a "passed" claim must be borne out by the record (completionEvidence.ts);
 *   land (syncLand.ts)           ONE transaction: a batch cut off half-way commits nothing, and
 *                                its replay lands each record exactly once.
 */
import type { Knex } from 'knex';
import type { CompletionRecord, SyncResponse } from '../../shared/schemas/sync';
import { missingForPassed } from './completionEvidence';
import type { Sealer } from './secrets';
import { authorise, type SyncUser } from './syncAuthorise';
import { landChecked, type SyncEvent } from './syncLand';
import { loadCorePlans, type CorePlan } from './syncPlans';
import { BatchAnswer, CONFLICT, validateBatch, type Item } from './syncValidate';

export type { SyncUser } from './syncAuthorise';
export type { SyncEvent } from './syncLand';

/** Client ids already stored: a duplicate when the payload matches, else a conflict. */
async function storedOutcomes(db: Knex, table: 'completions' | 'installs', items: Item<{ clientId: string }>[]): Promise<Map<string, 'duplicate' | 'conflict'>> {
  const out = new Map<string, 'duplicate' | 'conflict'>();
  if (!items.length) return out;
  const rows = await db(table).whereIn('id', items.map((i) => i.record.clientId)).select('id', 'payload_hash');
  const hashOf = new Map(rows.map((r: { id: string; payload_hash: string }) => [r.id, r.payload_hash]));
  for (const i of items) {
    const stored = hashOf.get(i.record.clientId);
    if (stored) out.set(i.record.clientId, stored === i.hash ? 'duplicate' : 'conflict');
  }
  return out;
}

/** Postgres may still pick a deadlock victim (for example against an admin's edit): retry the batch a few times. */
async function withDeadlockRetry<T>(run: () => Promise<T>, tries = 4): Promise<T> {
  for (let attempt = 1; ; attempt++) {
    try {
      return await run();
    } catch (err) {
      const code = (err as { code?: string }).code;
      if (attempt >= tries || (code !== '40P01' && code !== '40001')) throw err;
      await new Promise((r) => setTimeout(r, 20 * attempt + Math.random() * 30));
    }
  }
}

/** A completion claiming "passed" lands only when its last attempt bears it out; a failed one is evidence and lands as it is. */
function derive(items: Item<CompletionRecord>[], plans: Map<string, CorePlan>, answer: BatchAnswer, tagOf: (coreId: string) => string): Item<CompletionRecord>[] {
  return items.filter(({ index, record: r }) => {
    if (r.result !== 'passed') return true;
    const missing = missingForPassed(r, plans.get(r.coreId)!);
    if (!missing.length) return true;
    return answer.reject(index, r.clientId, 'unprocessable', `Record ${index + 1}: core ${tagOf(r.coreId)} cannot be recorded as passed: missing ${missing.join('; ')}. Finish the key check or record the core as failed.`, missing.map((m) => ({ field: 'attempts', message: m })));
  });
}

export async function landBatch(db: Knex, sealer: Sealer, user: SyncUser, deviceId: string, raw: unknown[]): Promise<{ response: SyncResponse; events: SyncEvent[] }> {
  const answer = new BatchAnswer();
  const { response } = answer;
  const valid = validateBatch(raw, answer);
  const authorised = await authorise(db, user, valid, answer);

  // Already stored: answered from what is stored, never written again.
  const storedC = await storedOutcomes(db, 'completions', authorised.completions);
  const storedI = await storedOutcomes(db, 'installs', authorised.installs);
  const fresh = <R extends { clientId: string }>(items: Item<R>[], stored: Map<string, 'duplicate' | 'conflict'>) =>
    items.filter((i) => {
      const s = stored.get(i.record.clientId);
      if (s === 'duplicate') response.duplicates.push(i.record.clientId);
      else if (s === 'conflict') answer.reject(i.index, i.record.clientId, 'conflict', CONFLICT);
      return !s;
    });
  const newI = fresh(authorised.installs, storedI);
  let newC = fresh(authorised.completions, storedC);

  const plans = await loadCorePlans(db, sealer, [...new Set([...newC, ...newI].map((i) => i.record.coreId))]);
  newC = derive(newC, plans, answer, (id) => authorised.cores.get(id)!.tag);

  const landed = await withDeadlockRetry(() => db.transaction((trx) => landChecked(trx, sealer, { user, deviceId, completions: newC, installs: newI, cores: authorised.cores, plans })));
  for (const r of landed.refused) answer.reject(r.index, r.clientId, r.code, r.message, r.field ? [{ field: r.field, message: r.message }] : undefined);

  // Records a parallel request landed first: answered from what is stored.
  const lost = [...newC, ...newI].filter((i) => !landed.accepted.has(i.record.clientId) && !answer.isRejected(i.record.clientId));
  if (lost.length) {
    const again = new Map([...(await storedOutcomes(db, 'completions', lost.filter((i) => i.record.kind === 'completion'))), ...(await storedOutcomes(db, 'installs', lost.filter((i) => i.record.kind === 'install')))]);
    for (const i of lost) {
      if (again.get(i.record.clientId) === 'duplicate') response.duplicates.push(i.record.clientId);
      else answer.reject(i.index, i.record.clientId, 'conflict', CONFLICT);
    }
  }
  response.accepted = [...newC, ...newI].filter((i) => landed.accepted.has(i.record.clientId)).map((i) => i.record.clientId);
  response.rejected.sort((a, b) => a.index - b.index);
  return { response, events: landed.events };
}
