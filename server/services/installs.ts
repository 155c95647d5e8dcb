/** Installs the office still has to look at: a core in another door than the one it was built for (T4). */
import type { Knex } from 'knex';

export async function openMismatches(db: Knex) {
  const rows = await db('installs as i')
    .join('cores as c', 'c.id', 'i.core_id')
    .join('doors as d', 'd.id', 'i.door_id')
    .leftJoin('doors as pd', 'pd.id', 'i.planned_door_id')
    .join('users as u', 'u.id', 'i.installed_by')
    .where('i.door_mismatch', true)
    .whereNull('i.reviewed_at')
    .orderBy('i.installed_at', 'desc')
    .limit(200)
    .select(
      'i.id',
      'c.id as coreId',
      'c.tag as coreTag',
      'd.id as doorId',
      'd.label as doorLabel',
      'pd.label as plannedDoorLabel',
      'i.mismatch_reason as reason',
      'i.installed_at as installedAt',
      'u.name as installedBy',
      db.raw(`(select cp.id from completions cp where cp.core_id = c.id and cp.result = 'passed' order by cp.finished_at desc limit 1) as "completionId"`),
    );
  return rows.map((r) => ({ ...r, installedAt: new Date(r.installedAt).toISOString() }));
}
