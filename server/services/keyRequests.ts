/**
 * Key requests and their authorisation. The proposal is the lowest key of the system that opens
 * every door asked for (through the engine on the installed cores), then the fewest doors
 * beyond them. The department's authorisers get a single-use, expiring link each (only the
 * token's SHA-256 is stored); the first decision, by link or by a supervisor, is the one.
 */
import { randomBytes } from 'node:crypto';
import type { Knex } from 'knex';
import type { KeyCandidate, KeyDecisionInput, KeyProposal, KeyRequest, KeyRequestInput, LinkRequestAnswer, OpenedDoor } from '../../shared/schemas/keyControlRequests';
import { naturalCompare } from '../../shared/words';
import { badRequest, conflict, HttpError, notFound } from '../errors';
import { exposedCores, installedCores } from './keyExposure';
import { joinHolder } from './keyHolders';
import { loadSystem } from './keySystems';
import type { Sealer } from './secrets';
import { sha256 } from './tokens';

export const REQUEST_LINK_HOURS = 72;
const levelRank = { change: 0, master: 1, gm: 2, ggm: 3 } as const;

/** Every active key that opens all the doors (plug, intended or incidental), best first. */
export async function proposeKeys(db: Knex, sealer: Sealer, doorIds: string[], chosen?: string): Promise<KeyProposal & { keySystemId: string }> {
  const doors = await db('doors').whereIn('id', doorIds).select<{ id: string; label: string }[]>('id', 'label');
  const cores = await db('cores').whereIn('door_id', doorIds).where({ state: 'installed' }).select<{ door_id: string; key_system_id: string }[]>('door_id', 'key_system_id');
  const problems = doorIds.flatMap((id, i) => {
    if (doorIds.indexOf(id) !== i) return [{ field: `doorIds.${i}`, message: 'listed twice' }];
    if (!doors.some((d) => d.id === id)) return [{ field: `doorIds.${i}`, message: 'unknown door' }];
    if (!cores.some((c) => c.door_id === id)) return [{ field: `doorIds.${i}`, message: `door ${doors.find((d) => d.id === id)!.label} has no core installed` }];
    return [];
  });
  if (problems.length) throw badRequest(`The doors cannot be served: ${problems[0]!.message}.`, problems);
  const systems = [...new Set(cores.map((c) => c.key_system_id))];
  if (systems.length > 1) throw badRequest('The doors are in different key systems: one key cannot open them all; make one request per key system.', [{ field: 'doorIds', message: 'more than one key system' }]);
  const system = await loadSystem(db, sealer, systems[0]!);
  const installed = await installedCores(db, system.id);
  const wanted = new Set(doorIds);
  const asked = installed.filter((c) => c.doorId && wanted.has(c.doorId));
  const candidates: KeyCandidate[] = [];
  for (const key of system.keys) {
    if (key.status !== 'active') continue;
    // Cheap first: the key must turn the plug of every core asked for (removing it is not opening it).
    if (exposedCores(system, asked, key).filter((c) => c.how !== 'control').length !== asked.length) continue;
    const opens: OpenedDoor[] = exposedCores(system, installed, key).flatMap((c) => (c.doorId && c.doorLabel ? [{ doorId: c.doorId, doorLabel: c.doorLabel, how: c.how, requested: wanted.has(c.doorId) }] : []));
    candidates.push({ keyId: key.id, keySymbol: key.symbol, level: key.level, opens, beyond: opens.filter((o) => !o.requested).length });
  }
  candidates.sort((a, b) => levelRank[a.level] - levelRank[b.level] || a.beyond - b.beyond || naturalCompare(a.keySymbol, b.keySymbol));
  if (!candidates.length) throw badRequest('No key of the system opens all these doors; ask for fewer doors or plan a cross key.', [{ field: 'doorIds', message: 'no key opens them all' }]);
  const proposal = chosen ? candidates.find((c) => c.keyId === chosen) : candidates[0];
  if (!proposal) throw badRequest('That key does not open every door asked for (or is not an active key of their system).', [{ field: 'keyId', message: 'does not open every door' }]);
  return { keySystemId: system.id, proposal, candidates };
}

export interface CreatedRequest {
  id: string;
  links: { name: string; email: string; token: string }[];
}

