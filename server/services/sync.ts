/**
 * Sync: lands the tablet's finished work. Each record is checked and written on its own,
 * in its own transaction, keyed by the tablet's client id, so a batch can be replayed,
 * cut off half-way or sent twice in parallel and still leave exactly one row per record
 * (INSERT ... ON CONFLICT DO NOTHING, then compare the stored payload's hash).
 * Completions land before installs, so a core built and installed offline syncs in one go.
 */
import type { Knex } from 'knex';
import { SyncRecord, type CompletionRecord, type InstallRecord, type SyncRejection, type SyncResponse } from '../../shared/schemas/sync';
import { zodDetails } from '../errors';
import { hashRecord } from './canonical';
import { coreInUsersWork } from './workOrders';

export interface SyncUser {
  id: string;
  role: string;
}

export type SyncEvent =
  | { kind: 'key-check-failed'; completionId: string }
  | { kind: 'work-order-done'; workOrderId: string };

type Outcome = { status: 'accepted' | 'duplicate'; events: SyncEvent[] } | { status: 'rejected'; code: string; message: string };

class Reject extends Error {
  constructor(
    readonly code: string,
    message: string,
  ) {
    super(message);
  }
}

async function landCompletion(trx: Knex.Transaction, user: SyncUser, deviceId: string, r: CompletionRecord, hash: string): Promise<SyncEvent[] | null> {
  const core = await trx('cores').where({ id: r.coreId }).forUpdate().first('id', 'state', 'tag');
  if (!core) throw new Reject('not-found', `Core ${r.coreId} is not on record.`);
  if (!(await coreInUsersWork(trx, user, r.coreId, r.workOrderId))) throw new Reject('forbidden', `Core ${core.tag} is not in a work order assigned to you.`);
  if (new Date(r.finishedAt) < new Date(r.startedAt)) throw new Reject('validation', 'finishedAt is before startedAt.');
  const failedChecks = r.attempts.reduce((n, a) => n + a.keyChecks.filter((k) => k.result === 'failed').length, 0);
  const inserted = await trx('completions')
    .insert({
      id: r.clientId,
      core_id: r.coreId,
      work_order_id: r.workOrderId,
      technician_id: user.id,
      device_id: deviceId,
      started_at: r.startedAt,
      finished_at: r.finishedAt,
      result: r.result,
      attempt_count: r.attempts.length,
      failed_checks: failedChecks,
      attempts: JSON.stringify(r.attempts),
      notes: r.notes ?? null,
      payload_hash: hash,
    })
    .onConflict('id')
    .ignore()
    .returning('id');
  if (!inserted.length) return null; // a parallel request landed it first; the caller compares hashes
  if (core.state !== 'installed' && core.state !== 'retired') {
    await trx('cores').where({ id: r.coreId }).update({ state: r.result === 'passed' ? 'capped' : 'planned', updated_at: trx.fn.now() });
  }
  await trx('work_orders').where({ id: r.workOrderId, status: 'assigned' }).update({ status: 'in-progress', updated_at: trx.fn.now() });
  const events: SyncEvent[] = [];
  if (failedChecks > 0 || r.result === 'failed') events.push({ kind: 'key-check-failed', completionId: r.clientId });
  const open = await trx('work_order_cores as x').join('cores as c', 'c.id', 'x.core_id').where('x.work_order_id', r.workOrderId).whereNotIn('c.state', ['capped', 'installed', 'retired']).first('c.id');
  if (!open) {
    const n = await trx('work_orders').where({ id: r.workOrderId }).whereIn('status', ['assigned', 'in-progress']).update({ status: 'done', updated_at: trx.fn.now() });
    if (n) events.push({ kind: 'work-order-done', workOrderId: r.workOrderId });
  }
  return events;
}

