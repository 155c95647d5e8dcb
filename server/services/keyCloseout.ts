/**
 * Closing a lost or stolen key report. Control is restored when the old keys turn no installed core,
 * and only the engine can say that: a rebuilt core may have gone into another door (the old core is
 * still in its own), and a key also turns cores it was never pinned for, through their master wafers,
 * which its rekey does not rebuild. So close-out has two steps, both in sync's land transaction
 * (syncLand.ts calls closeReportsAfterInstalls after every batch with installs):
 *
 *   rebuilt  every core of the report's rekey work order is installed (or retired after it): each old
 *            key the work order replaced is retired and every holder of a copy of it (copies out, the
 *            reported copy, and copies reported alongside it) gets a re-issue task. Once (`rebuilt_at`).
 *   closed   the engine's keyExposure over the system's cores as installed now finds no core that an
 *            old key turns or removes: the report closes, with any other open report of a copy of the
 *            same keys (restored by the same rekey). Otherwise the report stays open and keeps the
 *            cores that still turn (`remaining`); every later install in the system checks again, and a
 *            supervisor may close it by hand accepting them, with a note (closeReportAccepting).
 *
 * A replayed install lands nothing, a closed report is never closed again, tasks are unique per report
 * and copy, and the audit trail gets an event only when something changes, so nothing happens twice.
 */
import type { Knex } from 'knex';
import type { RemainingCore } from '../../shared/schemas/keyControlExposure';
import { conflict, notFound } from '../errors';
import { audit, type Actor } from './auditTrail';
import { exposedCores, installedCores } from './keyExposure';
import { loadSystem, type LoadedSystem } from './keySystems';
import type { Sealer } from './secrets';

interface Replaced { oldKeyId: string; newKeyId: string }
interface ReportRow { id: string; issue_id: string; work_order_id: string; new_keys: Replaced[] | null; rebuilt_at: Date | null; remaining: RemainingCore[] | null; systemId: string }

const openRekeys = (trx: Knex) =>
  trx('key_reports as r')
    .join('key_issues as i', 'i.id', 'r.issue_id')
    .join('keys as k', 'k.id', 'i.key_id')
    .where('r.status', 'open')
    .whereNotNull('r.work_order_id')
    .orderBy('r.id')
    .forUpdate('r')
    .select<ReportRow[]>('r.id', 'r.issue_id', 'r.work_order_id', 'r.new_keys', 'r.rebuilt_at', 'r.remaining', 'k.key_system_id as systemId');

/** Open reports with a rekey in the systems of these cores, settled as far as the cores in their doors allow. */
export async function closeReportsAfterInstalls(trx: Knex.Transaction, sealer: Sealer, coreIds: string[], actor: Actor): Promise<string[]> {
  if (!coreIds.length) return [];
  const systems = trx('cores').whereIn('id', coreIds).distinct('key_system_id');
  const reports = await openRekeys(trx).whereIn('k.key_system_id', systems);
  const closed: string[] = [];
  const seen: Installed = new Map();
  for (const r of reports) {
    if (!(await allInstalled(trx, r.work_order_id))) continue;
    if (!r.rebuilt_at) await markRebuilt(trx, r, actor);
    const remaining = await remainingCores(trx, sealer, r, seen);
    if (!remaining.length) closed.push(...(await close(trx, r, actor, null)));
    else await keepRemaining(trx, actor, r, remaining);
  }
  return closed;
}

/** A rebuilt report the old key still turns cores of stays open and keeps them; audited only when the list changes. */
export async function keepRemaining(trx: Knex.Transaction, actor: Actor, r: { id: string; remaining: RemainingCore[] | null }, remaining: RemainingCore[]): Promise<void> {
  if (JSON.stringify(remaining) === JSON.stringify(r.remaining)) return;
  await trx('key_reports').where({ id: r.id }).update({ remaining: JSON.stringify(remaining) });
  await audit(trx, actor, 'key-report.still-turns', { type: 'key-report', id: r.id }, { cores: remaining.length, doors: remaining.map((c) => c.doorLabel ?? c.tag).join(', ') });
}

/** Closing by hand comes after the rekey is installed; before, the report closes by itself (`closesWhen`). */
export function notRebuiltYet(workOrderId: string | null, closesWhen: string) {
  const why = workOrderId ? 'its rekey work order is not installed yet' : 'it has no rekey work order yet';
  return conflict(`A report is closed by hand only after its rekey is installed, and ${why}: make the work order, build and install its cores; the report then closes by itself when ${closesWhen}.`, [{ field: 'reportId', message: 'not rebuilt' }]);
}

/**
 * Closes a report whose rekey is installed although its old keys still turn some cores: a supervisor's
 * decision, kept with its note and the cores accepted. Refused before the rebuild (the report then
 * closes by itself) and on a closed report.
 */
