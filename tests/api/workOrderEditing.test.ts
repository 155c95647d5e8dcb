// Editing a work order: its fields, doors added or removed before work starts, cross-keying a
// door (the chart computed with both change keys by the engine), and cancelling (cores not built
// are released). Cases A5 and A7 of ../shared/design/reliability.md.
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { Packet } from '../../shared/schemas/packet';
import { WorkOrder } from '../../shared/schemas/records';
import { countRows, startHarness, type Harness } from './harness';

let h: Harness;
let lead: string;
let systemId: string;
const keyId: Record<string, string> = {};
const doorId: Record<string, string> = {};
let woId: string;

beforeAll(async () => {
  h = await startHarness({}, { demo: true });
  lead = await h.tokenFor('supervisor');
  systemId = (await h.db('key_systems').first('id')).id;
  for (const k of await h.db('keys').select('id', 'symbol')) keyId[k.symbol] = k.id;
  // Doors with no core planned or built yet, so this file owns them.
  const free = await h.db('doors').whereNotExists(h.db('cores').whereRaw('cores.door_id = doors.id')).orderBy('label').limit(4).select('id', 'label');
  free.forEach((d, i) => (doorId[`d${i}`] = d.id));
  const res = await h.call('POST', '/api/work-orders', { token: lead, body: { title: 'Annex rekey', purpose: 'maintenance', keySystemId: systemId, doors: [{ doorId: doorId.d0, keyId: keyId.AA1 }, { doorId: doorId.d1, keyId: keyId.AA2 }] } });
  expect(res.status, res.text).toBe(201);
  woId = res.json.workOrder.id;
});
afterAll(async () => h.close());

const fieldsOf = (res: { json: { error: { details?: { field?: string }[] } } }) => (res.json.error.details ?? []).map((d) => d.field);
const detail = async () => (await h.call('GET', `/api/work-orders/${woId}`, { token: lead })).json as { workOrder: WorkOrder; cores: { id: string; tag: string; state: string; doorId: string; keySymbol: string; crossKeySymbol: string | null }[] };

describe('PATCH /api/work-orders/:id: title, due date, notes, assignee', () => {
  test('changes the fields; the audit row lists which fields, not their values', async () => {
    const res = await h.call('PATCH', `/api/work-orders/${woId}`, { token: lead, body: { title: 'Annex rekey, phase 1', dueDate: '2026-12-20', notes: 'Start at the east stair.' } });
    expect(res.status, res.text).toBe(200);
    expect(WorkOrder.parse(res.json.workOrder)).toMatchObject({ title: 'Annex rekey, phase 1', dueDate: '2026-12-20', notes: 'Start at the east stair.' });
    const event = await h.db('audit_events').where({ action: 'work-order.updated', target_id: woId }).orderBy('id', 'desc').first();
    expect(event.details.fields).toEqual(['title', 'dueDate', 'notes']);
  });

  test.each([
    ['a due date that is not a date', { dueDate: '20/12/2026' }, 'dueDate'],
    ['an empty title', { title: ' ' }, 'title'],
    ['a number field', { number: 7 }, null],
  ])('%s: 400, nothing changed (A5, A7)', async (_name, body, field) => {
    const before = await h.db('work_orders').where({ id: woId }).first();
    const res = await h.call('PATCH', `/api/work-orders/${woId}`, { token: lead, body });
    expect(res.status).toBe(400);
    if (field) expect(fieldsOf(res)).toContain(field);
    expect(await h.db('work_orders').where({ id: woId }).first()).toEqual(before);
  });
});

