/**
 * Key audits. Starting one over a key system or a department asks every holder with copies out
 * in it, by a mailed link (a random token of which only the SHA-256 is stored, single use,
 * expiring with the key audit), which copies they still hold. A copy flagged missing opens a
 * lost report (reportKey, the exposure computed as for any report) in the office's queue. The
 * key audit's page is the report of who has answered and who has not.
 *
 * The tables keep the names they were stored under (`key_campaigns`, `key_campaign_holders`,
 * `key_campaign_copies`, `key_campaign_number_seq`, the column `campaign_id`): a key audit is one
 * row of `key_campaigns` (DEVELOPERS.md, Words, "key audit").
 */
import { randomBytes } from 'node:crypto';
import type { Knex } from 'knex';
import { KEY_AUDIT_LINK_DAYS, type KeyAuditConfirm, type KeyAuditLinkAnswer, type KeyAudit, type KeyAuditInput, type KeyAuditSummary } from '../../shared/schemas/keyControlKeyAudits';
import { naturalCompare } from '../../shared/words';
import { badRequest, conflict, HttpError, notFound } from '../errors';
import { reportKey } from './keyReports';
import type { Sealer } from './secrets';
import { sha256 } from './tokens';

interface OutCopy { issueId: string; holderId: string; name: string; email: string | null; keySymbol: string; copyNumber: number }

export interface StartedKeyAudit {
  id: string;
  number: number;
  title: string;
  expiresAt: Date;
  links: { name: string; email: string; token: string; copies: { keySymbol: string; copyNumber: number }[] }[];
}

export async function startKeyAudit(db: Knex, input: KeyAuditInput, by: string): Promise<StartedKeyAudit> {
  const scope = input.keySystemId ? await db('key_systems').where({ id: input.keySystemId }).first('id') : await db('departments').where({ id: input.departmentId! }).first('id');
  if (!scope) throw badRequest(input.keySystemId ? 'There is no key system with that id.' : 'There is no department with that id.', [{ field: input.keySystemId ? 'keySystemId' : 'departmentId', message: 'unknown' }]);
  const q = db('key_issues as i').join('key_holders as h', 'h.id', 'i.holder_id').join('keys as k', 'k.id', 'i.key_id').where('i.status', 'out');
  if (input.keySystemId) q.where('k.key_system_id', input.keySystemId);
  else q.where('h.department_id', input.departmentId!);
  const copies = await q.select<OutCopy[]>('i.id as issueId', 'h.id as holderId', 'h.name', 'h.email', 'k.symbol as keySymbol', 'i.copy_number as copyNumber');
  const asked = copies.filter((c) => c.email);
  if (!asked.length) throw conflict('No holder with an e-mail on record has a key out in that scope: there is no one to ask.', [{ field: input.keySystemId ? 'keySystemId' : 'departmentId', message: 'no one to ask' }]);
  const { nextval } = ((await db.raw(`select nextval('key_campaign_number_seq')::int as nextval`)).rows as { nextval: number }[])[0]!;
  const expiresAt = new Date(Date.now() + KEY_AUDIT_LINK_DAYS * 86400_000);
  const [row] = await db('key_campaigns').insert({ number: nextval, title: input.title, key_system_id: input.keySystemId ?? null, department_id: input.departmentId ?? null, expires_at: expiresAt, created_by: by }).returning('id');
  const links: StartedKeyAudit['links'] = [];
  for (const holderId of [...new Set(asked.map((c) => c.holderId))]) {
    const mine = asked.filter((c) => c.holderId === holderId).sort((a, b) => naturalCompare(a.keySymbol, b.keySymbol) || a.copyNumber - b.copyNumber);
    const token = randomBytes(32).toString('base64url');
    const [ch] = await db('key_campaign_holders').insert({ campaign_id: row.id, holder_id: holderId, token_hash: sha256(token) }).returning('id');
    await db('key_campaign_copies').insert(mine.map((c) => ({ campaign_holder_id: ch.id, issue_id: c.issueId })));
    links.push({ name: mine[0]!.name, email: mine[0]!.email!, token, copies: mine.map((c) => ({ keySymbol: c.keySymbol, copyNumber: c.copyNumber })) });
  }
  return { id: row.id as string, number: nextval, title: input.title, expiresAt, links };
}