export async function createRequest(db: Knex, sealer: Sealer, input: KeyRequestInput, by: string): Promise<CreatedRequest> {
  const holder = await db('key_holders').where({ id: input.holderId }).first('id', 'status', 'name', 'department_id');
  if (!holder) throw badRequest('There is no key holder with that id.', [{ field: 'holderId', message: 'unknown holder' }]);
  if (holder.status !== 'active') throw conflict(`${holder.name} is marked ${holder.status}: no new keys are requested for them.`, [{ field: 'holderId', message: `holder ${holder.status}` }]);
  const best = await proposeKeys(db, sealer, input.doorIds);
  const chosen = input.keyId ? await proposeKeys(db, sealer, input.doorIds, input.keyId) : best;
  const { nextval } = ((await db.raw(`select nextval('key_request_number_seq')::int as nextval`)).rows as { nextval: number }[])[0]!;
  const [row] = await db('key_requests')
    .insert({ number: nextval, holder_id: holder.id, key_system_id: best.keySystemId, door_ids: input.doorIds, reason: input.reason, proposed_key_id: best.proposal.keyId, key_id: chosen.proposal.keyId, created_by: by })
    .returning('id');
  return { id: row.id as string, links: await newLinks(db, row.id as string, holder.department_id as string) };
}

/** A single-use, expiring link for each of the department's authorisers (only the token's SHA-256 stored). */
async function newLinks(db: Knex, requestId: string, departmentId: string): Promise<CreatedRequest['links']> {
  const authorisers = await db('department_authorisers').where({ department_id: departmentId }).select<{ id: string; name: string; email: string }[]>('id', 'name', 'email');
  const links: CreatedRequest['links'] = [];
  for (const a of authorisers) {
    const token = randomBytes(32).toString('base64url');
    await db('key_request_links').insert({ request_id: requestId, authoriser_id: a.id, token_hash: sha256(token), expires_at: new Date(Date.now() + REQUEST_LINK_HOURS * 3600_000) });
    links.push({ name: a.name, email: a.email, token });
  }
  return links;
}

/**
 * Sends the approval e-mail again (the first failed or was lost): every link of the request not yet used is
 * replaced (it then answers that a newer e-mail replaced it) and each authoriser of the department gets a new one.
 */
export async function resendLinks(db: Knex, id: string): Promise<CreatedRequest & { number: number }> {
  const r = await db('key_requests as r').join('key_holders as h', 'h.id', 'r.holder_id').where('r.id', id).forUpdate('r').first<{ status: string; number: number; department_id: string } | undefined>('r.status', 'r.number', 'h.department_id');
  if (!r) throw notFound('That key request');
  if (r.status !== 'pending') throw conflict(`Request #${r.number} was ${r.status} already: there is no approval to ask for.`, [{ field: 'status', message: `already ${r.status}` }]);
  await db('key_request_links').where({ request_id: id }).whereNull('used_at').whereNull('replaced_at').update({ replaced_at: db.fn.now() });
  const links = await newLinks(db, id, r.department_id);
  if (!links.length) throw conflict(`The holder's department has no one who may authorise keys: add an authoriser to it, or decide request #${r.number} in the app.`);
  return { id, number: r.number, links };
}

export async function getRequest(db: Knex, sealer: Sealer, id: string): Promise<KeyRequest> {
  const r = await joinHolder(db('key_requests as r'), 'r.holder_id')
    .join('keys as k', 'k.id', 'r.key_id')
    .leftJoin('keys as p', 'p.id', 'r.proposed_key_id')
    .where('r.id', id)
    .first('r.id', 'r.number', 'r.holder_id as holderId', 'h.name as holderName', 'd.name as department', 'r.key_system_id as keySystemId', 'r.door_ids', 'r.reason', 'r.proposed_key_id as proposedKeyId', 'p.symbol as proposedKeySymbol', 'r.key_id as keyId', 'k.symbol as keySymbol', 'r.status', 'r.decided_by_name as decidedBy', 'r.decided_at', 'r.decision_note as decisionNote', 'r.created_at');
  if (!r) throw notFound('That key request');
  const doorIds = r.door_ids as string[];
  const doors = await db('doors').whereIn('id', doorIds).select<{ id: string; label: string }[]>('id', 'label');
  const system = await loadSystem(db, sealer, r.keySystemId);
  const wanted = new Set(doorIds);
  const key = system.keys.find((k) => k.id === r.keyId)!;
  const opens = exposedCores(system, await installedCores(db, system.id), key).flatMap((c) => (c.doorId && c.doorLabel ? [{ doorId: c.doorId, doorLabel: c.doorLabel, how: c.how, requested: wanted.has(c.doorId) }] : []));
  const links = await db('key_request_links as l')
    .join('department_authorisers as a', 'a.id', 'l.authoriser_id')
    .where('l.request_id', id)
    .whereNull('l.used_at')
    .whereNull('l.replaced_at')
    .where('l.expires_at', '>', db.fn.now())
    .orderBy('a.name')
    .select<{ authoriser: string; sentAt: Date; expiresAt: Date }[]>('a.name as authoriser', 'l.sent_at as sentAt', 'l.expires_at as expiresAt');
  const { door_ids: _d, decided_at, created_at, ...rest } = r;
  return { ...rest, links: links.map((l) => ({ authoriser: l.authoriser, sentAt: new Date(l.sentAt).toISOString(), expiresAt: new Date(l.expiresAt).toISOString() })), doors: doorIds.map((d) => ({ id: d, label: doors.find((x) => x.id === d)?.label ?? '(removed)' })), opens, decidedAt: decided_at ? new Date(decided_at).toISOString() : null, createdAt: new Date(created_at).toISOString() };
}

