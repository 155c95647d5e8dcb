/** The completion log: what synced from the bench, filtered, sorted and paged in SQL. */
import type { Knex } from 'knex';
import type { CompletionPage, CompletionQuery } from '../../shared/schemas/completions';
import type { KeyLevel } from '../../shared/schemas/records';
import { notFound } from '../errors';
import { whereDays } from './dates';
import { openPinSizes } from './pinSizes';
import type { Sealer } from './secrets';

const sortColumn: Record<CompletionQuery['sort'], string> = {
  finishedAt: 'cp.finished_at',
  startedAt: 'cp.started_at',
  technician: 'cp.technician_name',
  door: 'cp.door_label',
  core: 'cp.core_tag',
  result: 'cp.result',
  workOrder: 'w.number',
};

type Filter = Omit<CompletionQuery, 'sort' | 'order' | 'page' | 'pageSize'>;

/** The core's newest install: where the core IS, which may differ from the door it was built for (T4). */
const LATEST_INSTALL = `left join lateral (select i.id, i.door_id, d.label, i.installed_at, i.removed_core_tag, i.door_mismatch, i.reviewed_at
  from installs i join doors d on d.id = i.door_id where i.core_id = cp.core_id order by i.installed_at desc, i.received_at desc limit 1) inst on true`;

function base(db: Knex, f: Filter) {
  const q = db('completions as cp')
    .leftJoin('work_orders as w', 'w.id', 'cp.work_order_id')
    .joinRaw(LATEST_INSTALL);
  return filtered(db, q, f);
}

/** The count needs no join: every filter is on the completion's own columns. */
function countQuery(db: Knex, f: Filter) {
  return filtered(db, db('completions as cp'), f).count({ total: '*' });
}

function filtered(db: Knex, q: Knex.QueryBuilder, f: Filter) {
  if (f.workOrderId) q.where('cp.work_order_id', f.workOrderId);
  if (f.technicianId) q.where('cp.technician_id', f.technicianId);
  if (f.doorId) q.where('cp.door_id', f.doorId);
  if (f.coreId) q.where('cp.core_id', f.coreId);
  if (f.result) q.where('cp.result', f.result);
  // A core that failed a key check in any completion, even one it passed later after a rebuild.
  if (f.hadFailedCheck === '1') q.whereExists((x) => {
    x.select(db.raw('1')).from('completions as f').whereRaw('f.core_id = cp.core_id').where((w) => {
      w.where('f.result', 'failed').orWhere('f.failed_checks', '>', 0);
    });
  });
  whereDays(db, q, 'cp.finished_at', f);
  return q;
}

const columns = [
  'cp.id',
  'cp.core_id as coreId',
  'cp.core_tag as coreTag',
  'cp.door_id as doorId',
  'cp.door_label as doorLabel',
  'w.id as workOrderId',
  'w.number as workOrderNumber',
  'w.title as workOrderTitle',
  'cp.technician_id as technicianId',
  'cp.technician_name as technicianName',
  'cp.started_at as startedAt',
  'cp.finished_at as finishedAt',
  'cp.received_at as receivedAt',
  'cp.result',
  'cp.attempt_count as attemptCount',
  'cp.failed_checks as failedChecks',
  'inst.id as installId',
  'inst.door_id as installDoorId',
  'inst.label as installDoorLabel',
  'inst.installed_at as installedAt',
  'inst.removed_core_tag as removedCoreTag',
  'inst.door_mismatch as doorMismatch',
  'inst.reviewed_at as mismatchReviewedAt',
];

const isoRow = (r: Record<string, unknown>) => ({
  ...r,
  startedAt: new Date(r.startedAt as string).toISOString(),
  finishedAt: new Date(r.finishedAt as string).toISOString(),
  receivedAt: new Date(r.receivedAt as string).toISOString(),
  installedAt: r.installedAt ? new Date(r.installedAt as string).toISOString() : null,
  mismatchReviewedAt: r.mismatchReviewedAt ? new Date(r.mismatchReviewedAt as string).toISOString() : null,
  doorMismatch: r.installId ? Boolean(r.doorMismatch) : null,
});

