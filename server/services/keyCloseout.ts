/**
 * Closing a lost or stolen key report. It hooks into sync's land step (syncLand.ts), in the same
 * transaction as the installs: once every core of the report's rekey work order is installed (or
 * retired after it), each old key the work order replaced is retired, every holder of a copy of it
 * (copies out, and the reported copy) gets a re-issue task, and the report closes, with any other
 * open report of a copy of the same keys (restored by the same rekey). A replayed
 * install lands nothing, and a closed report is never closed again, so nothing happens twice; the
 * tasks are unique per report and copy as well.
 */
import type { Knex } from 'knex';
import { audit, type Actor } from './auditTrail';

interface Replaced { oldKeyId: string; newKeyId: string }

/** Reports whose work order holds any of these cores, closed when their work order is all installed. */
export async function closeReportsAfterInstalls(trx: Knex.Transaction, coreIds: string[], actor: Actor): Promise<string[]> {
  if (!coreIds.length) return [];
  const reports = await trx('key_reports as r')
    .whereIn('r.work_order_id', trx('work_order_cores').whereIn('core_id', coreIds).select('work_order_id'))
    .where('r.status', 'open')
    .orderBy('r.id')
    .forUpdate()
    .select<{ id: string; issue_id: string; work_order_id: string; new_keys: Replaced[] | null }[]>('r.id', 'r.issue_id', 'r.work_order_id', 'r.new_keys');
  const closed: string[] = [];
  for (const r of reports) {
    // Every core of the work order went into its door (installed now, or retired by a later install); a cancelled
    // work order restores nothing, and a core it released (retired unbuilt) was never installed.
    const wo = await trx('work_orders').where({ id: r.work_order_id }).first('status');
    if (wo?.status === 'cancelled') continue;
    const waiting = await trx('work_order_cores as x')
      .join('cores as c', 'c.id', 'x.core_id')
      .where('x.work_order_id', r.work_order_id)
      .where((w) => {
        w.whereNot('c.state', 'retired').whereNot('c.state', 'installed').orWhere((o) => {
          o.where('c.state', 'retired').whereNotExists(trx('installs as n').whereRaw('n.core_id = c.id'));
        });
      })
      .first('c.id');
    if (waiting) continue;
    const replaced = r.new_keys ?? [];
    const newOf = new Map(replaced.map((k) => [k.oldKeyId, k.newKeyId]));
    await trx('keys').whereIn('id', [...newOf.keys()]).update({ status: 'retired', updated_at: trx.fn.now() });
    // Other copies of these keys reported lost or stolen meanwhile are restored by the same rekey: they close with it.
    const alongside = await trx('key_reports as o').join('key_issues as i', 'i.id', 'o.issue_id').whereIn('i.key_id', [...newOf.keys()]).where('o.status', 'open').whereNull('o.work_order_id').whereNot('o.id', r.id).select<{ id: string; issue_id: string }[]>('o.id', 'o.issue_id');
    const copies = await trx('key_issues')
      .whereIn('key_id', [...newOf.keys()])
      .where((w) => {
        w.where('status', 'out').orWhereIn('id', [r.issue_id, ...alongside.map((o) => o.issue_id)]);
      })
      .select<{ id: string; holder_id: string; key_id: string }[]>('id', 'holder_id', 'key_id');
    if (copies.length) {
      await trx('key_reissue_tasks')
        .insert(copies.map((c) => ({ report_id: r.id, holder_id: c.holder_id, old_issue_id: c.id, new_key_id: newOf.get(c.key_id)! })))
        .onConflict(['report_id', 'old_issue_id'])
        .ignore();
    }
    for (const id of [r.id, ...alongside.map((o) => o.id)]) {
      await trx('key_reports').where({ id }).update({ status: 'closed', closed_at: trx.fn.now() });
      await audit(trx, actor, 'key-report.closed', { type: 'key-report', id }, { workOrder: r.work_order_id, retired: replaced.length, reissue: copies.length });
      closed.push(id);
    }
  }
  return closed;
}