export async function listRequests(db: Knex, sealer: Sealer, status?: KeyRequest['status']): Promise<KeyRequest[]> {
  const q = db('key_requests').orderBy('number', 'desc').limit(200);
  if (status) q.where({ status });
  const ids = (await q.pluck('id')) as string[];
  const out: KeyRequest[] = [];
  for (const id of ids) out.push(await getRequest(db, sealer, id));
  return out;
}

async function decide(db: Knex, id: string, input: KeyDecisionInput, who: { userId: string | null; name: string; email: string }): Promise<void> {
  const r = await db('key_requests').where({ id }).forUpdate().first('status', 'number');
  if (!r) throw notFound('That key request');
  if (r.status !== 'pending') throw conflict(`Request #${r.number} was ${r.status} already.`, [{ field: 'decision', message: `already ${r.status}` }]);
  await db('key_requests').where({ id }).update({ status: input.decision, decided_by_user_id: who.userId, decided_by_name: who.name, decided_by_email: who.email, decided_at: db.fn.now(), decision_note: input.note ?? null });
}

export async function decideInApp(db: Knex, id: string, input: KeyDecisionInput, user: { id: string; name: string; email: string }): Promise<void> {
  await decide(db, id, input, { userId: user.id, name: user.name, email: user.email });
}

const deadLink = () => new HttpError('unprocessable', 'This link has expired, was used already or is not valid; ask the key office to send the request again.');

/** The link's authoriser and request; a used, expired or unknown link is refused alike, a replaced one says so. */
async function openLink(db: Knex, token: string, lock: boolean) {
  const q = db('key_request_links as l').join('department_authorisers as a', 'a.id', 'l.authoriser_id').join('key_requests as r', 'r.id', 'l.request_id').where('l.token_hash', sha256(token));
  if (lock) q.forUpdate('l');
  const link = await q.first('l.id', 'l.request_id', 'l.expires_at', 'l.used_at', 'l.replaced_at', 'r.number', 'a.name', 'a.email');
  if (!link || link.used_at || new Date(link.expires_at) <= new Date()) throw deadLink();
  if (link.replaced_at) throw new HttpError('unprocessable', `This link was replaced by a newer one: open the link in the newest e-mail about key request #${link.number}.`);
  return link as { id: string; request_id: string; name: string; email: string };
}

/** What the authoriser's page shows: the request without its ids, and who they are. */
export async function linkAnswer(db: Knex, sealer: Sealer, requestId: string, authoriser: { name: string; email: string }): Promise<LinkRequestAnswer> {
  const r = await getRequest(db, sealer, requestId);
  return {
    request: { number: r.number, holderName: r.holderName, department: r.department, doors: r.doors, reason: r.reason, keySymbol: r.keySymbol, opens: r.opens, status: r.status, decidedBy: r.decidedBy, decidedAt: r.decidedAt },
    authoriser: { name: authoriser.name, email: authoriser.email },
  };
}

export async function viewByLink(db: Knex, sealer: Sealer, token: string): Promise<LinkRequestAnswer> {
  const link = await openLink(db, token, false);
  return linkAnswer(db, sealer, link.request_id, link);
}

/** Decides through the link and spends it; the request and the authoriser, for the answer and the audit trail. */
export async function decideByLink(db: Knex, token: string, input: KeyDecisionInput): Promise<{ requestId: string; name: string; email: string }> {
  const link = await openLink(db, token, true);
  await db('key_request_links').where({ id: link.id }).update({ used_at: db.fn.now() });
  await decide(db, link.request_id, input, { userId: null, name: link.name, email: link.email });
  return { requestId: link.request_id, name: link.name, email: link.email };
}
