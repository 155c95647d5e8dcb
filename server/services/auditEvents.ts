/**
 * The audit trail's events as people read them (the list and the CSV export): the actor's name, the record named (door BL-101, work order
 * #12, key AA3 in Quillon Hill College), and the details as a line of words (shared/auditTrailWords.ts).
 */
import type { Knex } from 'knex';
import { actionName, detailLine } from '../../shared/auditTrailWords';
import type { AuditPage, AuditQuery } from '../../shared/schemas/auditEvents';
import { whereDays } from './dates';
import { likeText } from './likeText';

export interface AuditFilter {
  /** Action prefixes, comma-separated. */
  action?: string | undefined;
  actorId?: string | undefined;
  targetId?: string | undefined;
  from?: string | undefined;
  to?: string | undefined;
  tz: number;
}

interface Row {
  id: string;
  at: Date | string;
  actorId: string | null;
  actorEmail: string | null;
  actorName: string | null;
  action: string;
  targetType: string | null;
  targetId: string | null;
  ip: string | null;
  details: Record<string, unknown> | null;
}

function auditQuery(db: Knex, f: AuditFilter) {
  const q = db('audit_events as e').leftJoin('users as u', 'u.id', 'e.actor_id');
  const prefixes = (f.action ?? '').split(',').map((p) => p.trim()).filter(Boolean);
  if (prefixes.length) q.where((w) => {
    for (const p of prefixes) w.orWhere('e.action', 'like', `${likeText(p)}%`);
  });
  if (f.actorId) q.where('e.actor_id', f.actorId);
  if (f.targetId) q.where('e.target_id', f.targetId);
  whereDays(db, q, 'e.at', f);
  return q;
}

const auditColumns = ['e.id', 'e.at', 'e.actor_id as actorId', 'e.actor_email as actorEmail', 'u.name as actorName', 'e.action', 'e.target_type as targetType', 'e.target_id as targetId', 'e.ip', 'e.details'];

const uuid = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;
const typeWords: Record<string, string> = { 'key-system': 'Key system', key: 'Key', door: 'Door', core: 'Core', 'work-order': 'Work order', 'work-order-packet': 'Packet of work order', user: 'User', profile: 'Profile', device: 'Tablet', completion: 'Completion', 'sync-record': 'A synced record', 'key-issue': 'Key copy', 'key-campaign': 'Key audit', 'key-request': 'Key request', 'control-key': 'Control key', 'key-report': 'Lost key report' };

/** Names for every record and user the page's rows mention, fetched once per table. */
async function namesFor(db: Knex, rows: Row[]): Promise<Map<string, string>> {
  const ids = (type: string[]) => [...new Set(rows.filter((r) => r.targetType && type.includes(r.targetType) && r.targetId && uuid.test(r.targetId)).map((r) => r.targetId!))];
  const detailIds = rows.flatMap((r) => Object.values(r.details ?? {}).filter((v): v is string => typeof v === 'string' && uuid.test(v)));
  const names = new Map<string, string>();
  const put = (list: { id: string; name: string }[]) => list.forEach((x) => names.set(x.id, x.name));
  const userIds = [...new Set([...ids(['user']), ...detailIds])];
  if (userIds.length) put(await db('users').whereIn('id', userIds).select('id', db.raw(`name || ' (' || email || ')' as name`)));
  const deviceIds = [...new Set([...ids(['device']), ...detailIds])];
  if (ids(['key-system']).length) put(await db('key_systems').whereIn('id', ids(['key-system'])).select('id', 'name'));
  if (ids(['key']).length) put(await db('keys as k').join('key_systems as s', 's.id', 'k.key_system_id').whereIn('k.id', ids(['key'])).select('k.id', db.raw(`k.symbol || ' in ' || s.name as name`)));
  if (ids(['door']).length) put(await db('doors').whereIn('id', ids(['door'])).select('id', 'label as name'));
  if (ids(['core']).length) put(await db('cores').whereIn('id', ids(['core'])).select('id', 'tag as name'));
  if (ids(['work-order', 'work-order-packet']).length) put(await db('work_orders').whereIn('id', ids(['work-order', 'work-order-packet'])).select('id', db.raw(`'#' || number || ' ' || title as name`)));
  if (deviceIds.length) put(await db('devices as d').join('users as u', 'u.id', 'd.user_id').whereIn('d.id', deviceIds).select('d.id', db.raw(`coalesce(d.label, 'tablet') || ' of ' || u.name as name`)));
  if (ids(['key-issue']).length) put(await db('key_issues as i').leftJoin('keys as k', 'k.id', 'i.key_id').leftJoin('control_keys as ck', 'ck.id', 'i.control_key_id').join('key_holders as h', 'h.id', 'i.holder_id').whereIn('i.id', ids(['key-issue'])).select('i.id', db.raw(`coalesce(k.symbol, ck.symbol) || ' #' || i.copy_number || ' of ' || h.name as name`)));
  // A key audit's stored target type is key-campaign (its table's name); on screen it is a key audit.
  if (ids(['key-campaign']).length) put(await db('key_campaigns').whereIn('id', ids(['key-campaign'])).select('id', db.raw(`'#' || number || ' ' || title as name`)));
  if (ids(['key-request']).length) put(await db('key_requests as r').join('key_holders as h', 'h.id', 'r.holder_id').whereIn('r.id', ids(['key-request'])).select('r.id', db.raw(`'#' || r.number || ' for ' || h.name as name`)));
  if (ids(['key-report']).length) put(await db('key_reports as r').join('key_issues as i', 'i.id', 'r.issue_id').leftJoin('keys as k', 'k.id', 'i.key_id').leftJoin('control_keys as ck', 'ck.id', 'i.control_key_id').join('key_holders as h', 'h.id', 'i.holder_id').whereIn('r.id', ids(['key-report'])).select('r.id', db.raw(`coalesce(k.symbol, ck.symbol) || ' #' || i.copy_number || ' of ' || h.name as name`)));
  if (ids(['control-key']).length) put(await db('control_keys as k').join('key_systems as s', 's.id', 'k.key_system_id').whereIn('k.id', ids(['control-key'])).select('k.id', db.raw(`k.symbol || ' in ' || s.name as name`)));
  if (detailIds.length) put(await db('key_holders').whereIn('id', detailIds).select('id', 'name'));
  if (ids(['completion']).length) put(await db('completions as c').join('cores as k', 'k.id', 'c.core_id').whereIn('c.id', ids(['completion'])).select('c.id', db.raw(`'of core ' || k.tag as name`)));
  return names;
}

