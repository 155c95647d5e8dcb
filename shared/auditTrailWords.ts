/**
 * The audit trail in people's words: each action's name, and a line for its details. Used by the
 * server for the list and the CSV export, and by the screen's action filter. Never raw JSON.
 */
import { KEY_LEVEL_LABELS } from './keyLevels';
import { ROLE_LABELS } from './words';
export const actionWords: Record<string, string> = {
  'auth.sign-in': 'Signed in',
  'auth.sign-in.failed': 'Sign-in failed',
  'auth.sign-in.locked': 'Sign-in locked out',
  'auth.sign-out': 'Signed out',
  'auth.refresh.reused': 'Reused session token refused',
  'user.invited': 'Invited a user',
  'user.invitation-resent': 'Resent an invitation',
  'user.password-set': 'Set a password',
  'user.updated': 'Changed a user',
  'user.role-changed': "Changed a user's role",
  'user.deactivated': 'Deactivated a user',
  'bittings.viewed': 'Saw bittings',
  'packet.downloaded': 'Downloaded a work order packet',
  'completions.exported': 'Exported the completion log',
  'audit.exported': 'Exported the audit trail',
  'key-system.created': 'Created a key system',
  'key-system.updated': 'Changed a key system',
  'key-system.control-changed': 'Changed the control key',
  'key-system.audited': 'Ran the system audit',
  'audit-finding.acknowledged': 'Acknowledged a system audit finding',
  'keys.added': 'Added keys',
  'keys.imported': 'Imported a bitting list',
  'key.updated': 'Changed a key',
  'key.bitting-changed': "Changed a key's bitting",
  'key.retired': 'Retired a key',
  'key.replaced': 'Replaced a key',
  'profile.created': 'Created a profile',
  'profile.updated': 'Changed a profile',
  'door.created': 'Added a door',
  'door.updated': 'Changed a door',
  'door.retired': 'Retired a door',
  'door.restored': 'Restored a door',
  'doors.imported': 'Imported doors',
  'core.updated': 'Changed a core',
  'core.retired': 'Retired a core',
  'work-order.created': 'Created a work order',
  'work-order.updated': 'Changed a work order',
  'work-order.cancelled': 'Cancelled a work order',
  'work-order.doors-added': 'Added doors to a work order',
  'work-order.door-removed': 'Removed a door from a work order',
  'device.escrow-fetched': 'Recovered a tablet outbox',
  'device.revoked': 'Revoked a tablet',
  'sync.batch': 'Synced finished work',
  'sync.refused-revoked': 'Sync refused: tablet revoked',
  'access.denied': 'Access refused',
  'department.created': 'Added a department',
  'holder.created': 'Added a key holder',
  'holder.updated': 'Changed a key holder',
  'holder.leaving': 'Marked a key holder as leaving',
  'holder.left': 'Marked a key holder as gone',
  'holders.imported': 'Imported key holders',
  'key.issued': 'Issued a key',
  'key.returned': 'Took back a key',
  'key.transferred': 'Passed a key copy to another holder',
  'key.reported': 'Reported a key lost or stolen',
  'key-report.work-order': 'Planned the rekey after a lost key',
  'key-report.rebuilt': 'Rekey installed after a lost key (old key retired, re-issue tasks made)',
  'key-report.still-turns': 'The old key still turns installed cores after its rekey',
  'key-report.closed': 'Closed a lost key report',
  'key.reissued': 'Issued the new key for a retired one',
  'control-key.retired': 'Retired a control key (every core rebuilt for the new one)',
  'key-campaign.started': 'Started a key audit',
  'key-campaign.answered': 'A holder confirmed their keys',
  'key-audit.reminded': "Reminded the key audit's holders who have not answered",
  'key-audit.link-resent': "Sent a holder's key audit link again",
  'key-audit.closed': 'Closed a key audit',
  'key-request.created': 'Asked for a key',
  'key-request.decided': 'Decided a key request',
  'key-request.link-resent': "Sent a key request's approval e-mail again",
};

/** "door.retired" → its words; an action not listed yet still reads as words, not a code. */
export function actionName(action: string): string {
  return actionWords[action] ?? action.replace(/[.-]+/g, ' ').replace(/^./, (c) => c.toUpperCase());
}

