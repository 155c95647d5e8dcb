/**
 * Sync step 4, land: every checked record in ONE transaction keyed by the tablet's client ids
 * (INSERT ... ON CONFLICT DO NOTHING), completions before installs so a core built and installed
 * offline syncs in one go. A core's state follows its records' own times, not their arrival
 * (reliability.md T5); an install follows the pinning (T4: installRules.ts), and the install that
 * finishes a lost key's rekey closes its report in the same transaction (keyCloseout.ts), and a lost
 * control key's rekey likewise (controlRekey.ts: its reports are not keyCloseout's, which are keys').
 */
import type { Knex } from 'knex';
import type { CompletionRecord, InstallRecord } from '../../shared/schemas/sync';
import { checkInstall } from './installRules';
import { closeControlRekeys } from './controlRekey';
import { closeReportsAfterInstalls } from './keyCloseout';
import { sealPinSizes } from './pinSizes';
import type { Sealer } from './secrets';
import type { CoreRef, SyncUser } from './syncAuthorise';
import type { CorePlan } from './syncPlans';
import { answerLost } from './syncStored';
import type { BatchAnswer, Item } from './syncValidate';

export type SyncEvent = { kind: 'key-check-failed'; completionId: string } | { kind: 'work-order-done'; workOrderId: string };

export interface LandInput {
  user: SyncUser;
  deviceId: string;
  completions: Item<CompletionRecord>[];
  installs: Item<InstallRecord>[];
  cores: Map<string, CoreRef>;
  plans: Map<string, CorePlan>;
}

export interface Landed {
  accepted: Set<string>;
  refused: { index: number; clientId: string; code: string; message: string; field?: string }[];
  events: SyncEvent[];
}

/** Each core not yet installed takes the state of its newest completion by finishedAt, whatever order they arrived in. */
async function stateFromHistory(trx: Knex.Transaction, coreIds: string[]): Promise<void> {
  if (!coreIds.length) return;
  const latest = await trx.raw<{ rows: { core_id: string; result: string }[] }>(
    `select distinct on (core_id) core_id, result from completions where core_id = any(?) order by core_id, finished_at desc, received_at desc, id desc`,
    [coreIds],
  );
  for (const state of ['capped', 'planned'] as const) {
    const ids = latest.rows.filter((r) => (r.result === 'passed') === (state === 'capped')).map((r) => r.core_id);
    if (ids.length) await trx('cores').whereIn('id', ids).whereNotIn('state', ['installed', 'retired', state]).update({ state, updated_at: trx.fn.now() });
  }
}

async function landCompletions(trx: Knex.Transaction, sealer: Sealer, input: LandInput, out: Landed): Promise<void> {
  const { user, deviceId, cores } = input;
  if (!input.completions.length) return;
  const rows = await trx('completions')
    .insert(
      input.completions.map(({ record: r, hash }) => {
        const sealed = sealPinSizes(sealer, r.clientId, r.attempts);
        return {
          id: r.clientId,
          core_id: r.coreId,
          work_order_id: r.workOrderId,
          technician_id: user.id,
          technician_name: user.name,
          core_tag: cores.get(r.coreId)!.tag,
          door_id: cores.get(r.coreId)!.door_id,
          door_label: cores.get(r.coreId)!.label,
          device_id: deviceId,
          started_at: r.startedAt,
          finished_at: r.finishedAt,
          result: r.result,
          attempt_count: r.attempts.length,
          failed_checks: r.attempts.reduce((n, a) => n + a.keyChecks.filter((k) => k.result === 'failed').length, 0),
          attempts: JSON.stringify(sealed.attempts),
          pin_sizes_enc: sealed.sealed,
          notes: r.notes ?? null,
          payload_hash: hash,
        };
      }),
    )
    .onConflict('id')
    .ignore()
    .returning('id');
  const ids = new Set(rows.map((x: { id: string }) => x.id));
  const inserted = input.completions.filter((i) => ids.has(i.record.clientId));
  for (const i of inserted) out.accepted.add(i.record.clientId);
  await stateFromHistory(trx, [...new Set(inserted.map((i) => i.record.coreId))]);
  const wos = [...new Set(inserted.map((i) => i.record.workOrderId))];
  if (wos.length) await trx('work_orders').whereIn('id', wos).where('status', 'assigned').update({ status: 'in-progress', updated_at: trx.fn.now() });
  for (const i of inserted) if (i.record.result === 'failed' || i.record.attempts.some((a) => a.keyChecks.some((k) => k.result === 'failed'))) out.events.push({ kind: 'key-check-failed', completionId: i.record.clientId });
}