export async function listCompletions(db: Knex, q: CompletionQuery): Promise<CompletionPage> {
  const { total } = ((await countQuery(db, q)) as { total: number }[])[0]!;
  const rows = await base(db, q)
    .select(columns)
    .orderBy([{ column: sortColumn[q.sort], order: q.order }, { column: 'cp.id', order: q.order }])
    .limit(q.pageSize)
    .offset((q.page - 1) * q.pageSize);
  return { rows: rows.map(isoRow), total: Number(total), page: q.page, pageSize: q.pageSize };
}

/** Every row for the CSV export, streamed in pages so a large log never sits in memory at once. */
export async function* completionRowsForExport(db: Knex, q: CompletionQuery, pageSize = 2000) {
  for (let offset = 0; ; offset += pageSize) {
    const rows = await base(db, q).select(columns).orderBy([{ column: sortColumn[q.sort], order: q.order }, { column: 'cp.id', order: q.order }]).limit(pageSize).offset(offset);
    for (const r of rows) yield isoRow(r);
    if (rows.length < pageSize) return;
  }
}

/**
 * One completion with its attempts. The per-part pin sizes stay sealed (they rebuild bittings,
 * T9): each step's size is null here; revealPinSizes() opens them for an audited reveal.
 */
export async function getCompletion(db: Knex, id: string) {
  const row = await base(db, { tz: 0 }).where('cp.id', id).first([...columns, 'cp.attempts', 'cp.notes', 'cp.device_id as deviceId', db.raw('cp.pin_sizes_enc is not null as "hasPinSizes"')]);
  if (!row) throw notFound('That completion');
  const install = await db('installs as i')
    .join('doors as d', 'd.id', 'i.door_id')
    .join('users as u', 'u.id', 'i.installed_by')
    .leftJoin('doors as pd', 'pd.id', 'i.planned_door_id')
    .leftJoin('users as r', 'r.id', 'i.reviewed_by')
    .where('i.core_id', row.coreId)
    .orderBy([{ column: 'i.installed_at', order: 'desc' }, { column: 'i.received_at', order: 'desc' }])
    .first('i.id', 'i.door_id as doorId', 'd.label as doorLabel', 'i.installed_at as installedAt', 'u.name as installedBy', 'i.removed_core_tag as removedCoreTag', 'i.notes', 'i.door_mismatch as doorMismatch', 'i.mismatch_reason as mismatchReason', 'pd.label as plannedDoorLabel', 'i.reviewed_at as reviewedAt', 'r.name as reviewedBy');
  // The level of each key of the core's system by symbol, so the detail names a master as the Bench does ("Grand master").
  const levels = await db('keys as k').join('cores as c', 'c.key_system_id', 'k.key_system_id').where('c.id', row.coreId).select<{ symbol: string; level: KeyLevel }[]>('k.symbol', 'k.level');
  return {
    ...isoRow(row),
    keyLevels: Object.fromEntries(levels.map((k) => [k.symbol, k.level])),
    install: install ? { ...install, installedAt: new Date(install.installedAt).toISOString(), reviewedAt: install.reviewedAt ? new Date(install.reviewedAt).toISOString() : null } : null,
  };
}

/** The attempts with their pin sizes opened: the caller checks the role and audits the read. */
export async function revealPinSizes(db: Knex, sealer: Sealer, id: string) {
  const row = await db('completions').where({ id }).first<{ attempts: { steps: { size: number | null }[] }[]; pin_sizes_enc: string | null } | undefined>('attempts', 'pin_sizes_enc');
  if (!row) throw notFound('That completion');
  return openPinSizes(sealer, id, row.attempts, row.pin_sizes_enc);
}
