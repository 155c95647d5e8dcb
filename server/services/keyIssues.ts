/**
 * Key copies issued one by one: holder, key symbol, copy number (the next of that key, never
 * reused), who issued and who authorised it, the holder's acknowledgement; returns, transfers
 * (the copy passes to another holder with its copy number; the old record closes, linked to the
 * new one), the keys to chase, and the cut list (the only place here a bitting appears:
 * restricted and audited).
 */
import { randomUUID } from 'node:crypto';
import type { Knex } from 'knex';
import type { CutList, KeyIssue, KeyIssueInput, KeyIssueQuery, KeyTransferInput, OutstandingKeys, TransferLink } from '../../shared/schemas/keyControl';
import { badRequest, conflict, notFound } from '../errors';
import { controlBitting } from './controlKeys';
import { joinHolder } from './keyHolders';
import { keyContext } from './keySystems';
import type { Sealer } from './secrets';

export function issueQuery(db: Knex) {
  return joinHolder(db('key_issues as i'), 'i.holder_id')
    .leftJoin('keys as k', 'k.id', 'i.key_id')
    .leftJoin('control_keys as ck', 'ck.id', 'i.control_key_id')
    .leftJoin('users as u', 'u.id', 'i.issued_by')
    .leftJoin('key_requests as r', 'r.id', 'i.request_id')
    .leftJoin('key_issues as ti', 'ti.id', 'i.transferred_to')
    .leftJoin('key_holders as th', 'th.id', 'ti.holder_id')
    .leftJoin('key_issues as fi', 'fi.transferred_to', 'i.id')
    .leftJoin('key_holders as fh', 'fh.id', 'fi.holder_id')
    .select(
      'i.id',
      'i.holder_id as holderId',
      'h.name as holderName',
      'h.status as holderStatus',
      'd.name as department',
      db.raw('coalesce(i.key_id, i.control_key_id) as "keyId"'),
      db.raw('coalesce(k.symbol, ck.symbol) as "keySymbol"'),
      db.raw('coalesce(k.key_system_id, ck.key_system_id) as "keySystemId"'),
      db.raw('(i.control_key_id is not null) as control'),
      'i.copy_number as copyNumber',
      'i.request_id as requestId',
      'i.issued_at as issuedAt',
      'u.name as issuedBy',
      'r.decided_by_name as authorisedBy',
      db.raw(`to_char(i.due_date, 'YYYY-MM-DD') as "dueDate"`),
      'i.ack_name as ackName',
      db.raw('(i.ack_signature is not null) as "signed"'),
      'i.status',
      'i.returned_at as returnedAt',
      'i.transferred_at as transferredAt',
      'ti.id as toIssueId',
      'th.id as toHolderId',
      'th.name as toHolderName',
      'fi.id as fromIssueId',
      'fh.id as fromHolderId',
      'fh.name as fromHolderName',
      db.raw(`coalesce(i.status = 'out' and i.due_date < current_date, false) as overdue`),
    );
}

interface IssueRow extends Omit<KeyIssue, 'acknowledgement' | 'issuedAt' | 'returnedAt' | 'transferredAt' | 'transferredTo' | 'transferredFrom'> {
  holderStatus: 'active' | 'leaving' | 'left';
  ackName: string;
  signed: boolean;
  issuedAt: Date;
  returnedAt: Date | null;
  transferredAt: Date | null;
  toIssueId: string | null;
  toHolderId: string | null;
  toHolderName: string | null;
  fromIssueId: string | null;
  fromHolderId: string | null;
  fromHolderName: string | null;
}

const iso = (d: Date | null) => (d ? new Date(d).toISOString() : null);
const link = (issueId: string | null, holderId: string | null, holderName: string | null): TransferLink | null => (issueId && holderId && holderName ? { issueId, holderId, holderName } : null);

