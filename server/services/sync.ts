/**
 * Sync: lands the tablet's finished work. A batch is checked record by record (a bad
 * record is rejected with its reason, the rest still land), then every good record is
 * written in ONE transaction keyed by the tablet's client ids: INSERT ... ON CONFLICT DO
 * NOTHING, then stored hashes decide duplicate or conflict. A batch cut off half-way
 * (server killed) commits nothing, and its replay lands each record exactly once.
 * Completions land before installs, so a core built and installed offline syncs in one go.
 */
import type { Knex } from 'knex';
import { SyncRecord, type CompletionRecord, type InstallRecord, type SyncRejection, type SyncResponse } from '../../shared/schemas/sync';
import { zodDetails } from '../errors';
import { hashRecord } from './canonical';

export interface SyncUser {
  id: string;
  role: string;
  /** Kept on each completion as it was when the work landed. */
  name: string;
}

export type SyncEvent = { kind: 'key-check-failed'; completionId: string } | { kind: 'work-order-done'; workOrderId: string };

interface Item<R> {
  index: number;
  record: R;
  hash: string;
}

const CONFLICT = 'A different record with this client id is stored already; the stored one was kept.';

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

/** Which (core, work order) pairs this user may record work on. */
async function allowedPairs(db: Knex, user: SyncUser, coreIds: string[]): Promise<{ pairs: Set<string>; cores: Set<string> }> {
  const q = db('work_order_cores as x').join('work_orders as w', 'w.id', 'x.work_order_id').whereIn('x.core_id', coreIds).whereNot('w.status', 'cancelled').select('x.core_id', 'x.work_order_id');
  if (user.role === 'technician') q.where('w.assignee_id', user.id);
  const rows = (await q) as { core_id: string; work_order_id: string }[];
  return { pairs: new Set(rows.map((r) => `${r.core_id}|${r.work_order_id}`)), cores: new Set(rows.map((r) => r.core_id)) };
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

export async function landBatch(db: Knex, user: SyncUser, deviceId: string, raw: unknown[]): Promise<{ response: SyncResponse; events: SyncEvent[] }> {
  const response: SyncResponse = { accepted: [], duplicates: [], rejected: [] };
  const reject = (index: number, clientId: string | null, code: string, message: string, details?: SyncRejection['error']['details']) =>
    response.rejected.push({ clientId, index, error: { code, message, ...(details ? { details } : {}) } });

  const completions: Item<CompletionRecord>[] = [];
  const installs: Item<InstallRecord>[] = [];
  const seen = new Map<string, string>();
  raw.forEach((item, index) => {
    const result = SyncRecord.safeParse(item);
    const clientId = typeof (item as { clientId?: unknown })?.clientId === 'string' ? (item as { clientId: string }).clientId : null;
    if (!result.success) {
      const details = zodDetails(result.error);
      return reject(index, clientId, 'validation', `Record ${index + 1}: ${details[0]?.field ? `${details[0].field}: ` : ''}${details[0]?.message ?? 'invalid'}`, details);
    }
    const hash = hashRecord(result.data);
    // The same client id twice in one batch: the second is a duplicate or a conflict of the first.
    const earlier = seen.get(result.data.clientId);
    if (earlier !== undefined) {
      if (earlier === hash) response.duplicates.push(result.data.clientId);
      else reject(index, result.data.clientId, 'conflict', CONFLICT);
      return;
    }
    seen.set(result.data.clientId, hash);
    if (result.data.kind === 'completion') {
      if (new Date(result.data.finishedAt) < new Date(result.data.startedAt)) return reject(index, result.data.clientId, 'validation', `Record ${index + 1}: finishedAt is before startedAt.`);
      completions.push({ index, record: result.data, hash });
    } else installs.push({ index, record: result.data, hash });
  });

  // Already stored: answered from what is stored, never written again.
  const storedC = await storedOutcomes(db, 'completions', completions);
  const storedI = await storedOutcomes(db, 'installs', installs);
  const fresh = <R extends { clientId: string }>(items: Item<R>[], stored: Map<string, 'duplicate' | 'conflict'>) =>
    items.filter((i) => {
      const s = stored.get(i.record.clientId);
      if (s === 'duplicate') response.duplicates.push(i.record.clientId);
      else if (s === 'conflict') reject(i.index, i.record.clientId, 'conflict', CONFLICT);
      return !s;
    });
  let newC = fresh(completions, storedC);
  let newI = fresh(installs, storedI);

  // Access and references, checked for the whole batch at once.
  const coreIds = [...new Set([...newC, ...newI].map((i) => i.record.coreId))];
  const cores = new Map(
    coreIds.length ? ((await db('cores as c').leftJoin('doors as d', 'd.id', 'c.door_id').whereIn('c.id', coreIds).select('c.id', 'c.tag', 'c.state', 'c.door_id', 'd.label')) as { id: string; tag: string; state: string; door_id: string | null; label: string | null }[]).map((c) => [c.id, c]) : [],
  );
  const allowed = coreIds.length ? await allowedPairs(db, user, coreIds) : { pairs: new Set<string>(), cores: new Set<string>() };
  newC = newC.filter(({ index, record: r }) => {
    const core = cores.get(r.coreId);
    if (!core) return reject(index, r.clientId, 'not-found', `Core ${r.coreId} is not on record.`), false;
    if (!allowed.pairs.has(`${r.coreId}|${r.workOrderId}`)) return reject(index, r.clientId, 'forbidden', `Core ${core.tag} is not in a work order assigned to you.`), false;
    return true;
  });
  const doorIds = [...new Set(newI.map((i) => i.record.doorId))];
  const doors = new Set(doorIds.length ? await db('doors').whereIn('id', doorIds).pluck('id') : []);
  newI = newI.filter(({ index, record: r }) => {
    const core = cores.get(r.coreId);
    if (!core) return reject(index, r.clientId, 'not-found', `Core ${r.coreId} is not on record.`), false;
    if (!allowed.cores.has(r.coreId)) return reject(index, r.clientId, 'forbidden', `Core ${core.tag} is not in a work order assigned to you.`), false;
    if (!doors.has(r.doorId)) return reject(index, r.clientId, 'not-found', 'That door is not on record.'), false;
    if (core.state === 'retired') return reject(index, r.clientId, 'unprocessable', `Core ${core.tag} is retired.`), false;
    return true;
  });

  const events: SyncEvent[] = [];
  const landed = await withDeadlockRetry(() => db.transaction(async (trx) => {
    events.length = 0;
    const accepted: string[] = [];
    const refused: { index: number; clientId: string; message: string }[] = [];
    // Lock the rows this batch changes in one fixed order, so parallel batches queue instead of deadlocking.
    const lockCores = [...new Set([...newC, ...newI].map((i) => i.record.coreId))].sort();
    if (lockCores.length) await trx('cores').whereIn('id', lockCores).orderBy('id').forUpdate().select('id');
    const lockWos = [...new Set(newC.map((i) => i.record.workOrderId))].sort();
    if (lockWos.length) await trx('work_orders').whereIn('id', lockWos).orderBy('id').forUpdate().select('id');
    if (newC.length) {
      const rows = await trx('completions')
        .insert(
          newC.map(({ record: r, hash }) => ({
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
            attempts: JSON.stringify(r.attempts),
            notes: r.notes ?? null,
            payload_hash: hash,
          })),
        )
        .onConflict('id')
        .ignore()
        .returning('id');
      const ids = new Set(rows.map((x: { id: string }) => x.id));
      const inserted = newC.filter((i) => ids.has(i.record.clientId));
      accepted.push(...inserted.map((i) => i.record.clientId));
      // Each core takes the state of its latest landed completion.
      const latest = new Map<string, CompletionRecord>();
      for (const { record } of inserted) {
        const cur = latest.get(record.coreId);
        if (!cur || record.finishedAt > cur.finishedAt) latest.set(record.coreId, record);
      }
      for (const state of ['capped', 'planned'] as const) {
        const ids = [...latest.values()].filter((r) => (r.result === 'passed') === (state === 'capped')).map((r) => r.coreId);
        if (ids.length) await trx('cores').whereIn('id', ids).whereNotIn('state', ['installed', 'retired']).update({ state, updated_at: trx.fn.now() });
      }
      const wos = [...new Set(inserted.map((i) => i.record.workOrderId))];
      if (wos.length) await trx('work_orders').whereIn('id', wos).where('status', 'assigned').update({ status: 'in-progress', updated_at: trx.fn.now() });
      for (const i of inserted) if (i.record.result === 'failed' || i.record.attempts.some((a) => a.keyChecks.some((k) => k.result === 'failed'))) events.push({ kind: 'key-check-failed', completionId: i.record.clientId });
    }
    if (newI.length) {
      const passed = new Set(await trx('completions').whereIn('core_id', newI.map((i) => i.record.coreId)).where('result', 'passed').distinct().pluck('core_id'));
      for (const { index, record: r, hash } of newI.sort((a, b) => a.record.installedAt.localeCompare(b.record.installedAt))) {
        if (!passed.has(r.coreId)) {
          refused.push({ index, clientId: r.clientId, message: `Core ${cores.get(r.coreId)!.tag} has no passed key check on record; a core goes into a door only after every key check passed.` });
          continue;
        }
        const previous = (await trx('cores').where({ door_id: r.doorId, state: 'installed' }).whereNot({ id: r.coreId }).select('id', 'tag')) as { id: string; tag: string }[];
        const named = r.removedCoreTag ? (previous.find((p) => p.tag === r.removedCoreTag) ?? (await trx('cores').where({ tag: r.removedCoreTag }).first('id', 'tag'))) : previous[0];
        const rows = await trx('installs')
          .insert({ id: r.clientId, core_id: r.coreId, door_id: r.doorId, removed_core_tag: r.removedCoreTag ?? null, removed_core_id: named?.id ?? null, installed_by: user.id, device_id: deviceId, installed_at: r.installedAt, notes: r.notes ?? null, payload_hash: hash })
          .onConflict('id')
          .ignore()
          .returning('id');
        if (!rows.length) continue; // a parallel request landed it: answered below from what is stored
        await trx('cores').where({ id: r.coreId }).update({ state: 'installed', door_id: r.doorId, updated_at: trx.fn.now() });
        const out = new Set(previous.map((p) => p.id));
        if (named?.id && named.id !== r.coreId) out.add(named.id);
        if (out.size) await trx('cores').whereIn('id', [...out]).update({ state: 'retired', door_id: null, updated_at: trx.fn.now() });
        accepted.push(r.clientId);
      }
    }
    // Work orders whose every core is built are done.
    const wos = [...new Set(newC.map((i) => i.record.workOrderId))];
    if (wos.length) {
      const done = await trx('work_orders as w')
        .whereIn('w.id', wos)
        .whereIn('w.status', ['assigned', 'in-progress'])
        .whereNotExists(trx('work_order_cores as x').join('cores as c', 'c.id', 'x.core_id').whereRaw('x.work_order_id = w.id').whereNotIn('c.state', ['capped', 'installed', 'retired']))
        .update({ status: 'done', updated_at: trx.fn.now() })
        .returning('w.id');
      for (const d of done as { id: string }[]) events.push({ kind: 'work-order-done', workOrderId: d.id });
    }
    // The mail this work owes is stored with it (services/notifier.ts sends it).
    if (events.length) await trx('notifications').insert(events.map((e) => ({ kind: e.kind, ref_id: e.kind === 'work-order-done' ? e.workOrderId : e.completionId }))).onConflict(['kind', 'ref_id']).ignore();
    return { accepted: new Set(accepted), refused };
  }));
  for (const r of landed.refused) reject(r.index, r.clientId, 'unprocessable', r.message);

  // Records a parallel request landed first: answered from what is stored.
  const lost = [...newC, ...newI].filter((i) => !landed.accepted.has(i.record.clientId) && !response.rejected.some((x) => x.clientId === i.record.clientId));
  if (lost.length) {
    const again = new Map([...(await storedOutcomes(db, 'completions', lost.filter((i) => i.record.kind === 'completion'))), ...(await storedOutcomes(db, 'installs', lost.filter((i) => i.record.kind === 'install')))]);
    for (const i of lost) {
      if (again.get(i.record.clientId) === 'duplicate') response.duplicates.push(i.record.clientId);
      else reject(i.index, i.record.clientId, 'conflict', CONFLICT);
    }
  }
  response.accepted = [...newC, ...newI].filter((i) => landed.accepted.has(i.record.clientId)).map((i) => i.record.clientId);
  response.rejected.sort((a, b) => a.index - b.index);
  return { response, events };
}