interface CopyRow { keyAuditId: string; holderId: string; name: string; department: string; email: string | null; answeredAt: Date | null; issueId: string; keySymbol: string; copyNumber: number; answer: 'held' | 'missing' | null; reportId: string | null }

function copiesQuery(db: Knex) {
  return db('key_campaign_copies as cc')
    .join('key_campaign_holders as ch', 'ch.id', 'cc.campaign_holder_id')
    .join('key_holders as h', 'h.id', 'ch.holder_id')
    .join('departments as d', 'd.id', 'h.department_id')
    .join('key_issues as i', 'i.id', 'cc.issue_id')
    .join('keys as k', 'k.id', 'i.key_id')
    .select('ch.campaign_id as keyAuditId', 'h.id as holderId', 'h.name', 'd.name as department', 'h.email', 'ch.answered_at as answeredAt', 'i.id as issueId', 'k.symbol as keySymbol', 'i.copy_number as copyNumber', 'cc.answer', 'cc.report_id as reportId');
}

const iso = (d: Date | null) => (d ? new Date(d).toISOString() : null);

async function summaries(db: Knex, id?: string): Promise<(KeyAuditSummary & { rows: CopyRow[] })[]> {
  const q = db('key_campaigns as c').leftJoin('key_systems as s', 's.id', 'c.key_system_id').leftJoin('departments as d', 'd.id', 'c.department_id').orderBy('c.number', 'desc').select('c.id', 'c.number', 'c.title', 'c.key_system_id', 'c.department_id', 's.name as systemName', 'd.name as departmentName', 'c.created_at', 'c.expires_at');
  if (id) q.where('c.id', id);
  const audits = (await q.limit(200)) as { id: string; number: number; title: string; key_system_id: string | null; department_id: string | null; systemName: string | null; departmentName: string | null; created_at: Date; expires_at: Date }[];
  const rows = (await copiesQuery(db).whereIn('ch.campaign_id', audits.map((c) => c.id))) as CopyRow[];
  const out = [];
  for (const c of audits) {
    const mine = rows.filter((r) => r.keyAuditId === c.id);
    const people = new Set(mine.map((r) => r.holderId));
    const answered = new Set(mine.filter((r) => r.answeredAt).map((r) => r.holderId));
    // Holders with keys out in the scope today but no e-mail: not asked.
    const nq = db('key_issues as i').join('key_holders as h', 'h.id', 'i.holder_id').join('keys as k', 'k.id', 'i.key_id').where('i.status', 'out').whereNull('h.email').distinct('h.name');
    if (c.key_system_id) nq.where('k.key_system_id', c.key_system_id);
    else nq.where('h.department_id', c.department_id);
    const noEmail = ((await nq) as { name: string }[]).map((r) => r.name).sort(naturalCompare);
    out.push({
      id: c.id,
      number: c.number,
      title: c.title,
      scope: c.key_system_id ? { kind: 'key-system' as const, name: c.systemName! } : { kind: 'department' as const, name: c.departmentName! },
      createdAt: iso(c.created_at)!,
      expiresAt: iso(c.expires_at)!,
      holders: people.size,
      confirmed: answered.size,
      missing: mine.filter((r) => r.answer === 'missing').length,
      noEmail,
      rows: mine,
    });
  }
  return out;
}

export async function listKeyAudits(db: Knex): Promise<KeyAuditSummary[]> {
  return (await summaries(db)).map(({ rows: _r, ...s }) => s);
}

export async function getKeyAudit(db: Knex, id: string): Promise<KeyAudit> {
  const [found] = await summaries(db, id);
  if (!found) throw notFound('That key audit');
  const { rows, ...summary } = found;
  const people: KeyAudit['people'] = [];
  for (const r of rows) {
    let p = people.find((x) => x.holderId === r.holderId);
    if (!p) people.push((p = { holderId: r.holderId, name: r.name, department: r.department, email: r.email, answeredAt: iso(r.answeredAt), copies: [] }));
    p.copies.push({ issueId: r.issueId, keySymbol: r.keySymbol, copyNumber: r.copyNumber, answer: r.answer, reportId: r.reportId });
  }
  // Who has not answered first: that is the list the office chases.
  people.sort((a, b) => Number(Boolean(a.answeredAt)) - Number(Boolean(b.answeredAt)) || naturalCompare(a.name, b.name));
  for (const p of people) p.copies.sort((a, b) => naturalCompare(a.keySymbol, b.keySymbol) || a.copyNumber - b.copyNumber);
  return { ...summary, people };
}