async function landInstall(trx: Knex.Transaction, user: SyncUser, deviceId: string, r: InstallRecord, hash: string): Promise<SyncEvent[] | null> {
  const core = await trx('cores').where({ id: r.coreId }).forUpdate().first('id', 'state', 'tag');
  if (!core) throw new Reject('not-found', `Core ${r.coreId} is not on record.`);
  if (!(await coreInUsersWork(trx, user, r.coreId))) throw new Reject('forbidden', `Core ${core.tag} is not in a work order assigned to you.`);
  const door = await trx('doors').where({ id: r.doorId }).first('id', 'label');
  if (!door) throw new Reject('not-found', 'That door is not on record.');
  const passed = await trx('completions').where({ core_id: r.coreId, result: 'passed' }).first('id');
  if (!passed) throw new Reject('unprocessable', `Core ${core.tag} has no passed key check on record; a core goes into a door only after every key check passed.`);
  if (core.state === 'retired') throw new Reject('unprocessable', `Core ${core.tag} is retired.`);
  const previous = await trx('cores').where({ door_id: r.doorId, state: 'installed' }).whereNot({ id: r.coreId }).forUpdate().select('id', 'tag');
  const removed = r.removedCoreTag ? (previous.find((p: { tag: string }) => p.tag === r.removedCoreTag) ?? (await trx('cores').where({ tag: r.removedCoreTag }).first('id', 'tag'))) : previous[0];
  const inserted = await trx('installs')
    .insert({
      id: r.clientId,
      core_id: r.coreId,
      door_id: r.doorId,
      removed_core_tag: r.removedCoreTag ?? null,
      removed_core_id: removed?.id ?? null,
      installed_by: user.id,
      device_id: deviceId,
      installed_at: r.installedAt,
      notes: r.notes ?? null,
      payload_hash: hash,
    })
    .onConflict('id')
    .ignore()
    .returning('id');
  if (!inserted.length) return null;
  await trx('cores').where({ id: r.coreId }).update({ state: 'installed', door_id: r.doorId, updated_at: trx.fn.now() });
  const out = previous.map((p: { id: string }) => p.id);
  if (removed?.id && !out.includes(removed.id)) out.push(removed.id);
  if (out.length) await trx('cores').whereIn('id', out).update({ state: 'retired', door_id: null, updated_at: trx.fn.now() });
  return [];
}

async function landOne(db: Knex, user: SyncUser, deviceId: string, record: SyncRecord): Promise<Outcome> {
  const hash = hashRecord(record);
  const table = record.kind === 'completion' ? 'completions' : 'installs';
  const stored = async (): Promise<Outcome | null> => {
    const row = await db(table).where({ id: record.clientId }).first('payload_hash');
    if (!row) return null;
    return row.payload_hash === hash
      ? { status: 'duplicate', events: [] }
      : { status: 'rejected', code: 'conflict', message: 'A different record with this client id is stored already; the stored one was kept.' };
  };
  const before = await stored();
  if (before) return before;
  try {
    const events = await db.transaction((trx) => (record.kind === 'completion' ? landCompletion(trx, user, deviceId, record, hash) : landInstall(trx, user, deviceId, record, hash)));
    if (events === null) return (await stored()) ?? { status: 'rejected', code: 'internal', message: 'The record could not be stored; send it again.' };
    return { status: 'accepted', events };
  } catch (err) {
    if (err instanceof Reject) return { status: 'rejected', code: err.code, message: err.message };
    // a unique violation from a parallel request is a duplicate or a conflict, never a second row
    const again = await stored();
    if (again) return again;
    throw err;
  }
}

export async function landBatch(db: Knex, user: SyncUser, deviceId: string, raw: unknown[]): Promise<{ response: SyncResponse; events: SyncEvent[] }> {
  const response: SyncResponse = { accepted: [], duplicates: [], rejected: [] };
  const events: SyncEvent[] = [];
  const parsed: { index: number; record: SyncRecord }[] = [];
  raw.forEach((item, index) => {
    const result = SyncRecord.safeParse(item);
    const clientId = typeof (item as { clientId?: unknown })?.clientId === 'string' ? (item as { clientId: string }).clientId : null;
    if (result.success) parsed.push({ index, record: result.data });
    else {
      const details = zodDetails(result.error);
      const rejection: SyncRejection = { clientId, index, error: { code: 'validation', message: `Record ${index + 1}: ${details[0]?.field ? `${details[0].field}: ` : ''}${details[0]?.message ?? 'invalid'}`, details } };
      response.rejected.push(rejection);
    }
  });
  parsed.sort((a, b) => Number(a.record.kind === 'install') - Number(b.record.kind === 'install') || a.index - b.index);
  for (const { index, record } of parsed) {
    const outcome = await landOne(db, user, deviceId, record);
    if (outcome.status === 'accepted') {
      response.accepted.push(record.clientId);
      events.push(...outcome.events);
    } else if (outcome.status === 'duplicate') response.duplicates.push(record.clientId);
    else if (outcome.status === 'rejected') response.rejected.push({ clientId: record.clientId, index, error: { code: outcome.code, message: outcome.message } });
  }
  response.rejected.sort((a, b) => a.index - b.index);
  return { response, events };
}