function targetOf(r: Row, names: Map<string, string>): string {
  if (!r.targetType) return '';
  const type = typeWords[r.targetType] ?? r.targetType.replace(/-/g, ' ');
  if (r.targetType === 'profile') return `Profile ${r.targetId}`;
  if (r.targetType === 'sync-record') return type;
  const name = r.targetId ? names.get(r.targetId) : undefined;
  // A record deleted since (a removed core, say) keeps its kind; a bare id is never shown.
  return name ? `${type} ${name}` : `${type} (no longer on record)`;
}

export interface ReadableEvent {
  id: string;
  at: string;
  actorId: string | null;
  actorName: string;
  action: string;
  actionName: string;
  targetType: string | null;
  targetId: string | null;
  target: string;
  ip: string | null;
  summary: string;
}

async function readable(db: Knex, rows: Row[]): Promise<ReadableEvent[]> {
  const names = await namesFor(db, rows);
  // Profiles are keyed by their id; show their label.
  const profileIds = [...new Set(rows.filter((r) => r.targetType === 'profile' && r.targetId).map((r) => r.targetId!))];
  const labels = new Map<string, string>(profileIds.length ? (await db('profiles').whereIn('id', profileIds).select('id', 'label')).map((p: { id: string; label: string }) => [p.id, p.label]) : []);
  return rows.map((r) => ({
    id: String(r.id),
    at: new Date(r.at).toISOString(),
    actorId: r.actorId,
    actorName: r.actorName ?? r.actorEmail ?? 'nobody signed in',
    action: r.action,
    actionName: actionName(r.action),
    targetType: r.targetType,
    targetId: r.targetId,
    target: r.targetType === 'profile' ? `Profile ${labels.get(r.targetId ?? '') ?? '(no longer on record)'}` : targetOf(r, names),
    ip: r.ip,
    summary: detailLine(r.action, r.details, (id) => names.get(id)?.replace(/ \(.*\)$/, '')),
  }));
}

/** One page of the filtered trail, newest first, with the total the filter matches. */
export async function listAuditEvents(db: Knex, q: AuditQuery): Promise<AuditPage> {
  const base = auditQuery(db, q);
  const { total } = (await base.clone().count<{ total: number }[]>({ total: '*' }))[0]!;
  const rows = await base
    .orderBy('e.id', 'desc')
    .limit(q.pageSize)
    .offset((q.page - 1) * q.pageSize)
    .select(auditColumns);
  return { rows: await readable(db, rows), total: Number(total), page: q.page, pageSize: q.pageSize };
}

/** The filtered trail for the CSV export, newest first, read a thousand at a time up to `limit` events. */
export async function* auditEventsForExport(db: Knex, f: AuditFilter, limit = 50_000): AsyncGenerator<ReadableEvent> {
  const base = auditQuery(db, f).orderBy('e.id', 'desc').select(auditColumns);
  for (let offset = 0; offset < limit; offset += 1000) {
    const rows = await base.clone().limit(1000).offset(offset);
    yield* await readable(db, rows);
    if (rows.length < 1000) return;
  }
}
