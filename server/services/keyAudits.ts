/**
 * Key audits. Starting one over a key system or a department asks every holder with copies out
 * in it, by a mailed link (a random token of which only the SHA-256 is stored, single use,
 * expiring with the key audit), which copies they still hold. A copy flagged missing opens a
 * lost report (reportKey, the exposure computed as for any report) in the office's queue. The
 * key audit's page is the report of who has answered and who has not.
 *
 * Reminders: while a key audit is open (not closed, not past its deadline) each holder who has not
 * answered gets at most one reminder a day (`queueKeyAuditReminders`, from the owed-mail job of every
 * server process: one `key_audit_reminders` row per holder and day, unique, then a notification sent
 * under its row lock by notifier.ts). A supervisor can remind the unanswered at once, send one holder
 * their link again, or close the key audit. Every mail carries a new single-use link that replaces the
 * one before (the old token's hash is kept so it can say to use the newest e-mail).
 *
 * The tables keep the names they were stored under (`key_campaigns`, `key_campaign_holders`,
 * `key_campaign_copies`, `key_campaign_number_seq`, the column `campaign_id`): a key audit is one
 * row of `key_campaigns` (DEVELOPERS.md, Words, "key audit").
 */
import { randomBytes } from 'node:crypto';
import type { Knex } from 'knex';
import { KEY_AUDIT_LINK_DAYS, type KeyAuditConfirm, type KeyAuditLinkAnswer, type KeyAudit, type KeyAuditInput, type KeyAuditSummary } from '../../shared/schemas/keyControlKeyAudits';
import { naturalCompare } from '../../shared/words';
import type { Config } from '../config';
import { badRequest, conflict, HttpError, notFound } from '../errors';
import { joinHolder } from './keyHolders';
import { reportKey } from './keyReports';
import { mails, type Mail, type Mailer } from './mail';
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
  const q = db('key_issues as i').join('key_holders as h', 'h.id', 'i.holder_id').leftJoin('keys as k', 'k.id', 'i.key_id').leftJoin('control_keys as ck', 'ck.id', 'i.control_key_id').where('i.status', 'out');
  if (input.keySystemId) q.whereRaw('coalesce(k.key_system_id, ck.key_system_id) = ?', [input.keySystemId]);
  else q.where('h.department_id', input.departmentId!);
  const copies = await q.select<OutCopy[]>('i.id as issueId', 'h.id as holderId', 'h.name', 'h.email', db.raw('coalesce(k.symbol, ck.symbol) as "keySymbol"'), 'i.copy_number as copyNumber');
  const asked = copies.filter((c) => c.email);
  if (!asked.length) throw conflict('No holder with an e-mail on record has a key out in that scope: there is no one to ask.', [{ field: input.keySystemId ? 'keySystemId' : 'departmentId', message: 'no one to ask' }]);
  const { nextval } = ((await db.raw(`select nextval('key_campaign_number_seq')::int as nextval`)).rows as { nextval: number }[])[0]!;
  const expiresAt = new Date(Date.now() + KEY_AUDIT_LINK_DAYS * 86400_000);
  const [row] = await db('key_campaigns').insert({ number: nextval, title: input.title, key_system_id: input.keySystemId ?? null, department_id: input.departmentId ?? null, expires_at: expiresAt, created_by: by }).returning('id');
  const links: StartedKeyAudit['links'] = [];
  for (const holderId of [...new Set(asked.map((c) => c.holderId))]) {
    const mine = asked.filter((c) => c.holderId === holderId).sort((a, b) => naturalCompare(a.keySymbol, b.keySymbol) || a.copyNumber - b.copyNumber);
    const token = randomBytes(32).toString('base64url');
    const [ch] = await db('key_campaign_holders').insert({ campaign_id: row.id, holder_id: holderId, token_hash: sha256(token), mailed_at: db.fn.now() }).returning('id');
    await db('key_campaign_copies').insert(mine.map((c) => ({ campaign_holder_id: ch.id, issue_id: c.issueId })));
    links.push({ name: mine[0]!.name, email: mine[0]!.email!, token, copies: mine.map((c) => ({ keySymbol: c.keySymbol, copyNumber: c.copyNumber })) });
  }
  return { id: row.id as string, number: nextval, title: input.title, expiresAt, links };
}

interface CopyRow { keyAuditId: string; holderId: string; name: string; department: string; email: string | null; answeredAt: Date | null; mailedAt: Date | null; reminders: number; issueId: string; keySymbol: string; copyNumber: number; answer: 'held' | 'missing' | null; reportId: string | null }