export async function closeReportAccepting(trx: Knex.Transaction, sealer: Sealer, reportId: string, note: string, actor: Actor): Promise<void> {
  const exists = await trx('key_reports').where({ id: reportId }).first('status', 'work_order_id', 'rebuilt_at');
  if (!exists) throw notFound('That key report');
  if (exists.status !== 'open') throw conflict('This report is closed already.', [{ field: 'reportId', message: 'closed' }]);
  if (!exists.rebuilt_at) throw notRebuiltYet(exists.work_order_id, 'the old key turns no core');
  const [r] = await openRekeys(trx).where('r.id', reportId);
  if (!r) throw conflict('This report is closed already.', [{ field: 'reportId', message: 'closed' }]);
  const remaining = await remainingCores(trx, sealer, r);
  await trx('key_reports').where({ id: r.id }).update({ remaining: JSON.stringify(remaining), close_note: note, closed_by: actor.id });
  await close(trx, r, actor, { note, accepted: remaining.length });
}

/** Every core of the work order went into its door (installed now, or retired by a later install); a cancelled work order restores nothing. */
async function allInstalled(trx: Knex.Transaction, workOrderId: string): Promise<boolean> {
  const wo = await trx('work_orders').where({ id: workOrderId }).first('status');
  if (!wo || wo.status === 'cancelled') return false;
  // A core the work order released (retired unbuilt) was never installed.
  const waiting = await trx('work_order_cores as x')
    .join('cores as c', 'c.id', 'x.core_id')
    .where('x.work_order_id', workOrderId)
    .where((w) => {
      w.whereNot('c.state', 'retired').whereNot('c.state', 'installed').orWhere((o) => {
        o.where('c.state', 'retired').whereNotExists(trx('installs as n').whereRaw('n.core_id = c.id'));
      });
    })
    .first('c.id');
  return !waiting;
}

const oldKeyIds = (r: ReportRow) => (r.new_keys ?? []).map((k) => k.oldKeyId);

/** Other open reports of a copy of the same keys, made while the rekey was under way: they close with it. */
const alongside = (trx: Knex.Transaction, r: ReportRow) =>
  trx('key_reports as o').join('key_issues as i', 'i.id', 'o.issue_id').whereIn('i.key_id', oldKeyIds(r)).where('o.status', 'open').whereNull('o.work_order_id').whereNot('o.id', r.id).select<{ id: string; issue_id: string }[]>('o.id', 'o.issue_id');

/** The old keys retire; every holder of a copy gets a re-issue task for the key that replaced it. */
async function markRebuilt(trx: Knex.Transaction, r: ReportRow, actor: Actor): Promise<void> {
  const newOf = new Map((r.new_keys ?? []).map((k) => [k.oldKeyId, k.newKeyId]));
  await trx('keys').whereIn('id', [...newOf.keys()]).update({ status: 'retired', updated_at: trx.fn.now() });
  const others = await alongside(trx, r);
  const copies = await trx('key_issues')
    .whereIn('key_id', [...newOf.keys()])
    .where((w) => {
      w.where('status', 'out').orWhereIn('id', [r.issue_id, ...others.map((o) => o.issue_id)]);
    })
    .select<{ id: string; holder_id: string; key_id: string }[]>('id', 'holder_id', 'key_id');
  if (copies.length) {
    await trx('key_reissue_tasks')
      .insert(copies.map((c) => ({ report_id: r.id, holder_id: c.holder_id, old_issue_id: c.id, new_key_id: newOf.get(c.key_id)! })))
      .onConflict(['report_id', 'old_issue_id'])
      .ignore();
  }
  await trx('key_reports').where({ id: r.id }).update({ rebuilt_at: trx.fn.now() });
  await audit(trx, actor, 'key-report.rebuilt', { type: 'key-report', id: r.id }, { workOrder: r.work_order_id, retired: newOf.size, reissue: copies.length });
}

type Installed = Map<string, Promise<[LoadedSystem, Awaited<ReturnType<typeof installedCores>>]>>;

/**
 * Every installed core of the system an old key still turns or removes, through the engine (keyExposure on each core's chart).
 * `seen` keeps each system and its installed cores read once per batch, however many of its reports are settled.
 */
async function remainingCores(trx: Knex.Transaction, sealer: Sealer, r: ReportRow, seen: Installed = new Map()): Promise<RemainingCore[]> {
  const old = new Set(oldKeyIds(r));
  if (!old.size) return [];
  if (!seen.has(r.systemId)) seen.set(r.systemId, Promise.all([loadSystem(trx, sealer, r.systemId), installedCores(trx, r.systemId)]));
  const [system, cores] = await seen.get(r.systemId)!;
  return system.keys
    .filter((k) => old.has(k.id))
    .flatMap((key) => exposedCores(system, cores, key).map((c) => ({ coreId: c.id, tag: c.tag, doorId: c.doorId, doorLabel: c.doorLabel, keySymbol: key.symbol, how: c.how })));
}

async function close(trx: Knex.Transaction, r: ReportRow, actor: Actor, accepting: { note: string; accepted: number } | null): Promise<string[]> {
  const ids = [r.id, ...(await alongside(trx, r)).map((o) => o.id)];
  const reissue = Number((await trx('key_reissue_tasks').where({ report_id: r.id }).count({ n: '*' }).first())?.n ?? 0);
  for (const id of ids) {
    await trx('key_reports').where({ id }).update({ status: 'closed', closed_at: trx.fn.now(), ...(id === r.id && !accepting ? { remaining: JSON.stringify([]) } : {}) });
    await audit(trx, actor, 'key-report.closed', { type: 'key-report', id }, { workOrder: r.work_order_id, retired: oldKeyIds(r).length, reissue, ...(accepting ?? {}) });
  }
  return ids;
}
