// The audit trail as people read it: names for people and records, words for actions and details,
// filters by person, action and day, and an audited CSV export. Cases A-3 and A7 of
// ../shared/design/reliability.md; CSV per RFC 4180.
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { AuditPage } from '../../shared/schemas/auditEvents';
import { startHarness, type Harness } from './harness';

let h: Harness;
let admin: string;
let lead: string;
let leadId: string;
let doorId: string;
beforeAll(async () => {
  h = await startHarness({}, { demo: true });
  admin = await h.tokenFor('admin');
  lead = await h.tokenFor('supervisor');
  leadId = (await h.db('users').where({ email: 'lead@demo.corewright.test' }).first('id')).id;
  doorId = (await h.db('doors').where({ label: 'BL-101' }).first('id')).id;
  // Events to read: a door changed by the admin, bittings seen by the supervisor.
  await h.call('PATCH', `/api/doors/${doorId}`, { token: admin, body: { notes: 'Closer replaced' } });
  const ks = (await h.db('key_systems').first('id')).id;
  await h.call('GET', `/api/key-systems/${ks}/keys?reveal=1`, { token: lead });
});
afterAll(async () => h.close());

const page = async (query = '') => {
  const res = await h.call('GET', `/api/audit-events${query}`, { token: admin });
  expect(res.status, res.text).toBe(200);
  return AuditPage.parse(res.json);
};
const uuid = /[0-9a-f]{8}-[0-9a-f]{4}-/i;

describe('GET /api/audit-events reads as words', () => {
  test('people by name, records by their label, details as a line: no bare id, no JSON (common practice: a log a person can read)', async () => {
    const { rows } = await page();
    const door = rows.find((r) => r.action === 'door.updated')!;
    expect(door).toMatchObject({ actorName: 'Alex Admin (demo)', actionName: 'Changed a door', target: 'Door BL-101', summary: 'changed notes' });
    const seen = rows.find((r) => r.action === 'bittings.viewed')!;
    expect(seen).toMatchObject({ actionName: 'Saw bittings', target: 'Key system Quillon Hill College', summary: 'the key bittings (85)' });
    for (const r of rows) {
      expect(`${r.actorName} ${r.actionName} ${r.target} ${r.summary}`).not.toMatch(uuid);
      expect(r.summary).not.toMatch(/[{}"]/);
    }
  });

  test('filters: by person, by action group (comma-separated prefixes), by day; combined', async () => {
    const mine = await page(`?actorId=${leadId}`);
    expect(mine.rows.length).toBeGreaterThan(0);
    expect(mine.rows.every((r) => r.actorId === leadId)).toBe(true);
    const doors = await page('?action=door.,doors.');
    expect(doors.rows.map((r) => r.action)).toEqual(['door.updated']);
    const today = new Date().toISOString().slice(0, 10);
    expect((await page(`?from=${today}&to=${today}&actorId=${leadId}&action=bittings.`)).total).toBe(1);
    expect((await page('?from=2001-01-01&to=2001-01-02')).total).toBe(0);
  });

  test.each([
    [`action=${'a'.repeat(201)}`, 'action'],
    ['actorId=lead', 'actorId'],
    ['from=yesterday', 'from'],
    ['pageSize=500', 'pageSize'],
    ['who=me', null],
  ])('a bad filter %s: 400 naming it (A7)', async (query, field) => {
    const res = await h.call('GET', `/api/audit-events?${query}`, { token: admin });
    expect(res.status).toBe(400);
    if (field) expect(res.json.error.details.map((d: { field: string }) => d.field)).toContain(field);
  });

  test('a removed record still reads as its kind, never as an id', async () => {
    await h.db('audit_events').insert({ actor_id: leadId, actor_email: 'lead@demo.corewright.test', action: 'core.updated', target_type: 'core', target_id: 'ae0a0a97-0000-4000-8000-000000000000', details: JSON.stringify({}) });
    const row = (await page('?action=core.')).rows[0]!;
    expect(row.target).toBe('Core (no longer on record)');
  });
});

describe('GET /api/audit-events.csv', () => {
  test('the filtered log as CSV in words (RFC 4180, CRLF), and the export is itself audited with its filter', async () => {
    const res = await h.call('GET', `/api/audit-events.csv?action=door.&actorId=${(await h.db('users').where({ email: 'admin@demo.corewright.test' }).first('id')).id}`, { token: admin });
    expect(res.status).toBe(200);
    expect(res.headers.get('content-type')).toMatch(/text\/csv/);
    const lines = res.text.trim().split('\r\n');
    expect(lines[0]).toBe('at,actorName,actionName,target,summary,ip,action,id');
    expect(lines).toHaveLength(2);
    expect(lines[1]).toContain('Alex Admin (demo),Changed a door,Door BL-101,changed notes');
    const exported = await h.db('audit_events').where({ action: 'audit.exported' }).orderBy('id', 'desc').first();
    expect(exported.details.filter.action).toBe('door.');
  });

  test('a supervisor may not export it (A-3)', async () => {
    expect((await h.call('GET', '/api/audit-events.csv', { token: lead })).status).toBe(403);
  });
});
