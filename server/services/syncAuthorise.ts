/**
 * Sync step 2, authorise: is the core on record and in a work order assigned to this user?
 * Checked before anything about a stored client id is told (reliability.md T10: a different
 * technician must not learn that a record exists). Then the records' own times are checked
 * against the server clock and the work order (T5).
 */
import type { Knex } from 'knex';
import type { CompletionRecord, InstallRecord } from '../../shared/schemas/sync';
import type { BatchAnswer, Item } from './syncValidate';

export interface SyncUser {
  id: string;
  role: string;
  /** Kept on each completion as it was when the work landed. */
  name: string;
  /** For the audit trail of what the landing work closes. */
  email?: string;
}

export interface CoreRef {
  id: string;
  tag: string;
  state: string;
  door_id: string | null;
  label: string | null;
}

/** A tablet's clock may drift a little; more than this ahead of the server (or before the work existed) is refused. */
export const CLOCK_DRIFT_MS = 10 * 60_000;

interface Access {
  /** `${coreId}|${workOrderId}` → when that work order was made. */
  pairs: Map<string, { createdAt: Date; number: number }>;
  /** core id → the earliest work order that holds it. */
  cores: Map<string, { createdAt: Date; number: number }>;
}

async function access(db: Knex, user: SyncUser, coreIds: string[]): Promise<Access> {
  const out: Access = { pairs: new Map(), cores: new Map() };
  if (!coreIds.length) return out;
  const q = db('work_order_cores as x').join('work_orders as w', 'w.id', 'x.work_order_id').whereIn('x.core_id', coreIds).whereNot('w.status', 'cancelled').select('x.core_id', 'x.work_order_id', 'w.created_at', 'w.number');
  if (user.role === 'technician') q.where('w.assignee_id', user.id);
  for (const r of (await q) as { core_id: string; work_order_id: string; created_at: Date; number: number }[]) {
    const at = { createdAt: new Date(r.created_at), number: r.number };
    out.pairs.set(`${r.core_id}|${r.work_order_id}`, at);
    const cur = out.cores.get(r.core_id);
    if (!cur || cur.createdAt > at.createdAt) out.cores.set(r.core_id, at);
  }
  return out;
}

export async function authorise(
  db: Knex,
  user: SyncUser,
  batch: { completions: Item<CompletionRecord>[]; installs: Item<InstallRecord>[] },
  answer: BatchAnswer,
): Promise<{ completions: Item<CompletionRecord>[]; installs: Item<InstallRecord>[]; cores: Map<string, CoreRef> }> {
  const coreIds = [...new Set([...batch.completions, ...batch.installs].map((i) => i.record.coreId))];
  const cores = new Map(
    coreIds.length ? (await db('cores as c').leftJoin('doors as d', 'd.id', 'c.door_id').whereIn('c.id', coreIds).select<CoreRef[]>('c.id', 'c.tag', 'c.state', 'c.door_id', 'd.label')).map((c) => [c.id, c]) : [],
  );
  const allowed = await access(db, user, coreIds);
  const now = Date.now();
  const tooLate = (at: string) => new Date(at).getTime() > now + CLOCK_DRIFT_MS;
  const tooEarly = (at: string, since: Date) => new Date(at).getTime() < since.getTime() - CLOCK_DRIFT_MS;
  const ahead = `is more than ${CLOCK_DRIFT_MS / 60_000} minutes ahead of the server clock (${new Date(now).toISOString()}); check the tablet's date and time`;

  const completions = batch.completions.filter(({ index, record: r }) => {
    const core = cores.get(r.coreId);
    if (!core) return answer.reject(index, r.clientId, 'not-found', `Core ${r.coreId} is not on record.`);
    const wo = allowed.pairs.get(`${r.coreId}|${r.workOrderId}`);
    if (!wo) return answer.reject(index, r.clientId, 'forbidden', `Core ${core.tag} is not in a work order assigned to you.`);
    if (tooLate(r.finishedAt)) return answer.reject(index, r.clientId, 'validation', `Record ${index + 1}: finishedAt ${ahead}.`, [{ field: 'finishedAt', message: ahead }]);
    if (tooEarly(r.finishedAt, wo.createdAt)) {
      const msg = `is before work order #${wo.number} existed (${wo.createdAt.toISOString()}); check the tablet's date and time`;
      return answer.reject(index, r.clientId, 'validation', `Record ${index + 1}: finishedAt ${msg}.`, [{ field: 'finishedAt', message: msg }]);
    }
    return true;
  });
  const installs = batch.installs.filter(({ index, record: r }) => {
    const core = cores.get(r.coreId);
    if (!core) return answer.reject(index, r.clientId, 'not-found', `Core ${r.coreId} is not on record.`);
    const wo = allowed.cores.get(r.coreId);
    if (!wo) return answer.reject(index, r.clientId, 'forbidden', `Core ${core.tag} is not in a work order assigned to you.`);
    if (tooLate(r.installedAt)) return answer.reject(index, r.clientId, 'validation', `Record ${index + 1}: installedAt ${ahead}.`, [{ field: 'installedAt', message: ahead }]);
    if (tooEarly(r.installedAt, wo.createdAt)) {
      const msg = `is before work order #${wo.number} existed (${wo.createdAt.toISOString()}); check the tablet's date and time`;
      return answer.reject(index, r.clientId, 'validation', `Record ${index + 1}: installedAt ${msg}.`, [{ field: 'installedAt', message: msg }]);
    }
    return true;
  });
  return { completions, installs, cores };
}
