/** Work orders as lists: the office's and a technician's own, and the cores of one order with where each is. */
import type { Knex } from 'knex';
import type { WorkOrder } from '../../shared/schemas/records';
import type { WorkOrderCore } from '../../shared/schemas/workOrders';
import { iso, workOrderQuery } from './workOrders';

export interface WorkOrderListFilter {
  /** Only orders assigned to this user that are out for work (not drafts or cancelled ones). */
  assigneeId?: string | undefined;
  status?: string | undefined;
}

export async function listWorkOrders(db: Knex, f: WorkOrderListFilter): Promise<WorkOrder[]> {
  const query = workOrderQuery(db).orderBy([{ column: 'w.due_date', order: 'asc', nulls: 'last' }, { column: 'w.number', order: 'desc' }]);
  if (f.assigneeId) query.where('w.assignee_id', f.assigneeId).whereNotIn('w.status', ['draft', 'cancelled']);
  if (f.status === 'open') query.whereNotIn('w.status', ['done', 'cancelled']);
  else if (f.status) query.where('w.status', f.status);
  return (await query).map(iso);
}

/** doorId/doorLabel: where the core IS; plannedDoorLabel: where it was planned; doorMismatch: an install elsewhere not yet reviewed (T4). */
export async function workOrderCores(db: Knex, workOrderId: string): Promise<WorkOrderCore[]> {
  return db('work_order_cores as x')
    .join('cores as c', 'c.id', 'x.core_id')
    .leftJoin('doors as d', 'd.id', 'c.door_id')
    .where('x.work_order_id', workOrderId)
    .orderBy('x.position')
    .leftJoin('doors as pd', 'pd.id', 'c.planned_door_id')
    .select(
      'c.id',
      'c.tag',
      'c.state',
      'd.id as doorId',
      'd.label as doorLabel',
      'd.fire_rated as fireRated',
      'pd.label as plannedDoorLabel',
      db.raw(`exists(select 1 from installs i where i.core_id = c.id and i.door_mismatch and i.reviewed_at is null) as "doorMismatch"`),
      // The key symbol stamped on the core: its change key (the lowest level not cross-keyed), and a cross-keyed one.
      db.raw(`(select k.symbol from core_keys ck join keys k on k.id = ck.key_id where ck.core_id = c.id and not ck.cross_keyed order by array_position(array['change','master','gm','ggm']::text[], k.level::text) limit 1) as "keySymbol"`),
      db.raw(`(select k.symbol from core_keys ck join keys k on k.id = ck.key_id where ck.core_id = c.id and ck.cross_keyed limit 1) as "crossKeySymbol"`),
    );
}