describe('doors added and removed before work starts', () => {
  test('POST /doors adds a door with its core and chart; the packet has it', async () => {
    const res = await h.call('POST', `/api/work-orders/${woId}/doors`, { token: lead, body: { doors: [{ doorId: doorId.d2, keyId: keyId.AB1 }] } });
    expect(res.status, res.text).toBe(201);
    expect(res.json.workOrder.coreCount).toBe(3);
    const { cores } = await detail();
    expect(cores.map((c) => c.keySymbol)).toEqual(['AA1', 'AA2', 'AB1']);
    const packet = Packet.parse((await h.call('GET', `/api/work-orders/${woId}/charts`, { token: lead })).json.packet);
    expect(packet.cores).toHaveLength(3);
  });

  test('a door already in the order, or unknown: 400 naming the row, nothing added', async () => {
    const before = await countRows(h.db, 'cores', 'audit_events');
    const res = await h.call('POST', `/api/work-orders/${woId}/doors`, { token: lead, body: { doors: [{ doorId: doorId.d0, keyId: keyId.AA1 }] } });
    expect(res.status).toBe(400);
    expect(fieldsOf(res)).toEqual(['doors.0.doorId']);
    expect(res.json.error.message).toMatch(/already/);
    expect(await countRows(h.db, 'cores', 'audit_events')).toEqual(before);
  });

  test('DELETE /cores/:coreId removes a planned core and its door; audited with the tag', async () => {
    const { cores } = await detail();
    const last = cores[2]!;
    const res = await h.call('DELETE', `/api/work-orders/${woId}/cores/${last.id}`, { token: lead });
    expect(res.status, res.text).toBe(200);
    expect(res.json.workOrder.coreCount).toBe(2);
    expect(await h.db('cores').where({ id: last.id }).first()).toBeUndefined();
    const event = await h.db('audit_events').where({ action: 'work-order.door-removed', target_id: woId }).first();
    expect(event.details).toMatchObject({ core: last.tag });
  });

  test('a technician cannot add doors (A-3)', async () => {
    const res = await h.call('POST', `/api/work-orders/${woId}/doors`, { token: await h.tokenFor('technician'), body: { doors: [{ doorId: doorId.d2, keyId: keyId.AB1 }] } });
    expect(res.status).toBe(403);
  });
});

describe('cross-keying a door in a work order', () => {
  test('a second change key: the chart is computed with both; the packet checks both keys, the cross one as cross', async () => {
    const res = await h.call('POST', `/api/work-orders/${woId}/doors`, { token: lead, body: { doors: [{ doorId: doorId.d3, keyId: keyId.AA3, crossKeyId: keyId.AB3 }] } });
    expect(res.status, res.text).toBe(201);
    const { cores } = await detail();
    const core = cores.find((c) => c.doorId === doorId.d3)!;
    expect(core).toMatchObject({ keySymbol: 'AA3', crossKeySymbol: 'AB3' });
    const packet = Packet.parse((await h.call('GET', `/api/work-orders/${woId}/charts`, { token: lead })).json.packet);
    const built = packet.cores.find((c) => c.id === core.id)!;
    expect(built.keyCheck.filter((k) => k.expect === 'turns').map((k) => `${k.role}:${k.symbol}`)).toEqual(expect.arrayContaining(['change:AA3', 'cross:AB3', 'master:AA', 'master:A']));
    expect(built.pinning.issues.filter((i) => i.severity === 'error')).toEqual([]);
  });

  test('cross-keying with a key of the door own chain is refused, naming crossKeyId (A7)', async () => {
    const res = await h.call('POST', '/api/pinning-preview', { token: lead, body: { keySystemId: systemId, keyId: keyId.AA3, crossKeyId: keyId.AB3 } });
    expect(res.status).toBe(200);
    expect(res.json.chain).toEqual(['AA3', 'AA', 'A', 'AB3']);
    const before = await countRows(h.db, 'cores');
    const bad = await h.call('POST', '/api/work-orders', { token: lead, body: { title: 'Self cross', purpose: 'other', keySystemId: systemId, doors: [{ doorId: doorId.d2, keyId: keyId.AA3, crossKeyId: keyId.AA }] } });
    expect(bad.status).toBe(400);
    expect(fieldsOf(bad)).toEqual(['doors.0.crossKeyId']);
    expect(await countRows(h.db, 'cores')).toEqual(before);
  });
});

describe('cancelling', () => {
  test('cancel: planned cores are released (retired), the order is closed to changes, audited with the tags', async () => {
    const res = await h.call('PATCH', `/api/work-orders/${woId}`, { token: lead, body: { status: 'cancelled' } });
    expect(res.status, res.text).toBe(200);
    expect(res.json.workOrder.status).toBe('cancelled');
    const states = await h.db('cores as c').join('work_order_cores as x', 'x.core_id', 'c.id').where('x.work_order_id', woId).pluck('c.state');
    expect(states.every((s: string) => s === 'retired')).toBe(true);
    const event = await h.db('audit_events').where({ action: 'work-order.cancelled', target_id: woId }).first();
    expect(event.details.released).toHaveLength(3);
    const again = await h.call('POST', `/api/work-orders/${woId}/doors`, { token: lead, body: { doors: [{ doorId: doorId.d2, keyId: keyId.AB1 }] } });
    expect(again.status).toBe(409);
    // The released doors are free for a new order.
    const next = await h.call('POST', '/api/work-orders', { token: lead, body: { title: 'Annex rekey, again', purpose: 'maintenance', keySystemId: systemId, doors: [{ doorId: doorId.d0, keyId: keyId.AA1 }] } });
    expect(next.status).toBe(201);
  });
});