export function issueOf(r: IssueRow): KeyIssue & { holderStatus: IssueRow['holderStatus'] } {
  const { ackName, signed, toIssueId, toHolderId, toHolderName, fromIssueId, fromHolderId, fromHolderName, ...rest } = r;
  return {
    ...rest,
    issuedAt: new Date(r.issuedAt).toISOString(),
    returnedAt: iso(r.returnedAt),
    transferredAt: iso(r.transferredAt),
    transferredTo: link(toIssueId, toHolderId, toHolderName),
    transferredFrom: link(fromIssueId, fromHolderId, fromHolderName),
    acknowledgement: { name: ackName, signed },
  };
}

const publicIssue = ({ holderStatus: _s, ...issue }: ReturnType<typeof issueOf>): KeyIssue => issue;

export async function listIssues(db: Knex, f: KeyIssueQuery): Promise<KeyIssue[]> {
  const q = issueQuery(db).orderBy([{ column: 'i.issued_at', order: 'desc' }, { column: 'keySymbol' }, { column: 'i.copy_number' }]);
  if (f.holderId) q.where('i.holder_id', f.holderId);
  if (f.keyId) q.where((w) => void w.where('i.key_id', f.keyId!).orWhere('i.control_key_id', f.keyId!));
  if (f.status) q.where('i.status', f.status);
  return ((await q.limit(2000)) as IssueRow[]).map((r) => publicIssue(issueOf(r)));
}

export async function getIssue(db: Knex, id: string, withSignature = false): Promise<KeyIssue & { signature?: string | null }> {
  const row = (await issueQuery(db).where('i.id', id).first()) as IssueRow | undefined;
  if (!row) throw notFound('That key issue');
  const issue = publicIssue(issueOf(row));
  if (!withSignature) return issue;
  const { ack_signature } = await db('key_issues').where({ id }).first('ack_signature');
  return { ...issue, signature: ack_signature ?? null };
}

/** Copies of the holder still out: for someone leaving, every key to return. */
export async function keysToReturn(db: Knex, holderId: string): Promise<KeyIssue[]> {
  return listIssues(db, { holderId, status: 'out' });
}

const UNIQUE_VIOLATION = '23505';

/**
 * Issues one copy. The copy number is the key's highest so far plus one, taken in the insert
 * itself; two parallel issues of one key collide on the unique (key_id, copy_number) index,
 * and the loser tries again inside a savepoint, so both get a number and none is shared.
 */
/** The holder who is to receive a key: known, and active (someone leaving or gone gets none). */
async function receivingHolder(db: Knex, holderId: string, verb: string): Promise<{ id: string; name: string }> {
  const holder = await db('key_holders').where({ id: holderId }).first('id', 'status', 'name');
  if (!holder) throw badRequest('There is no key holder with that id.', [{ field: 'holderId', message: 'unknown holder' }]);
  if (holder.status !== 'active') throw conflict(`${holder.name} is marked ${holder.status}: no keys are ${verb} them.`, [{ field: 'holderId', message: `holder ${holder.status}` }]);
  return holder;
}

/** A request named with an issue or a transfer: approved, and for this holder and key. */
async function checkRequest(db: Knex, requestId: string | undefined, holderId: string, keyId: string): Promise<number | null> {
  if (!requestId) return null;
  const request = await db('key_requests').where({ id: requestId }).first('holder_id', 'key_id', 'status', 'number');
  if (!request) throw badRequest('There is no key request with that id.', [{ field: 'requestId', message: 'unknown request' }]);
  if (request.status !== 'approved') throw conflict(`Request #${request.number} is ${request.status}, not approved.`, [{ field: 'requestId', message: `request ${request.status}` }]);
  if (request.holder_id !== holderId || request.key_id !== keyId) throw badRequest(`Request #${request.number} is for another holder or key.`, [{ field: 'requestId', message: 'another holder or key' }]);
  return request.number as number;
}

