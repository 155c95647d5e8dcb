// Doors by hand (add, edit, retire, restore) and the CSV templates the importers must take as
// they are. Cases A5 and A7 of ../shared/design/reliability.md; CSV per RFC 4180.
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { doorTemplateCsv, keyTemplateCsv } from '../../shared/csvTemplates';
import { Door } from '../../shared/schemas/records';
import { countRows, startHarness, type Harness } from './harness';

let h: Harness;
let admin: string;
let lead: string;
let systemId: string;
beforeAll(async () => {
  h = await startHarness({}, { demo: true });
  admin = await h.tokenFor('admin');
  lead = await h.tokenFor('supervisor');
  systemId = (await h.db('key_systems').first('id')).id;
});
afterAll(async () => h.close());

const fieldsOf = (res: { json: { error: { details?: { field?: string }[] } } }) => (res.json.error.details ?? []).map((d) => d.field);
function csvForm(text: string, name = 'file.csv'): FormData {
  const form = new FormData();
  form.append('file', new Blob([text], { type: 'text/csv' }), name);
  return form;
}
const labels = async (query = '') => ((await h.call('GET', `/api/doors${query}`, { token: lead })).json.doors as { label: string }[]).map((d) => d.label);

describe('a door by hand', () => {
  let id: string;
  test('POST /api/doors adds it with its change key; audited (the Doors page: Add door)', async () => {
    const key = await h.db('keys').where({ key_system_id: systemId, symbol: 'AA3' }).first('id');
    const res = await h.call('POST', '/api/doors', { token: admin, body: { site: 'Main campus', building: 'Aster Hall', floor: '3', room: '301', label: 'AH-301', fireRated: false, keySystemId: systemId, keyId: key.id } });
    expect(res.status, res.text).toBe(201);
    const door = Door.parse(res.json.door);
    expect(door).toMatchObject({ label: 'AH-301', keySymbol: 'AA3', retiredAt: null });
    id = door.id;
    expect(await h.db('audit_events').where({ action: 'door.created', target_id: id }).first('id')).toBeDefined();
  });

  test('PATCH edits the room and fire rating; the audit row names the fields changed, not their values', async () => {
    const res = await h.call('PATCH', `/api/doors/${id}`, { token: admin, body: { room: '301A', fireRated: true } });
    expect(res.status, res.text).toBe(200);
    expect(res.json.door).toMatchObject({ room: '301A', fireRated: true });
    const event = await h.db('audit_events').where({ action: 'door.updated', target_id: id }).orderBy('id', 'desc').first();
    expect(event.details).toEqual({ fields: ['room', 'fireRated'] });
  });

  test.each([
    ['a label with a comma', { label: 'AH,301' }, 'label'],
    ['fireRated as text', { fireRated: 'yes' }, 'fireRated'],
    ['retired as text', { retired: 'soon' }, 'retired'],
    ['an empty building', { building: '  ' }, 'building'],
  ])('%s: 400 naming the field, nothing changed (A7)', async (_name, body, field) => {
    const before = await h.db('doors').where({ id }).first();
    const res = await h.call('PATCH', `/api/doors/${id}`, { token: admin, body });
    expect(res.status).toBe(400);
    expect(fieldsOf(res)).toContain(field);
    expect(await h.db('doors').where({ id }).first()).toEqual(before);
  });

  test('a supervisor cannot edit or retire a door (A-3)', async () => {
    expect((await h.call('PATCH', `/api/doors/${id}`, { token: lead, body: { retired: true } })).status).toBe(403);
  });

  test('retire: the door leaves the list and new work orders, stays readable with its history; restore brings it back', async () => {
    const res = await h.call('PATCH', `/api/doors/${id}`, { token: admin, body: { retired: true } });
    expect(res.status, res.text).toBe(200);
    expect(res.json.door.retiredAt).toEqual(expect.any(String));
    expect(await labels('?q=AH-301')).toEqual([]);
    expect(await labels('?q=AH-301&retired=all')).toEqual(['AH-301']);
    expect(await labels('?retired=only')).toEqual(['AH-301']);
    expect((await h.call('GET', `/api/doors/${id}/history`, { token: lead })).status).toBe(200);
    expect(await h.db('audit_events').where({ action: 'door.retired', target_id: id }).first('id')).toBeDefined();

    const key = await h.db('keys').where({ key_system_id: systemId, symbol: 'AA3' }).first('id');
    const wo = await h.call('POST', '/api/work-orders', { token: lead, body: { title: 'Into a retired door', purpose: 'other', keySystemId: systemId, doors: [{ doorId: id, keyId: key.id }] } });
    expect(wo.status).toBe(400);
    expect(fieldsOf(wo)).toEqual(['doors.0.doorId']);

    const back = await h.call('PATCH', `/api/doors/${id}`, { token: admin, body: { retired: false } });
    expect(back.json.door.retiredAt).toBeNull();
    expect(await labels('?q=AH-301')).toEqual(['AH-301']);
  });

  test('retiring a door that holds a core retires that core with it, named in the audit row', async () => {
    const door = await h.db('doors').whereExists(h.db('cores').whereRaw('cores.door_id = doors.id').where('state', 'installed')).whereNotExists(h.db('cores').whereRaw('cores.door_id = doors.id').whereIn('state', ['planned', 'loaded', 'checked', 'capped'])).first('id');
    const core = await h.db('cores').where({ door_id: door.id, state: 'installed' }).first('id', 'tag');
    const res = await h.call('PATCH', `/api/doors/${door.id}`, { token: admin, body: { retired: true } });
    expect(res.status, res.text).toBe(200);
    expect((await h.db('cores').where({ id: core.id }).first('state')).state).toBe('retired');
    const event = await h.db('audit_events').where({ action: 'door.retired', target_id: door.id }).first();
    expect(event.details).toMatchObject({ retiredCore: core.tag });
  });

  test('a door with a core still planned in an open work order is not retired: 409 naming the work order, nothing changed', async () => {
    const planned = await h.db('cores as c').join('work_order_cores as x', 'x.core_id', 'c.id').join('work_orders as w', 'w.id', 'x.work_order_id').where('c.state', 'planned').whereNotIn('w.status', ['done', 'cancelled']).first('c.door_id', 'w.number');
    const before = await countRows(h.db, 'audit_events');
    const res = await h.call('PATCH', `/api/doors/${planned.door_id}`, { token: admin, body: { retired: true } });
    expect(res.status).toBe(409);
    expect(res.json.error.message).toContain(`#${planned.number}`);
    expect((await h.db('doors').where({ id: planned.door_id }).first('retired_at')).retired_at).toBeNull();
    expect(await countRows(h.db, 'audit_events')).toEqual(before);
  });

  test('the list is in natural label order (common practice: BL-2 before BL-10)', async () => {
    for (const label of ['ZZ-10', 'ZZ-2', 'ZZ-1']) await h.call('POST', '/api/doors', { token: admin, body: { site: 'Main campus', building: 'Zeta', label } });
    expect(await labels('?building=Zeta')).toEqual(['ZZ-1', 'ZZ-2', 'ZZ-10']);
  });
});

