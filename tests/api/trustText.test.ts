// Trust case T2 of ../shared/design/reliability.md: text the database cannot hold (NUL), other
// control characters, and bidi or zero-width characters that make one name look like another
// are refused with a 400 naming the field, wherever text comes in: queries, bodies, CSV cells,
// sync records. Nothing is stored.
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { completionFor, techPacket } from './factories';
import { countRows, startHarness, type Harness } from './harness';
import type { Packet } from '../../shared/schemas/packet';

let h: Harness;
let admin: string;
let lead: string;
let packet: Packet;
let techToken: string;
beforeAll(async () => {
  h = await startHarness({}, { demo: true });
  admin = await h.tokenFor('admin');
  lead = await h.tokenFor('supervisor');
  ({ packet, token: techToken } = await techPacket(h));
});
afterAll(async () => h?.close());

const NUL = '\u0000';
const RLO = '\u202E'; // right-to-left override (Unicode TR36 3.2)
const LRI = '\u2066'; // left-to-right isolate (UAX 9)
const ZWSP = '\u200B'; // zero-width space
const fields = (res: { json: { error?: { details?: { field?: string }[] } } }) => (res.json.error?.details ?? []).map((d) => d.field);

describe('T2 NUL and control characters in query parameters: 400 naming the parameter', () => {
  test.each([
    ['/api/doors', 'q', `Aster${NUL}`],
    ['/api/doors', 'building', `Aster${NUL}Hall`],
    ['/api/cores', 'tag', `AH${NUL}`],
    ['/api/cores', 'state', `x${NUL}`],
    ['/api/audit-events', 'action', `auth${NUL}`],
    ['/api/audit-events', 'targetId', `x${NUL}y`],
    ['/api/doors', 'q', 'Aster\u0007'],
    ['/api/doors', 'q', `Aster${RLO}Hall`],
  ])('GET %s?%s= with a control or bidi character: 400 naming it (PostgreSQL docs: text cannot hold NUL; Unicode TR36)', async (path, param, value) => {
    const res = await h.call('GET', `${path}?${param}=${encodeURIComponent(value)}`, { token: admin });
    expect(res.status).toBe(400);
    expect(res.json.error.code).toBe('validation');
    expect(fields(res)).toContain(param);
    expect(res.json.error.message).toMatch(/U\+[0-9A-F]{4}/);
  });

  test('the same filters with plain text still work (control)', async () => {
    expect((await h.call('GET', '/api/doors?q=Aster', { token: admin })).status).toBe(200);
    expect((await h.call('GET', '/api/cores?tag=AH-101', { token: admin })).status).toBe(200);
  });
});

describe('T2 names, titles, labels and notes in bodies', () => {
  const door = { site: 'Quillon Hill College', building: 'Aster Hall', label: 'AH-T2' };
  test.each([
    ['site', { ...door, site: `Quillon${NUL}` }],
    ['building', { ...door, building: `Aster${RLO}llaH` }],
    ['room', { ...door, room: `1${ZWSP}01` }],
    ['floor', { ...door, floor: `4${LRI}` }],
    ['label', { ...door, label: `AH${RLO}T2` }],
    ['notes', { ...door, notes: `fine${NUL}` }],
    ['notes', { ...door, notes: 'bell\u0007' }],
  ])('POST /api/doors with a bad character in %s: 400 naming it, nothing stored (Unicode TR36 3.2; PostgreSQL docs)', async (field, body) => {
    const before = await countRows(h.db, 'doors', 'audit_events');
    const res = await h.call('POST', '/api/doors', { token: admin, body });
    expect(res.status).toBe(400);
    expect(fields(res)).toContain(field);
    expect(await countRows(h.db, 'doors', 'audit_events')).toEqual(before);
  });

  test('notes keep tab and line breaks; names do not take them (common practice)', async () => {
    const ok = await h.call('POST', '/api/doors', { token: admin, body: { ...door, label: 'AH-T2B', notes: 'Line one\n\tLine two\r\nLine three' } });
    expect(ok.status).toBe(201);
    expect(ok.json.door.notes).toBe('Line one\n\tLine two\r\nLine three');
    const tabbed = await h.call('POST', '/api/doors', { token: admin, body: { ...door, label: 'AH-T2C', site: 'Quillon\tHill' } });
    expect(tabbed.status).toBe(400);
    expect(fields(tabbed)).toContain('site');
  });

  test('a work order title, a key-system name, a user name and a profile label with bidi or zero-width characters: 400 naming the field (Unicode TR36 3.2)', async () => {
    const system = await h.db('key_systems').first('id');
    const door1 = await h.db('doors').whereNotNull('key_id').first('id', 'key_id');
    const wo = await h.call('POST', '/api/work-orders', { token: lead, body: { title: `Aster ${RLO}llaH`, purpose: 'maintenance', keySystemId: system.id, doors: [{ doorId: door1.id, keyId: door1.key_id }] } });
    expect(wo.status).toBe(400);
    expect(fields(wo)).toContain('title');
    const ks = await h.call('PATCH', `/api/key-systems/${system.id}`, { token: admin, body: { name: `Quillon${ZWSP}` } });
    expect(ks.status).toBe(400);
    expect(fields(ks)).toContain('name');
    const user = await h.call('POST', '/api/users', { token: admin, body: { email: 'bidi-t2@demo.corewright.test', name: `Jordan ${LRI}Bench`, role: 'technician' } });
    expect(user.status).toBe(400);
    expect(fields(user)).toContain('name');
    const self = await h.db('users').where({ role: 'technician' }).first('id');
    const rename = await h.call('PATCH', `/api/users/${self.id}`, { token: admin, body: { name: `Tech${NUL}` } });
    expect(rename.status).toBe(400);
    expect(fields(rename)).toContain('name');
    const device = await h.call('POST', '/api/devices/escrow', { token: techToken, body: { deviceId: '4a1e6a59-0e2b-4b6f-9c1a-3c9f0b0d2e11', label: `Tablet${RLO}` } });
    expect(device.status).toBe(400);
    expect(fields(device)).toContain('label');
  });

  test('the same words in plain text are accepted (control)', async () => {
    const system = await h.db('key_systems').first('id', 'name');
    const ks = await h.call('PATCH', `/api/key-systems/${system.id}`, { token: admin, body: { name: system.name } });
    expect(ks.status).toBe(200);
  });
});

