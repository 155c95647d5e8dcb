/** Installs the office still has to look at: a core in another door than the one it was built for (T4). */
import type { Knex } from 'knex';
import type { InstallMismatch, InstallReview } from '../../shared/schemas/installs';
import { isoOrNull } from './dates';
import { badRequest, notFound } from '../errors';

export async function openMismatches(db: Knex): Promise<InstallMismatch[]> {
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

/**
 * A supervisor marks an install into another door reviewed: 404 for no such install, 400 when it
 * went into its planned door. True when this call marked it (false: it was reviewed already).
 */
export async function markMismatchReviewed(db: Knex, id: string, userId: string): Promise<boolean> {
  const row = await db('installs').where({ id }).first<{ door_mismatch: boolean; reviewed_at: Date | null } | undefined>('door_mismatch', 'reviewed_at');
  if (!row) throw notFound('That install');
  if (!row.door_mismatch) throw badRequest('This install went into its planned door: there is nothing to review.');
  if (row.reviewed_at) return false;
  const n = await db('installs').where({ id }).whereNull('reviewed_at').update({ reviewed_by: userId, reviewed_at: db.fn.now() });
  return n > 0;
}

/** Who reviewed an install, and when. */
export async function reviewOf(db: Knex, id: string): Promise<InstallReview['review']> {
  const row = await db('installs as i').leftJoin('users as u', 'u.id', 'i.reviewed_by').where('i.id', id).first('i.id', 'i.reviewed_at as reviewedAt', 'u.name as reviewedBy');
  return { ...row, reviewedAt: isoOrNull(row.reviewedAt) };
}