const deadLink = () => new HttpError('unprocessable', 'This link has expired, was used already or is not valid; ask the key office for a new one.');

async function openLink(db: Knex, token: string, lock: boolean) {
  const q = db('key_campaign_holders as ch').join('key_campaigns as c', 'c.id', 'ch.campaign_id').join('key_holders as h', 'h.id', 'ch.holder_id').where('ch.token_hash', sha256(token));
  if (lock) q.forUpdate('ch');
  const link = await q.first('ch.id', 'ch.answered_at', 'c.expires_at', 'c.number', 'c.title', 'h.name');
  if (!link || link.answered_at || new Date(link.expires_at) <= new Date()) throw deadLink();
  return link as { id: string; expires_at: Date; number: number; title: string; name: string };
}

async function linkAnswer(db: Knex, link: { id: string; expires_at: Date; number: number; title: string; name: string }): Promise<KeyAuditLinkAnswer> {
  const rows = (await copiesQuery(db).where('ch.id', link.id)) as CopyRow[];
  rows.sort((a, b) => naturalCompare(a.keySymbol, b.keySymbol) || a.copyNumber - b.copyNumber);
  return {
    keyAudit: { number: link.number, title: link.title, expiresAt: iso(link.expires_at)! },
    holder: { name: link.name },
    answeredAt: iso(rows[0]?.answeredAt ?? null),
    copies: rows.map((r) => ({ issueId: r.issueId, keySymbol: r.keySymbol, copyNumber: r.copyNumber, answer: r.answer })),
  };
}

export async function viewKeyAuditLink(db: Knex, token: string): Promise<KeyAuditLinkAnswer> {
  return linkAnswer(db, await openLink(db, token, false));
}

/** The holder's answer, once: every copy listed held or missing; a missing one opens a lost report. */
export async function confirmByLink(db: Knex, sealer: Sealer, input: KeyAuditConfirm): Promise<{ answer: KeyAuditLinkAnswer; reports: string[]; name: string }> {
  const link = await openLink(db, input.token, true);
  const listed = await db('key_campaign_copies').where({ campaign_holder_id: link.id }).select<{ id: string; issue_id: string }[]>('id', 'issue_id');
  const given = new Map(input.copies.map((c) => [c.issueId, c.held]));
  const problems = [
    ...input.copies.flatMap((c, i) => (listed.some((l) => l.issue_id === c.issueId) ? [] : [{ field: `copies.${i}.issueId`, message: 'not one of the keys this link asks about' }])),
    ...(listed.some((l) => !given.has(l.issue_id)) || given.size !== input.copies.length ? [{ field: 'copies', message: 'answer once for every key listed' }] : []),
  ];
  if (problems.length) throw badRequest(`Answer for every key listed, once each: ${problems[0]!.message}.`, problems);
  const reports: string[] = [];
  for (const l of listed) {
    const held = given.get(l.issue_id)!;
    let reportId: string | null = null;
    const issue = await db('key_issues').where({ id: l.issue_id }).first('status');
    // A copy returned or reported since the key audit began needs no new report.
    if (!held && issue?.status === 'out') {
      reportId = await reportKey(db, sealer, l.issue_id, { kind: 'lost', note: `Flagged missing by the holder in key audit #${link.number} (${link.title}).` }, null);
      reports.push(reportId);
    }
    await db('key_campaign_copies').where({ id: l.id }).update({ answer: held ? 'held' : 'missing', report_id: reportId });
  }
  await db('key_campaign_holders').where({ id: link.id }).update({ answered_at: db.fn.now() });
  return { answer: await linkAnswer(db, link), reports, name: link.name };
}
