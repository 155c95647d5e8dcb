/**
 * Re-issue tasks (made by keyCloseout.ts when a lost key's rekey is installed, by controlRekey.ts for a
 * control key's copies, naming the new control key): the office closes
 * one by issuing the new key to the holder (issueKey: the next copy number, the acknowledgement)
 * and takes the old copy back if it was still out.
 */
import type { Knex } from 'knex';
import type { ReissueInput, ReissueTask } from '../../shared/schemas/keyControlReissue';
import { conflict, notFound } from '../errors';
import { joinHolder } from './keyHolders';
import { issueKey } from './keyIssues';

function taskQuery(db: Knex) {
  return joinHolder(db('key_reissue_tasks as t'), 't.holder_id')
    .join('key_issues as o', 'o.id', 't.old_issue_id')
    .leftJoin('keys as ok', 'ok.id', 'o.key_id')
    .leftJoin('control_keys as ock', 'ock.id', 'o.control_key_id')
    .leftJoin('keys as nk', 'nk.id', 't.new_key_id')
    .leftJoin('control_keys as nck', 'nck.id', 't.new_control_key_id')
    .leftJoin('key_issues as n', 'n.id', 't.new_issue_id')
    .select('t.id', 't.report_id as reportId', 'h.id as holderId', 'h.name as holderName', 'd.name as department', db.raw('coalesce(ok.symbol, ock.symbol) as "oldKeySymbol"'), 'o.copy_number as oldCopyNumber', 'o.status as oldCopyStatus', db.raw('coalesce(t.new_key_id, t.new_control_key_id) as "newKeyId"'), db.raw('coalesce(nk.symbol, nck.symbol) as "newKeySymbol"'), 't.status', 'n.copy_number as newCopyNumber', 't.created_at as createdAt', 't.done_at as doneAt');
}

type Row = Omit<ReissueTask, 'createdAt' | 'doneAt'> & { createdAt: Date; doneAt: Date | null };
const taskOf = (r: Row): ReissueTask => ({ ...r, createdAt: new Date(r.createdAt).toISOString(), doneAt: r.doneAt ? new Date(r.doneAt).toISOString() : null });

export async function listTasks(db: Knex, status?: ReissueTask['status']): Promise<ReissueTask[]> {
  const q = taskQuery(db).orderBy([{ column: 't.status', order: 'desc' }, { column: 'h.name' }, { column: 'newKeySymbol' }]);
  if (status) q.where('t.status', status);
  return ((await q) as Row[]).map(taskOf);
}

export async function getTask(db: Knex, id: string): Promise<ReissueTask> {
  const row = (await taskQuery(db).where('t.id', id).first()) as Row | undefined;
  if (!row) throw notFound('That re-issue task');
  return taskOf(row);
}

/** Issues the new key to the task's holder, takes back the old copy if still out, and closes the task. */
export async function reissue(db: Knex, id: string, input: ReissueInput, by: string): Promise<string> {
  const task = await db('key_reissue_tasks').where({ id }).forUpdate().first('status', 'holder_id', 'new_key_id', 'new_control_key_id', 'old_issue_id');
  if (!task) throw notFound('That re-issue task');
  if (task.status !== 'open') throw conflict('This re-issue task is done already.', [{ field: 'status', message: 'done' }]);
  const issueId = await issueKey(db, { holderId: task.holder_id, keyId: task.new_key_id ?? task.new_control_key_id, ...(input.dueDate ? { dueDate: input.dueDate } : {}), acknowledgement: input.acknowledgement }, by);
  await db('key_issues').where({ id: task.old_issue_id, status: 'out' }).update({ status: 'returned', returned_at: db.fn.now(), returned_to: by });
  await db('key_reissue_tasks').where({ id }).update({ status: 'done', new_issue_id: issueId, done_at: db.fn.now() });
  return issueId;
}
