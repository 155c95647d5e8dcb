/** Lost and stolen key copies: the report keeps the exposure as computed when it was made. */
import type { Knex } from 'knex';
import type { KeyReport, KeyReportInput, KeyReportList } from '../../shared/schemas/keyControlExposure';
import { conflict, notFound } from '../errors';
import { keyExposureOf } from './keyExposure';
import type { Sealer } from './secrets';

export async function reportKey(db: Knex, sealer: Sealer, issueId: string, input: KeyReportInput, by: string | null): Promise<string> {
  const issue = await db('key_issues').where({ id: issueId }).forUpdate().first('id', 'status', 'key_id', 'control_key_id');
  if (!issue) throw notFound('That key issue');
  if (issue.status !== 'out') throw conflict(`This copy is ${issue.status}: only a copy that is out can be reported lost or stolen.`, [{ field: 'issueId', message: issue.status }]);
  await db('key_issues').where({ id: issueId }).update({ status: input.kind });
  // Computed after the status change, so the exposure lists this copy as lost or stolen.
  // A control key's copy: every core built for it, through the engine like any key (keyExposureOf tells them apart).
  const exposure = await keyExposureOf(db, sealer, issue.key_id ?? issue.control_key_id);
  const [row] = await db('key_reports').insert({ issue_id: issueId, kind: input.kind, note: input.note ?? null, exposure: JSON.stringify(exposure), created_by: by }).returning('id');
  return row.id as string;
}

function reportQuery(db: Knex) {
  return db('key_reports as r')
    .join('key_issues as i', 'i.id', 'r.issue_id')
    .join('key_holders as h', 'h.id', 'i.holder_id')
    .leftJoin('keys as k', 'k.id', 'i.key_id')
    .leftJoin('control_keys as ck', 'ck.id', 'i.control_key_id')
    .leftJoin('users as u', 'u.id', 'r.closed_by')
    .select('r.id', 'r.issue_id as issueId', 'h.id as holderId', 'h.name as holderName', db.raw('coalesce(i.key_id, i.control_key_id) as "keyId"'), db.raw('coalesce(k.symbol, ck.symbol) as "keySymbol"'), db.raw('(i.control_key_id is not null) as control'), 'i.copy_number as copyNumber', 'r.kind', 'r.note', 'r.status', 'r.work_order_id as workOrderId', 'r.created_at as createdAt', 'r.closed_at as closedAt', 'r.rebuilt_at as rebuiltAt', 'r.remaining', 'u.name as closedByName', 'r.close_note as closeNote', 'r.exposure');
}

type Row = Omit<KeyReport, 'createdAt' | 'closedAt' | 'rebuiltAt'> & { createdAt: Date; closedAt: Date | null; rebuiltAt: Date | null };
const iso = (d: Date | null) => (d ? new Date(d).toISOString() : null);
const reportOf = (r: Row): KeyReport => ({ ...r, createdAt: new Date(r.createdAt).toISOString(), closedAt: iso(r.closedAt), rebuiltAt: iso(r.rebuiltAt) });

export async function getReport(db: Knex, id: string): Promise<KeyReport> {
  const row = (await reportQuery(db).where('r.id', id).first()) as Row | undefined;
  if (!row) throw notFound('That key report');
  return reportOf(row);
}

export async function listReports(db: Knex, status?: 'open' | 'closed'): Promise<KeyReportList['reports']> {
  const q = reportQuery(db).orderBy('r.created_at', 'desc');
  if (status) q.where('r.status', status);
  return ((await q) as Row[]).map((r) => {
    const { exposure, ...rest } = reportOf(r);
    return { ...rest, counts: exposure.counts };
  });
}