function copiesQuery(db: Knex) {
  return joinHolder(db('key_campaign_copies as cc').join('key_campaign_holders as ch', 'ch.id', 'cc.campaign_holder_id'), 'ch.holder_id')
    .join('key_issues as i', 'i.id', 'cc.issue_id')
    .leftJoin('keys as k', 'k.id', 'i.key_id').leftJoin('control_keys as ck', 'ck.id', 'i.control_key_id')
    .select('ch.campaign_id as keyAuditId', 'h.id as holderId', 'h.name', 'd.name as department', 'h.email', 'ch.answered_at as answeredAt', 'ch.mailed_at as mailedAt', 'ch.reminders', 'i.id as issueId', db.raw('coalesce(k.symbol, ck.symbol) as "keySymbol"'), 'i.copy_number as copyNumber', 'cc.answer', 'cc.report_id as reportId');
}

const iso = (d: Date | null) => (d ? new Date(d).toISOString() : null);

async function summaries(db: Knex, id?: string): Promise<(KeyAuditSummary & { rows: CopyRow[] })[]> {
  const q = db('key_campaigns as c').leftJoin('key_systems as s', 's.id', 'c.key_system_id').leftJoin('departments as d', 'd.id', 'c.department_id').orderBy('c.number', 'desc').select('c.id', 'c.number', 'c.title', 'c.key_system_id', 'c.department_id', 's.name as systemName', 'd.name as departmentName', 'c.created_at', 'c.expires_at', 'c.closed_at');
  if (id) q.where('c.id', id);
  const audits = (await q.limit(200)) as { id: string; number: number; title: string; key_system_id: string | null; department_id: string | null; systemName: string | null; departmentName: string | null; created_at: Date; expires_at: Date; closed_at: Date | null }[];
  const rows = (await copiesQuery(db).whereIn('ch.campaign_id', audits.map((c) => c.id))) as CopyRow[];
  const out = [];
  for (const c of audits) {
    const mine = rows.filter((r) => r.keyAuditId === c.id);
    const people = new Set(mine.map((r) => r.holderId));
    const answered = new Set(mine.filter((r) => r.answeredAt).map((r) => r.holderId));
    // Holders with keys out in the scope today but no e-mail: not asked.
    const nq = db('key_issues as i').join('key_holders as h', 'h.id', 'i.holder_id').leftJoin('keys as k', 'k.id', 'i.key_id').leftJoin('control_keys as ck', 'ck.id', 'i.control_key_id').where('i.status', 'out').whereNull('h.email').distinct('h.name');
    if (c.key_system_id) nq.whereRaw('coalesce(k.key_system_id, ck.key_system_id) = ?', [c.key_system_id]);
    else nq.where('h.department_id', c.department_id);
    const noEmail = ((await nq) as { name: string }[]).map((r) => r.name).sort(naturalCompare);
    out.push({
      id: c.id,
      number: c.number,
      title: c.title,
      scope: c.key_system_id ? { kind: 'key-system' as const, name: c.systemName! } : { kind: 'department' as const, name: c.departmentName! },
      createdAt: iso(c.created_at)!,
      expiresAt: iso(c.expires_at)!,
      closedAt: iso(c.closed_at),
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
    if (!p) people.push((p = { holderId: r.holderId, name: r.name, department: r.department, email: r.email, answeredAt: iso(r.answeredAt), mailedAt: iso(r.mailedAt), reminders: r.reminders, copies: [] }));
    p.copies.push({ issueId: r.issueId, keySymbol: r.keySymbol, copyNumber: r.copyNumber, answer: r.answer, reportId: r.reportId });
  }
  // Who has not answered first: that is the list the office chases.
  people.sort((a, b) => Number(Boolean(a.answeredAt)) - Number(Boolean(b.answeredAt)) || naturalCompare(a.name, b.name));
  for (const p of people) p.copies.sort((a, b) => naturalCompare(a.keySymbol, b.keySymbol) || a.copyNumber - b.copyNumber);
  return { ...summary, people };
}

const deadLink = () => new HttpError('unprocessable', 'This link has expired, was used already or is not valid; ask the key office for a new one.');
const replacedLink = () => new HttpError('unprocessable', 'This link was replaced by a newer one: open the link in the newest key audit e-mail from the key office (if you answered from it already, there is nothing more to do).');
const closedLink = () => new HttpError('unprocessable', 'This key audit is closed: there is nothing more to answer. Thank you.');

async function openLink(db: Knex, token: string, lock: boolean) {
  const q = db('key_campaign_holders as ch').join('key_campaigns as c', 'c.id', 'ch.campaign_id').join('key_holders as h', 'h.id', 'ch.holder_id').where('ch.token_hash', sha256(token));
  if (lock) q.forUpdate('ch');
  const link = await q.first('ch.id', 'ch.answered_at', 'c.expires_at', 'c.closed_at', 'c.number', 'c.title', 'h.name');
  if (!link) throw (await db('key_audit_replaced_links').where({ token_hash: sha256(token) }).first('token_hash')) ? replacedLink() : deadLink();
  if (link.answered_at || new Date(link.expires_at) <= new Date()) throw deadLink();
  if (link.closed_at) throw closedLink();
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

/** A key audit that is still asking: not closed and before its deadline; else a conflict that says which. */
async function openKeyAudit(db: Knex, id: string): Promise<{ id: string; number: number; title: string; expires_at: Date }> {
  const c = await db('key_campaigns').where({ id }).forUpdate().first<{ id: string; number: number; title: string; expires_at: Date; closed_at: Date | null } | undefined>('id', 'number', 'title', 'expires_at', 'closed_at');
  if (!c) throw notFound('That key audit');
  if (c.closed_at) throw conflict(`Key audit #${c.number} is closed: no more mail goes out for it.`);
  if (new Date(c.expires_at) <= new Date()) throw conflict(`Key audit #${c.number} is past its deadline: its links no longer work. Start a new key audit to ask again.`);
  return c;
}

/** Closes a key audit: its links stop working and no reminder goes out for it. */
export async function closeKeyAudit(db: Knex, id: string, by: string): Promise<{ number: number; unanswered: number }> {
  const c = await db('key_campaigns').where({ id }).forUpdate().first<{ number: number; closed_at: Date | null } | undefined>('number', 'closed_at');
  if (!c) throw notFound('That key audit');
  if (c.closed_at) throw conflict(`Key audit #${c.number} is closed already.`);
  await db('key_campaigns').where({ id }).update({ closed_at: db.fn.now(), closed_by: by });
  const unanswered = Number((await db('key_campaign_holders').where({ campaign_id: id }).whereNull('answered_at').count<{ n: string }[]>({ n: '*' }))[0]!.n);
  return { number: c.number, unanswered };
}

/**
 * Where the owed-mail job and "remind now" agree a holder may still be asked: not answered, the key audit open, an
 * e-mail on record, and no reminder of the last day still on its way (one that never went, its notification given up
 * after ten failures, does not hold the holder back for good).
 */
const stillAsking = `ch.answered_at is null and c.closed_at is null and c.expires_at > now() and h.email is not null
  and not exists (select 1 from key_audit_reminders p where p.campaign_holder_id = ch.id and p.done_at is null and p.created_at > now() - interval '1 day')`;

/**
 * The daily reminders: one per holder who has not answered, whose last mail is a day old, in an open
 * key audit. The unique (holder, day) row makes a second process's insert, or a second run the same
 * day, a no-op; its notification is sent under a row lock by notifier.ts. Returns how many were queued.
 */
export async function queueKeyAuditReminders(db: Knex): Promise<number> {
  const result = await db.raw(
    `with due as (
       insert into key_audit_reminders (campaign_holder_id, day)
       select ch.id, current_date from key_campaign_holders ch
       join key_campaigns c on c.id = ch.campaign_id join key_holders h on h.id = ch.holder_id
       where ${stillAsking} and ch.mailed_at <= now() - interval '1 day'
       on conflict (campaign_holder_id, day) do nothing
       returning id)
     insert into notifications (kind, ref_id) select 'key-audit-reminder', id from due
     on conflict (kind, ref_id) do nothing`,
  );
  return (result as { rowCount: number }).rowCount;
}

/** A supervisor's "remind now": a reminder for every holder not answered (none already on its way). */
export async function remindNow(db: Knex, id: string, by: string): Promise<{ number: number; holders: number }> {
  const c = await openKeyAudit(db, id);
  const result = await db.raw(
    `with due as (
       insert into key_audit_reminders (campaign_holder_id, requested_by)
       select ch.id, ? from key_campaign_holders ch
       join key_campaigns c on c.id = ch.campaign_id join key_holders h on h.id = ch.holder_id
       where ch.campaign_id = ? and ${stillAsking}
       returning id)
     insert into notifications (kind, ref_id) select 'key-audit-reminder', id from due`,
    [by, id],
  );
  const holders = (result as { rowCount: number }).rowCount;
  if (!holders) throw conflict(`Everyone key audit #${c.number} asked (with an e-mail on record) has answered, or has a reminder on its way: there is no one to remind.`);
  return { number: c.number, holders };
}

/** A new single-use link for one holder; the old token's hash is kept so it can say "use the newest e-mail". */
async function newLink(db: Knex, campaignHolderId: string, reminder: boolean): Promise<string> {
  const token = randomBytes(32).toString('base64url');
  const old = await db('key_campaign_holders').where({ id: campaignHolderId }).first<{ token_hash: string }>('token_hash');
  await db('key_audit_replaced_links').insert({ token_hash: old.token_hash, campaign_holder_id: campaignHolderId }).onConflict('token_hash').ignore();
  await db('key_campaign_holders')
    .where({ id: campaignHolderId })
    .update({ token_hash: sha256(token), mailed_at: db.fn.now(), ...(reminder ? { reminders: db.raw('reminders + 1') } : {}) });
  return token;
}

interface Asked { chId: string; name: string; email: string | null; answered_at: Date | null; number: number; title: string; expires_at: Date; closed_at: Date | null }

function askedQuery(db: Knex) {
  return db('key_campaign_holders as ch')
    .join('key_campaigns as c', 'c.id', 'ch.campaign_id')
    .join('key_holders as h', 'h.id', 'ch.holder_id')
    .forUpdate('ch')
    .select('ch.id as chId', 'h.name', 'h.email', 'ch.answered_at', 'c.number', 'c.title', 'c.expires_at', 'c.closed_at');
}

async function linkMail(db: Knex, config: Config, a: Asked, token: string, reminder: boolean) {
  const rows = (await copiesQuery(db).where('ch.id', a.chId)) as CopyRow[];
  rows.sort((x, y) => naturalCompare(x.keySymbol, y.keySymbol) || x.copyNumber - y.copyNumber);
  return mails.keyAudit({ holder: a.name, number: a.number, title: a.title, copies: rows.map((r) => ({ keySymbol: r.keySymbol, copyNumber: r.copyNumber })), expires: new Date(a.expires_at).toISOString().slice(0, 10), link: `${config.publicUrl}/confirm-keys#${token}`, ...(reminder ? { reminder: true } : { again: true }) });
}

/**
 * Sends one reminder (notifier.ts, in the notification's transaction, the holder's row locked): a new
 * link replaces the old; nothing goes to a holder who answered meanwhile, or when the key audit closed.
 */
export async function sendReminder(db: Knex, config: Config, mailer: Mailer, reminderId: string): Promise<void> {
  const r = await db('key_audit_reminders').where({ id: reminderId }).whereNull('done_at').first<{ campaign_holder_id: string } | undefined>('campaign_holder_id');
  if (!r) return;
  const a = await askedQuery(db).where('ch.id', r.campaign_holder_id).first<Asked | undefined>();
  await db('key_audit_reminders').where({ id: reminderId }).update({ done_at: db.fn.now() });
  if (!a?.email || a.answered_at || a.closed_at || new Date(a.expires_at) <= new Date()) return;
  const token = await newLink(db, a.chId, true);
  await mailer.send({ to: a.email, ...(await linkMail(db, config, a, token, true)) });
}

/** The office sends one holder their link again (the mail failed or was lost): a new link, the old one dead. */
export async function resendLink(db: Knex, config: Config, id: string, holderId: string): Promise<{ number: number; name: string; mail: Mail }> {
  await openKeyAudit(db, id);
  const a = await askedQuery(db).where({ 'ch.campaign_id': id, 'ch.holder_id': holderId }).first<Asked | undefined>();
  if (!a) throw notFound('That key holder in this key audit');
  if (a.answered_at) throw conflict(`${a.name} answered already: there is no link to send again.`);
  if (!a.email) throw conflict(`${a.name} has no e-mail on record: add one on their page first.`, [{ field: 'email', message: 'no e-mail' }]);
  const token = await newLink(db, a.chId, false);
  return { number: a.number, name: a.name, mail: { to: a.email, ...(await linkMail(db, config, a, token, false)) } };
}