/** The filter's choices; each value is the action prefixes it covers, comma-separated, as the API takes them. */
export const actionGroups = [
  { label: 'Bittings seen', value: 'bittings.' },
  { label: 'Exports (completion log, audit trail)', value: 'completions.exported,audit.exported' },
  { label: 'Packets downloaded', value: 'packet.' },
  { label: 'Keys added, imported or changed', value: 'keys.,key.' },
  { label: 'Key systems', value: 'key-system.' },
  { label: 'Profiles', value: 'profile.' },
  { label: 'Doors', value: 'door.,doors.' },
  { label: 'Work orders', value: 'work-order.' },
  { label: 'Sign-ins and sign-outs', value: 'auth.' },
  { label: 'Users and invitations', value: 'user.' },
  { label: 'Tablets and sync', value: 'device.,sync.' },
  { label: 'Access refused', value: 'access.denied' },
  { label: 'Key control (holders, requests, issues, lost keys, audits)', value: 'department.,holder.,holders.,key-request.,key.issued,key.returned,key.transferred,key.reported,key.reissued,key-report.,key-campaign.,key-audit.,control-key.' },
] as const;

const whatWords: Record<string, string> = { control: 'the control key', keys: 'the key bittings', charts: 'the pinning charts', 'progression-preview': 'a progression preview' };
const fieldWords: Record<string, string> = { deviceId: 'tablet', dueDate: 'due date', assigneeId: 'assignee', fireRated: 'fire rating', keySystemId: 'key system', keyId: 'key', parentId: 'master', crossKeyId: 'cross-keyed key' };

/** Stored values shown by name: a role or a key level, never "admin" or "gm". */
const valueWords: Record<string, Readonly<Record<string, string>>> = { role: ROLE_LABELS, level: KEY_LEVEL_LABELS };

type Value = unknown;
/** Names for ids found in details (users, mostly), filled in by the server. */
export type NameOf = (id: string) => string | undefined;

function words(key: string, v: Value, nameOf: NameOf): string | null {
  if (v === null || v === undefined || v === '') return null;
  if (Array.isArray(v)) return v.length ? `${key}: ${v.map((x) => (key === 'fields' ? (fieldWords[String(x)] ?? String(x)) : String(x))).join(', ')}` : null;
  if (typeof v === 'object') {
    const inner = Object.entries(v as Record<string, Value>)
      .map(([k, x]) => words(fieldWords[k] ?? k, x, nameOf))
      .filter(Boolean);
    return inner.length ? `${key}: ${inner.join('; ')}` : null;
  }
  if (typeof v === 'boolean') return `${key}: ${v ? 'yes' : 'no'}`;
  if (typeof v !== 'string' && typeof v !== 'number') return null; // details are JSON: nothing else reaches here
  const s = String(v);
  // A record's id is never shown bare: its name, or that it is gone.
  if (/^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i.test(s)) return `${key}: ${nameOf(s) ?? '(no longer on record)'}`;
  return `${key}: ${valueWords[key]?.[s] ?? nameOf(s) ?? s}`;
}

/** One readable line for an event's details. */
export function detailLine(action: string, details: Record<string, Value> | null, nameOf: NameOf = () => undefined): string {
  const d = { ...(details ?? {}) };
  const parts: string[] = [];
  if (typeof d.what === 'string') {
    parts.push(`${whatWords[d.what] ?? d.what}${typeof d.count === 'number' ? ` (${d.count})` : ''}`);
    delete d.what;
    delete d.count;
  }
  if (Array.isArray(d.fields)) {
    if (d.fields.length) parts.push(`changed ${d.fields.map((f) => fieldWords[String(f)] ?? String(f)).join(', ')}`);
    delete d.fields;
  }
  if (action === 'work-order.cancelled' && Array.isArray(d.released)) {
    parts.push(d.released.length ? `released ${d.released.join(', ')}` : 'no core to release');
    delete d.released;
  }
  if ('assigneeId' in d) {
    if (d.assigneeId) parts.push(`assigned to ${(typeof d.assigneeId === 'string' ? nameOf(d.assigneeId) : undefined) ?? 'a user'}`);
    delete d.assigneeId;
  }
  for (const [k, v] of Object.entries(d)) {
    const w = words(fieldWords[k] ?? k.replace(/([a-z])([A-Z])/g, '$1 $2').toLowerCase(), v, nameOf);
    if (w) parts.push(w);
  }
  return parts.join(' · ');
}