describe('T2 CSV imports refuse such cells with the row number', () => {
  const form = (text: string) => {
    const f = new FormData();
    f.append('file', new Blob([text], { type: 'text/csv' }), 'import.csv');
    return f;
  };

  test('doors: a NUL cell and a bidi label are errors on their rows and columns; nothing stored (RFC 4180; Unicode TR36)', async () => {
    const text = ['site,building,label,notes', 'Quillon Hill College,Aster Hall,AH-T2D,fine', `Quillon Hill College,Aster${NUL} Hall,AH-T2E,`, `Quillon Hill College,Aster Hall,AH${RLO}T2F,`, 'Quillon Hill College,Aster Hall,AH-T2G,"two\nlines"'].join('\n');
    const before = await countRows(h.db, 'doors');
    const res = await h.call('POST', '/api/doors/import?commit=1', { token: admin, raw: form(text) });
    expect(res.status).toBe(422);
    expect(res.json.committed).toBe(false);
    expect(res.json.errors).toEqual([
      { row: 3, column: 'building', message: expect.stringMatching(/U\+0000/) },
      { row: 4, column: 'label', message: expect.stringMatching(/U\+202E/) },
    ]);
    expect(await countRows(h.db, 'doors')).toEqual(before);
  });

  test('bitting lists: a control character in a symbol or parent is an error on its row (RFC 4180)', async () => {
    const system = await h.db('key_systems').first('id');
    const text = ['symbol,level,parent,bitting', `AAZ${NUL}1,change,AA,2468020`, `AAZ2,change,A${ZWSP}A,2468042`].join('\n');
    const before = await countRows(h.db, 'keys');
    const res = await h.call('POST', `/api/key-systems/${system.id}/import?commit=1`, { token: admin, raw: form(text) });
    expect(res.status).toBe(422);
    expect(res.json.errors).toEqual(expect.arrayContaining([{ row: 2, column: 'symbol', message: expect.stringMatching(/U\+0000/) }, { row: 3, column: 'parent', message: expect.stringMatching(/U\+200B/) }]));
    expect(await countRows(h.db, 'keys')).toEqual(before);
  });
});

describe('T2 in a sync batch only the record with such text is rejected', () => {
  test('a completion whose notes hold NUL and one whose key-check symbol holds a bidi override are rejected alone; the good one lands (PostgreSQL docs; Unicode TR36)', async () => {
    const [c0, c1, c2] = packet.cores;
    const nul = { ...completionFor(packet.workOrder.id, c0!), notes: `ok${NUL}` };
    const bidiBase = completionFor(packet.workOrder.id, c1!);
    const bidi = { ...bidiBase, attempts: bidiBase.attempts.map((a) => ({ ...a, keyChecks: a.keyChecks.map((k, i) => (i === 0 ? { ...k, symbol: `${k.symbol}${RLO}` } : k)) })) };
    const good = completionFor(packet.workOrder.id, c2!);
    const res = await h.call('POST', '/api/sync', { token: techToken, body: { deviceId: '5b2f7b6a-1f3c-4c7a-8d2b-4daf1c1e3f22', records: [nul, bidi, good] } });
    expect(res.status).toBe(200);
    expect(res.json.accepted).toEqual([good.clientId]);
    expect(res.json.rejected.map((r: { index: number }) => r.index)).toEqual([0, 1]);
    const rejectedFields = res.json.rejected.flatMap((r: { error: { details?: { field?: string }[] } }) => (r.error.details ?? []).map((d) => d.field));
    expect(rejectedFields).toEqual(expect.arrayContaining(['notes', expect.stringMatching(/^attempts\.0\.keyChecks\.0\.symbol$/)]));
  });
});
