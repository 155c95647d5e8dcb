/**
 * Sync: lands the tablet's finished work; the server decides what each record means
 * (reliability.md S1-S6, T2-T5, T9). A batch goes through four steps, record by record, a bad
 * record rejected with its reason while the rest go on:
 *   validate (syncValidate.ts)   shape, NUL bytes, the same client id twice in the batch;
 *   authorise (syncAuthorise.ts) core and work order assigned to this user, times in range;
 *     then stored client ids are answered duplicate or conflict (syncStored.ts, only after access);
 *   derive (syncDerive.ts)       a "passed" claim must be borne out by the record (completionEvidence.ts);
 *   land (syncLand.ts)           ONE transaction: a batch cut off half-way commits nothing, and
 *                                its replay lands each record exactly once.
 */
import type { Knex } from 'knex';
import type { SyncResponse } from '../../shared/schemas/sync';
import type { Sealer } from './secrets';
import { authorise, type SyncUser } from './syncAuthorise';
import { derivePassed } from './syncDerive';
import { land, type SyncEvent } from './syncLand';
import { loadCorePlans } from './syncPlans';
import { withoutStored } from './syncStored';
import { BatchAnswer, validateBatch } from './syncValidate';

export type { SyncUser } from './syncAuthorise';
export type { SyncEvent } from './syncLand';

export async function landBatch(db: Knex, sealer: Sealer, user: SyncUser, deviceId: string, raw: unknown[]): Promise<{ response: SyncResponse; events: SyncEvent[] }> {
  const answer = new BatchAnswer();
  const valid = validateBatch(raw, answer);
  const authorised = await withoutStored(db, await authorise(db, user, valid, answer), answer);
  const { cores, installs } = authorised;
  const plans = await loadCorePlans(db, sealer, [...new Set([...authorised.completions, ...installs].map((i) => i.record.coreId))]);
  const completions = derivePassed(authorised.completions, plans, answer, (id) => cores.get(id)!.tag);
  const events = await land(db, sealer, { user, deviceId, completions, installs, cores, plans }, answer);
  answer.response.rejected.sort((a, b) => a.index - b.index);
  return { response: answer.response, events };
}