async function landInstalls(trx: Knex.Transaction, input: LandInput, out: Landed): Promise<void> {
  const { user, deviceId } = input;
  // In the order they happened, so a door emptied by one install is seen by the next.
  for (const { index, record: r, hash } of [...input.installs].sort((a, b) => a.record.installedAt.localeCompare(b.record.installedAt))) {
    const verdict = await checkInstall(trx, r, input.plans.get(r.coreId)!);
    if (!verdict.ok) {
      out.refused.push({ index, clientId: r.clientId, code: verdict.code, message: verdict.message, ...(verdict.field ? { field: verdict.field } : {}) });
      continue;
    }
    const rows = await trx('installs')
      .insert({
        id: r.clientId,
        core_id: r.coreId,
        door_id: r.doorId,
        removed_core_tag: verdict.removed?.tag ?? null,
        removed_core_id: verdict.removed?.id ?? null,
        installed_by: user.id,
        device_id: deviceId,
        installed_at: r.installedAt,
        notes: r.notes ?? null,
        planned_door_id: verdict.plannedDoorId,
        door_mismatch: verdict.mismatch,
        mismatch_reason: verdict.mismatch ? r.mismatchReason!.trim() : null,
        payload_hash: hash,
      })
      .onConflict('id')
      .ignore()
      .returning('id');
    if (!rows.length) continue; // a parallel request landed it: answered from what is stored
    await trx('cores').where({ id: r.coreId }).update({ state: 'installed', door_id: r.doorId, updated_at: trx.fn.now() });
    if (verdict.removed) await trx('cores').where({ id: verdict.removed.id }).update({ state: 'retired', door_id: null, updated_at: trx.fn.now() });
    out.accepted.add(r.clientId);
  }
}

export async function landChecked(trx: Knex.Transaction, sealer: Sealer, input: LandInput): Promise<Landed> {
  const out: Landed = { accepted: new Set(), refused: [], events: [] };
  // Lock the rows this batch changes in one fixed order, so parallel batches queue instead of deadlocking.
  const lockCores = [...new Set([...input.completions, ...input.installs].map((i) => i.record.coreId))].sort();
  if (lockCores.length) await trx('cores').whereIn('id', lockCores).orderBy('id').forUpdate().select('id');
  const lockWos = [...new Set(input.completions.map((i) => i.record.workOrderId))].sort();
  if (lockWos.length) await trx('work_orders').whereIn('id', lockWos).orderBy('id').forUpdate().select('id');
  await landCompletions(trx, sealer, input, out);
  await landInstalls(trx, input, out);
  // A lost key's rekey finishes with its last install: the old keys retire and the report closes (keyCloseout.ts).
  const installed = input.installs.filter((i) => out.accepted.has(i.record.clientId)).map((i) => i.record.coreId);
  await closeReportsAfterInstalls(trx, sealer, installed, { id: input.user.id, email: input.user.email ?? null });
  await closeControlRekeys(trx, sealer, installed, { id: input.user.id, email: input.user.email ?? null });
  // Work orders whose every core is built are done.
  const wos = [...new Set(input.completions.map((i) => i.record.workOrderId))];
  if (wos.length) {
    const done = await trx('work_orders as w')
      .whereIn('w.id', wos)
      .whereIn('w.status', ['assigned', 'in-progress'])
      .whereNotExists(trx('work_order_cores as x').join('cores as c', 'c.id', 'x.core_id').whereRaw('x.work_order_id = w.id').whereNotIn('c.state', ['capped', 'installed', 'retired']))
      .update({ status: 'done', updated_at: trx.fn.now() })
      .returning('w.id');
    for (const d of done as { id: string }[]) out.events.push({ kind: 'work-order-done', workOrderId: d.id });
  }
  // The mail this work owes is stored with it (services/notifier.ts sends it).
  if (out.events.length) await trx('notifications').insert(out.events.map((e) => ({ kind: e.kind, ref_id: e.kind === 'work-order-done' ? e.workOrderId : e.completionId }))).onConflict(['kind', 'ref_id']).ignore();
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

/**
 * Lands the checked records in ONE transaction (a batch cut off half-way commits nothing, and its
 * replay lands each record exactly once) and answers each: accepted, refused by the install rules,
 * or answered from what a parallel request stored first. Returns the mail the work owes.
 */
export async function land(db: Knex, sealer: Sealer, input: LandInput, answer: BatchAnswer): Promise<SyncEvent[]> {
  const landed = await withDeadlockRetry(() => db.transaction((trx) => landChecked(trx, sealer, input)));
  for (const r of landed.refused) answer.reject(r.index, r.clientId, r.code, r.message, r.field ? [{ field: r.field, message: r.message }] : undefined);
  const all = [...input.completions, ...input.installs];
  await answerLost(db, all.filter((i) => !landed.accepted.has(i.record.clientId) && !answer.isRejected(i.record.clientId)), answer);
  answer.response.accepted = all.filter((i) => landed.accepted.has(i.record.clientId)).map((i) => i.record.clientId);
  return landed.events;
}