describe('the CSV templates (header, allowed values and an example as # lines)', () => {
  test('the door template as downloaded previews with no rows and no errors (the importer takes it as it is)', async () => {
    const res = await h.call('POST', '/api/doors/import', { token: admin, raw: csvForm(doorTemplateCsv(['Quillon Hill College'])) });
    expect(res.status, res.text).toBe(200);
    expect(res.json).toMatchObject({ rows: 0, errors: [], committed: false });
  });

  test("the door template with its example line filled in imports exactly that door; a # inside notes is kept (RFC 4180 fields, the template's comment rule)", async () => {
    const text = `${doorTemplateCsv()}Main campus,Birchwood Library,1,199,BL-199,yes,Quillon Hill College,AA1,Room #199\r\n`;
    const before = await countRows(h.db, 'doors');
    const res = await h.call('POST', '/api/doors/import?commit=1', { token: admin, raw: csvForm(text) });
    expect(res.status, res.text).toBe(200);
    expect(res.json).toMatchObject({ rows: 1, committed: true, created: 1 });
    expect(res.json.errors).toEqual([]);
    expect((await countRows(h.db, 'doors')).doors).toBe(before.doors! + 1);
    expect(await h.db('doors').where({ label: 'BL-199' }).first('fire_rated', 'notes')).toEqual({ fire_rated: true, notes: 'Room #199' });
  });

  test('the bitting-list template for the demo profile previews cleanly; its rows line count as the spreadsheet shows', async () => {
    const template = keyTemplateCsv({ chambers: 7, minDepth: 0, maxDepth: 9 });
    const as = await h.call('POST', `/api/key-systems/${systemId}/import`, { token: admin, raw: csvForm(template) });
    expect(as.status, as.text).toBe(200);
    expect(as.json).toMatchObject({ rows: 0, errors: [] });
    const lines = template.trim().split('\r\n').length;
    const bad = await h.call('POST', `/api/key-systems/${systemId}/import`, { token: admin, raw: csvForm(`${template}ZZ9,change,AA,12,active,no,\r\n`) });
    expect(bad.status).toBe(422);
    expect(bad.json.errors[0]).toMatchObject({ row: lines + 1, column: 'bitting' });
  });

  test('a file with nothing at all is still a clear 400 (A7)', async () => {
    const res = await h.call('POST', '/api/doors/import', { token: admin, raw: csvForm('') });
    expect(res.status).toBe(400);
    expect(res.json.error.message).toMatch(/header/);
  });
});

describe('PATCH leaves out what it is not given', () => {
  test('a PATCH of the notes alone keeps the floor, room and fire rating (zod defaults must not fill a PATCH; RFC 5789 partial update)', async () => {
    const door = await h.db('doors').where({ fire_rated: true }).whereNot({ floor: '' }).first('id', 'floor', 'room');
    const res = await h.call('PATCH', `/api/doors/${door.id}`, { token: admin, body: { notes: 'Closer adjusted' } });
    expect(res.status).toBe(200);
    expect(res.json.door).toMatchObject({ floor: door.floor, room: door.room, fireRated: true, notes: 'Closer adjusted' });
  });
});