/** The key a copy is cut from: a key of a system, or a system's control key (`column` says which). */
async function keyToCut(db: Knex, keyId: string): Promise<{ id: string; symbol: string; status: string; column: 'key_id' | 'control_key_id' }> {
  const key = await db('keys').where({ id: keyId }).first<{ id: string; symbol: string; status: string } | undefined>('id', 'status', 'symbol');
  if (key) return { ...key, column: 'key_id' };
  const control = await db('control_keys').where({ id: keyId }).first<{ id: string; symbol: string; status: string } | undefined>('id', 'status', 'symbol');
  if (!control) throw badRequest('There is no key with that id.', [{ field: 'keyId', message: 'unknown key' }]);
  return { ...control, column: 'control_key_id' };
}

export async function issueKey(db: Knex, input: KeyIssueInput, by: string): Promise<string> {
  await receivingHolder(db, input.holderId, 'issued to');
  const key = await keyToCut(db, input.keyId);
  if (key.status !== 'active') throw conflict(`Key ${key.symbol} is ${key.status}: no copies of it are issued.`, [{ field: 'keyId', message: `key ${key.status}` }]);
  await checkRequest(db, input.requestId, input.holderId, input.keyId);
  for (let attempt = 1; ; attempt++) {
    try {
      return await db.transaction(async (sp) => {
        const rows = (await sp.raw(
          `insert into key_issues (holder_id, ${key.column}, copy_number, request_id, issued_by, due_date, ack_name, ack_signature)
           select ?, ?, coalesce(max(copy_number), 0) + 1, ?, ?, ?, ?, ? from key_issues where ${key.column} = ?
           returning id`,
          [input.holderId, input.keyId, input.requestId ?? null, by, input.dueDate ?? null, input.acknowledgement.name, input.acknowledgement.signature ?? null, input.keyId],
        )).rows as { id: string }[];
        return rows[0]!.id;
      });
    } catch (err) {
      if ((err as { code?: string }).code !== UNIQUE_VIOLATION || attempt >= 20) throw err;
    }
  }
}

export async function returnKey(db: Knex, id: string, by: string): Promise<void> {
  const issue = await db('key_issues').where({ id }).forUpdate().first('status');
  if (!issue) throw notFound('That key issue');
  if (issue.status !== 'out') throw conflict(`This copy is ${issue.status}, not out: there is nothing to return.`, [{ field: 'status', message: issue.status }]);
  await db('key_issues').where({ id }).update({ status: 'returned', returned_at: db.fn.now(), returned_to: by });
}

/**
 * Passes a copy that is out to another holder in one step: the old record closes as transferred,
 * linked to the new record, which keeps the copy number and holds who authorised it (its request)
 * and the new holder's acknowledgement. The old row is locked first, so two transfers of one copy
 * cannot both pass. Refused, with nothing changed: a copy not out, the same holder, a holder not
 * active, a key no longer active (its copies come back instead).
 */
export async function transferKey(db: Knex, id: string, input: KeyTransferInput, by: string): Promise<{ id: string; from: string; copy: string; request: string | null }> {
  const old = await db('key_issues as i').join('key_holders as h', 'h.id', 'i.holder_id').where('i.id', id).forUpdate('i').first<{ status: string; holderId: string; holderName: string; keyId: string | null; controlKeyId: string | null; copy: number } | undefined>('i.status', 'i.holder_id as holderId', 'h.name as holderName', 'i.key_id as keyId', 'i.control_key_id as controlKeyId', 'i.copy_number as copy');
  if (!old) throw notFound('That key issue');
  const key = await keyToCut(db, (old.keyId ?? old.controlKeyId)!);
  const copy = `${key.symbol} #${old.copy}`;
  if (old.status !== 'out') throw conflict(`${copy} is ${old.status}, not out: only a copy that is out can pass to another holder.`, [{ field: 'status', message: old.status }]);
  if (old.holderId === input.holderId) throw badRequest(`${old.holderName} holds ${copy} already: choose the person it passes to.`, [{ field: 'holderId', message: 'the same holder' }]);
  await receivingHolder(db, input.holderId, 'passed to');
  if (key.status !== 'active') throw conflict(`Key ${key.symbol} is ${key.status}: take ${copy} back instead of passing it on.`, [{ field: 'keyId', message: `key ${key.status}` }]);
  const request = await checkRequest(db, input.requestId, input.holderId, key.id);
  // Closed first (the link is checked at commit): the live record of a copy is unique, and the new one takes its copy number.
  const next = randomUUID();
  await db('key_issues').where({ id }).update({ status: 'transferred', transferred_at: db.fn.now(), transferred_to: next });
  await db('key_issues').insert({ id: next, holder_id: input.holderId, [key.column]: key.id, copy_number: old.copy, request_id: input.requestId ?? null, issued_by: by, due_date: input.dueDate ?? null, ack_name: input.acknowledgement.name, ack_signature: input.acknowledgement.signature ?? null });
  return { id: next, from: old.holderId, copy, request: request === null ? null : `#${request}` };
}

/** Copies out past their due date, or held by someone leaving or gone. */
export async function outstandingKeys(db: Knex): Promise<OutstandingKeys['issues']> {
  const rows = (await issueQuery(db)
    .where('i.status', 'out')
    .where((w) => {
      w.where('i.due_date', '<', db.raw('current_date')).orWhereIn('h.status', ['leaving', 'left']);
    })
    .orderBy([{ column: 'h.name' }, { column: 'keySymbol' }, { column: 'i.copy_number' }])) as IssueRow[];
  return rows.map((r) => {
    const issue = issueOf(r);
    return { ...issue, reason: r.holderStatus === 'active' ? ('overdue' as const) : r.holderStatus };
  });
}

/** Per key, the copies to cut with the bitting (restricted: the route allows and audits); a control key's copies too. */
export async function cutList(db: Knex, sealer: Sealer, issueIds: string[]): Promise<CutList['cutList']> {
  const rows = await db('key_issues as i')
    .leftJoin('keys as k', 'k.id', 'i.key_id')
    .leftJoin('control_keys as ck', 'ck.id', 'i.control_key_id')
    .whereIn('i.id', issueIds)
    .orderBy([{ column: 'symbol' }, { column: 'i.copy_number' }])
    .select<{ id: string; keyId: string; symbol: string; bitting_enc: string | null; control: boolean; copy_number: number }[]>('i.id', db.raw('coalesce(k.id, ck.id) as "keyId"'), db.raw('coalesce(k.symbol, ck.symbol) as symbol'), 'k.bitting_enc', db.raw('(i.control_key_id is not null) as control'), 'i.copy_number');
  const missing = issueIds.filter((id) => !rows.some((r) => r.id === id));
  if (missing.length) throw badRequest(`No key issue ${missing[0]}.`, [{ field: 'issueIds', message: `unknown issue ${missing[0]}` }]);
  const byKey = new Map<string, CutList['cutList'][number]>();
  for (const r of rows) {
    const line = byKey.get(r.keyId) ?? { keyId: r.keyId, keySymbol: r.symbol, bitting: r.control ? await controlBitting(db, sealer, r.keyId) : sealer.open(r.bitting_enc!, keyContext(r.keyId)), copyNumbers: [], quantity: 0 };
    line.copyNumbers.push(r.copy_number);
    line.quantity++;
    byKey.set(r.keyId, line);
  }
  return [...byKey.values()];
}

/** Queues one reminder per copy out and due (today or earlier) whose holder has an e-mail. */
export async function queueDueReminders(db: Knex): Promise<number> {
  const result = await db.raw(
    `insert into notifications (kind, ref_id)
     select 'key-due', i.id from key_issues i join key_holders h on h.id = i.holder_id
     where i.status = 'out' and i.due_date <= current_date and h.email is not null
     on conflict (kind, ref_id) do nothing`,
  );
  return (result as { rowCount: number }).rowCount;
}
