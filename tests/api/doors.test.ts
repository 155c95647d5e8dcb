// Doors (openings): list and filters, read, create and update, the CSV import, a door's history.
// Cases A-3 (roles), A5 (mass assignment) and A7 (bad input names the field, nothing written) of
// ../shared/design/reliability.md; CSV per RFC 4180.
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { countRows, startHarness, type Harness } from './harness';

let h: Harness;
let admin: string;
let lead: string;
beforeAll(async () => {
  h = await startHarness({}, { demo: true });
  admin = await h.tokenFor('admin');
  lead = await h.tokenFor('supervisor');
});
afterAll(async () => h.close());

interface DoorJson {
  id: string;
  label: string;
  building: string;
  room: string;
  floor: string;
  site: string;
  fireRated: boolean;
  keyId: string | null;
  keySymbol: string | null;
  notes: string | null;
  currentCoreTag: string | null;
}

async function doors(query = ''): Promise<DoorJson[]> {
  const res = await h.call('GET', `/api/doors${query}`, { token: lead });
  expect(res.status).toBe(200);
  return res.json.doors;
}
async function doorByLabel(label: string): Promise<DoorJson> {
  const found = (await doors(`?q=${encodeURIComponent(label)}`)).find((d) => d.label === label);
  if (!found) throw new Error(`no demo door ${label}`);
  return found;
}
function csvForm(text: string, name = 'doors.csv'): FormData {
  const form = new FormData();
  form.append('file', new Blob([text], { type: 'text/csv' }), name);
  return form;
}
const upload = (text: string, commit = false) => h.call('POST', `/api/doors/import${commit ? '?commit=1' : ''}`, { token: admin, raw: csvForm(text) });
const fieldsOf = (res: { json: { error: { details?: { field?: string }[] } } }) => (res.json.error.details ?? []).map((d) => d.field);

describe('GET /api/doors: the list and its filters', () => {
  test('all 60 demo doors, sorted by building then label (the seed: 3 buildings of 18, 6 service rooms)', async () => {
    const all = await doors();
    expect(all).toHaveLength(60);
    const keys = all.map((d) => `${d.building}\u0000${d.label}`);
    expect(keys).toEqual([...keys].sort());
    // the list never carries a bitting (A10 spirit: bittings only through an audited reveal)
    expect(JSON.stringify(all)).not.toMatch(/bitting/i);
  });

  test('building= gives only that building (the seed: Birchwood Library has 17 rooms and a plant room)', async () => {
    const bl = await doors('?building=Birchwood%20Library');
    expect(bl).toHaveLength(18);
    expect(bl.every((d) => d.building === 'Birchwood Library' && d.label.startsWith('BL-'))).toBe(true);
  });

  test('fireRated=1 / 0 split the 60 doors (the seed: stair doors, plant rooms and every other service room)', async () => {
    const fire = await doors('?fireRated=1');
    const notFire = await doors('?fireRated=0');
    expect(fire).toHaveLength(12);
    expect(fire.every((d) => d.fireRated)).toBe(true);
    expect(notFire.every((d) => !d.fireRated)).toBe(true);
    expect(fire.length + notFire.length).toBe(60);
    expect((await doors('?fireRated=1&building=Aster%20Hall')).map((d) => d.label)).toEqual(['AH-106', 'AH-212', 'AH-PLANT']);
  });

  test('q= matches label, room or building, case-insensitive (the seed: labels, rooms and buildings)', async () => {
    expect((await doors('?q=plant')).map((d) => d.label).sort()).toEqual(['AH-PLANT', 'BL-PLANT', 'CW-PLANT']);
    expect((await doors('?q=bl-10')).map((d) => d.label)).toEqual(['BL-101', 'BL-102', 'BL-103', 'BL-104', 'BL-105', 'BL-106']);
    expect(await doors('?q=cinder')).toHaveLength(24);
  });

  test('q= treats % and _ as plain characters, not wildcards (common practice: escape LIKE patterns)', async () => {
    expect(await doors('?q=%25')).toHaveLength(0);
    expect(await doors('?q=_')).toHaveLength(0);
  });

  test('a bad filter is a 400 naming it; an unknown filter is refused (A7)', async () => {
    const bad = await h.call('GET', '/api/doors?fireRated=yes', { token: lead });
    expect(bad.status).toBe(400);
    expect(fieldsOf(bad)).toEqual(['fireRated']);
    const unknown = await h.call('GET', '/api/doors?colour=red', { token: lead });
    expect(unknown.status).toBe(400);
    expect(unknown.json.error.message).toMatch(/remove "colour"/);
  });

  test('a technician may not list doors: 403 (A-3, ASVS 5 V8)', async () => {
    expect((await h.call('GET', '/api/doors', { token: await h.tokenFor('technician') })).status).toBe(403);
  });
});

describe('GET /api/doors/:id', () => {
  test('one door with its key symbol; a demo door under AA carries AA1', async () => {
    const d = await doorByLabel('AH-101');
    const res = await h.call('GET', `/api/doors/${d.id}`, { token: lead });
    expect(res.status).toBe(200);
    expect(res.json.door).toMatchObject({ id: d.id, label: 'AH-101', building: 'Aster Hall', site: 'Quillon Hill College', room: '101', floor: '1', fireRated: false, keySymbol: 'AA1' });
  });

  test('an unknown id is a 404, a malformed id a 400 naming it (A7)', async () => {
    const missing = await h.call('GET', '/api/doors/00000000-0000-4000-8000-000000000000', { token: lead });
    expect(missing.status).toBe(404);
    expect(missing.json.error.code).toBe('not-found');
    const malformed = await h.call('GET', '/api/doors/not-a-uuid', { token: lead });
    expect(malformed.status).toBe(400);
    expect(malformed.json.error.message).toMatch(/door id/);
  });
});

describe('POST /api/doors and PATCH /api/doors/:id', () => {
  const newDoor = { site: 'Quillon Hill College', building: 'Aster Hall', floor: '4', room: '401', label: 'AH-401', fireRated: true, notes: 'Roof access.' };

  test('an admin creates a door: 201 with the stored door, audited (RFC 9110 15.3.2; A-3 admin may write)', async () => {
    const before = await countRows(h.db, 'doors');
    const res = await h.call('POST', '/api/doors', { token: admin, body: newDoor });
    expect(res.status).toBe(201);
    expect(res.json.door).toMatchObject({ ...newDoor, keyId: null, currentCoreTag: null });
    expect(res.json.door.id).toMatch(/^[0-9a-f-]{36}$/);
    expect(await countRows(h.db, 'doors')).toEqual({ doors: before.doors! + 1 });
    expect(await h.db('audit_events').where({ action: 'door.created', target_id: res.json.door.id }).count({ n: '*' }).first()).toEqual({ n: 1 });
  });

  test('a supervisor may not create a door: 403, nothing written (A-3, ASVS 5 V8)', async () => {
    const before = await countRows(h.db, 'doors', 'audit_events');
    const res = await h.call('POST', '/api/doors', { token: lead, body: { ...newDoor, label: 'AH-402' } });
    expect(res.status).toBe(403);
    expect(res.json.error.code).toBe('forbidden');
    expect(await countRows(h.db, 'doors', 'audit_events')).toEqual(before);
  });

  test('a label used already, in any case, is a 409 naming label; nothing written (common practice: unique labels)', async () => {
    const before = await countRows(h.db, 'doors', 'audit_events');
    const res = await h.call('POST', '/api/doors', { token: admin, body: { ...newDoor, label: 'ah-101' } });
    expect(res.status).toBe(409);
    expect(res.json.error.code).toBe('conflict');
    expect(fieldsOf(res)).toEqual(['label']);
    expect(await countRows(h.db, 'doors', 'audit_events')).toEqual(before);
  });

  test('bad input is a 400 naming each field; nothing written (A7)', async () => {
    const before = await countRows(h.db, 'doors', 'audit_events');
    const res = await h.call('POST', '/api/doors', { token: admin, body: { site: 'Quillon Hill College', building: '', label: 'has a ! mark', fireRated: 'yes' } });
    expect(res.status).toBe(400);
    expect(res.json.error.code).toBe('validation');
    expect(fieldsOf(res)).toEqual(expect.arrayContaining(['building', 'label', 'fireRated']));
    expect(res.json.error.details.find((d: { field: string }) => d.field === 'building').message).toMatch(/enter the building/);
    expect(await countRows(h.db, 'doors', 'audit_events')).toEqual(before);
  });

  test.each([['id', '00000000-0000-4000-8000-000000000001'], ['createdAt', '2026-01-01T00:00:00Z']])('an extra field "%s" is a 400; nothing written (A5, ASVS 5 8.2.3)', async (field, value) => {
    const before = await countRows(h.db, 'doors', 'audit_events');
    const res = await h.call('POST', '/api/doors', { token: admin, body: { ...newDoor, label: 'AH-403', [field]: value } });
    expect(res.status).toBe(400);
    expect(res.json.error.message).toMatch(new RegExp(`remove "${field}"`));
    expect(await countRows(h.db, 'doors', 'audit_events')).toEqual(before);
  });

  test('an unknown key for the door is a 400 naming keyId (A7)', async () => {
    const before = await countRows(h.db, 'doors');
    const res = await h.call('POST', '/api/doors', { token: admin, body: { ...newDoor, label: 'AH-404', keyId: '00000000-0000-4000-8000-000000000002' } });
    expect(res.status).toBe(400);
    expect(fieldsOf(res)).toEqual(['keyId']);
    expect(await countRows(h.db, 'doors')).toEqual(before);
  });

  test('an admin updates a door: only the fields sent change (RFC 5789 PATCH: a partial update)', async () => {
    const d = await doorByLabel('AH-102');
    const res = await h.call('PATCH', `/api/doors/${d.id}`, { token: admin, body: { room: '102A', notes: 'Renumbered after the refit.' } });
    expect(res.status).toBe(200);
    expect(res.json.door).toMatchObject({ id: d.id, label: 'AH-102', room: '102A', notes: 'Renumbered after the refit.', building: 'Aster Hall', keyId: d.keyId });
    expect((await h.call('GET', `/api/doors/${d.id}`, { token: lead })).json.door.room).toBe('102A');
  });

  test('renaming a door to a label in use is a 409; the door is unchanged (RFC 9110 15.5.10 409 Conflict)', async () => {
    const d = await doorByLabel('AH-103');
    const res = await h.call('PATCH', `/api/doors/${d.id}`, { token: admin, body: { label: 'AH-104' } });
    expect(res.status).toBe(409);
    expect(fieldsOf(res)).toEqual(['label']);
    expect((await h.call('GET', `/api/doors/${d.id}`, { token: lead })).json.door.label).toBe('AH-103');
  });

  test('an extra field in an update is a 400 and the door is unchanged (A5, ASVS 5 8.2.3)', async () => {
    const d = await doorByLabel('AH-105');
    const res = await h.call('PATCH', `/api/doors/${d.id}`, { token: admin, body: { room: 'changed', id: '00000000-0000-4000-8000-000000000003' } });
    expect(res.status).toBe(400);
    expect(res.json.error.message).toMatch(/remove "id"/);
    expect((await h.call('GET', `/api/doors/${d.id}`, { token: lead })).json.door.room).toBe('105');
  });

  test('a supervisor may not update a door: 403 (A-3)', async () => {
    const d = await doorByLabel('AH-105');
    expect((await h.call('PATCH', `/api/doors/${d.id}`, { token: lead, body: { room: 'x' } })).status).toBe(403);
  });

  describe('a key from another key system', () => {
    let otherKeyId: string;
    test('setup: a second key system with one key (invented data)', async () => {
      const sys = await h.call('POST', '/api/key-systems', { token: admin, body: { name: 'Doors Test Annex (invented)', profileId: 'sfic-7', control: '1357135' } });
      expect(sys.status).toBe(201);
      const key = await h.call('POST', `/api/key-systems/${sys.json.keySystem.id}/keys`, { token: admin, body: { symbol: 'X', level: 'master', bitting: '2468024' } });
      expect(key.status).toBe(201);
      otherKeyId = key.json.ids[0];
    });

    test('on create, with the door in the demo system: 400 naming keyId, nothing written (A7; key control: a door takes a key of its own system)', async () => {
      const demoSystem = (await h.db('key_systems').where({ name: 'Quillon Hill College' }).first('id')).id;
      const before = await countRows(h.db, 'doors');
      const res = await h.call('POST', '/api/doors', { token: admin, body: { ...newDoor, label: 'AH-405', keySystemId: demoSystem, keyId: otherKeyId } });
      expect(res.status).toBe(400);
      expect(fieldsOf(res)).toEqual(['keyId']);
      expect(await countRows(h.db, 'doors')).toEqual(before);
    });
    test('on update of a demo door with only keyId: 400 naming keyId, the door keeps its key (A7; key control)', async () => {
      const d = await doorByLabel('AH-106');
      const res = await h.call('PATCH', `/api/doors/${d.id}`, { token: admin, body: { keyId: otherKeyId } });
      expect(res.status).toBe(400);
      expect((await h.db('doors').where({ id: d.id }).first('key_id')).key_id).toBe(d.keyId);
    });
  });

  test('updating an unknown door is a 404 (RFC 9110 15.5.5)', async () => {
    expect((await h.call('PATCH', '/api/doors/00000000-0000-4000-8000-000000000000', { token: admin, body: { room: 'x' } })).status).toBe(404);
  });
});

describe('POST /api/doors/import (CSV, RFC 4180)', () => {
  const header = 'site,building,floor,room,label,fire_rated,key_system,key_symbol';
  const good = [
    'Quillon Hill College,Aster Hall,4,410,AH-410,yes,Quillon Hill College,AA1',
    'Quillon Hill College,Aster Hall,4,411,AH-411,,,',
    '"Quillon Hill College","Aster Hall","4","412, east","AH-412","no","",""',
  ];

  test('a preview with per-row errors: 422, row numbers as a spreadsheet shows them (header is row 1), nothing saved (RFC 4180; RFC 9110 15.5.21 422; common practice: all-or-nothing imports)', async () => {
    const text = [
      header,
      good[0], // row 2: fine
      'Quillon Hill College,Aster Hall,4,420,has a ! mark,,,', // row 3: bad label
      'Quillon Hill College,Aster Hall,1,101,AH-101,,,', // row 4: label exists
      'Quillon Hill College,,4,421,AH-421,,,', // row 5: no building
      'Quillon Hill College,Aster Hall,4,422,AH-422,,Nowhere College,', // row 6: unknown key system
      'Quillon Hill College,Aster Hall,4,423,AH-410,,,', // row 7: same label as row 2
    ].join('\n');
    const before = await countRows(h.db, 'doors', 'audit_events');
    const res = await upload(text, true);
    expect(res.status).toBe(422);
    expect(res.json).toMatchObject({ rows: 6, committed: false, created: 0 });
    const errs = res.json.errors as { row: number; column: string; message: string }[];
    expect(errs).toEqual(
      expect.arrayContaining([
        expect.objectContaining({ row: 3, column: 'label' }),
        expect.objectContaining({ row: 4, column: 'label', message: expect.stringMatching(/exists already/) }),
        expect.objectContaining({ row: 5, column: 'building', message: expect.stringMatching(/enter the building/) }),
        expect.objectContaining({ row: 6, column: 'key_system', message: expect.stringMatching(/Nowhere College/) }),
        expect.objectContaining({ row: 7, column: 'label', message: expect.stringMatching(/more than once \(first on row 2\)/) }),
      ]),
    );
    expect(errs.some((e) => e.row === 2)).toBe(false);
    for (const e of errs) expect(e.message.length).toBeGreaterThan(5);
    // all-or-nothing, even with commit=1
    expect(await countRows(h.db, 'doors', 'audit_events')).toEqual(before);
  });
  test('a blank line inside the file does not shift the row numbers a spreadsheet shows (common practice: the row a spreadsheet shows)', async () => {
    const text = [header, good[1], '', 'Quillon Hill College,,4,430,AH-430,,,'].join('\n'); // the bad row is row 4 in a spreadsheet
    const res = await upload(text);
    expect(res.status).toBe(422);
    expect(res.json.errors).toEqual([expect.objectContaining({ row: 4, column: 'building' })]);
  });

  test('malformed CSV (an unbalanced quote, RFC 4180 2.5-2.7): 400 with a clear message, nothing saved (A7)', async () => {
    const before = await countRows(h.db, 'doors');
    const res = await upload(`${header}\n"Quillon Hill College,Aster Hall,4,440,AH-440,,,\n`, true);
    expect(res.status).toBe(400);
    expect(res.json.error.code).toBe('validation');
    expect(res.json.error.message).toMatch(/not readable CSV/);
    expect(res.json.error.message).toMatch(/quote/i);
    expect(res.text).not.toMatch(/node_modules|\bat .*\.js/);
    expect(await countRows(h.db, 'doors')).toEqual(before);
  });

  test('a missing required column: 400 naming it (RFC 4180 2.3 header; A7)', async () => {
    const res = await upload('site,floor,room,label\nQuillon Hill College,4,450,AH-450\n');
    expect(res.status).toBe(400);
    expect(res.json.error.message).toMatch(/lacks the column\(s\) building/);
    expect(fieldsOf(res)).toEqual(['building']);
  });

  test('an unknown column: 400 naming it and listing the expected ones (RFC 4180 2.3 header; A7)', async () => {
    const res = await upload('site,building,label,colour\nQuillon Hill College,Aster Hall,AH-451,red\n');
    expect(res.status).toBe(400);
    expect(res.json.error.message).toMatch(/Unknown column\(s\) colour/);
    expect(res.json.error.message).toMatch(/fire_rated/);
    expect(fieldsOf(res)).toEqual(['colour']);
  });

  test('no file attached: 400 naming "file" (A7; RFC 7578 multipart/form-data)', async () => {
    const res = await h.call('POST', '/api/doors/import', { token: admin, raw: new FormData() });
    expect(res.status).toBe(400);
    expect(fieldsOf(res)).toEqual(['file']);
  });

  test('a supervisor may not import: 403 (A-3)', async () => {
    const res = await h.call('POST', '/api/doors/import', { token: lead, raw: csvForm([header, ...good].join('\n')) });
    expect(res.status).toBe(403);
  });

  test('the fixed file: preview 200 and nothing saved, then commit=1 creates every row, audited (RFC 4180 with CRLF and a BOM, as spreadsheets save it)', async () => {
    const text = `\uFEFF${[header, ...good].join('\r\n')}\r\n`; // a spreadsheet's UTF-8 export: BOM, CRLF
    const before = await countRows(h.db, 'doors');
    const preview = await upload(text);
    expect(preview.status).toBe(200);
    expect(preview.json).toMatchObject({ rows: 3, errors: [], committed: false, created: 0 });
    expect(preview.json.preview.map((p: { label: string }) => p.label)).toEqual(['AH-410', 'AH-411', 'AH-412']);
    expect(preview.json.preview[2].room).toBe('412, east'); // RFC 4180: a quoted field keeps its comma
    expect(await countRows(h.db, 'doors')).toEqual(before);

    const commit = await upload(text, true);
    expect(commit.status).toBe(200);
    expect(commit.json).toMatchObject({ rows: 3, errors: [], committed: true, created: 3 });
    expect(await countRows(h.db, 'doors')).toEqual({ doors: before.doors! + 3 });
    const made = await doors('?q=AH-41');
    expect(made.map((d) => [d.label, d.fireRated, d.keySymbol])).toEqual([
      ['AH-410', true, 'AA1'],
      ['AH-411', false, null],
      ['AH-412', false, null],
    ]);
    expect(await h.db('audit_events').where({ action: 'doors.imported' }).count({ n: '*' }).first()).toEqual({ n: 1 });

    // the same file again: every label now exists, nothing more is saved
    const again = await upload(text, true);
    expect(again.status).toBe(422);
    expect(again.json.errors).toHaveLength(3);
    expect(await countRows(h.db, 'doors')).toEqual({ doors: before.doors! + 3 });
  });
});

describe('GET /api/doors/:id/history', () => {
  test('a Birchwood Library door of the finished work order: its install, with who built and who installed the core (the seed: bench2@ built and installed 14 BL cores)', async () => {
    const d = await doorByLabel('BL-101');
    expect(d.currentCoreTag).toMatch(/^CR-\d+$/);
    const res = await h.call('GET', `/api/doors/${d.id}/history`, { token: lead });
    expect(res.status).toBe(200);
    expect(res.json.history).toHaveLength(1);
    const [entry] = res.json.history;
    expect(entry).toMatchObject({ coreTag: d.currentCoreTag, coreState: 'installed', installedBy: 'Jordan Bench (demo)', builtBy: 'Jordan Bench (demo)', removedCoreTag: null });
    expect(new Date(entry.builtAt).getTime()).toBeLessThan(new Date(entry.installedAt).getTime());
    expect(JSON.stringify(res.json)).not.toMatch(/bitting/i);
  });

  test('a door that never had a core: an empty history; an unknown door: 404 (the seed: AH-313 is in no work order; RFC 9110 15.5.5)', async () => {
    const d = await doorByLabel('AH-313');
    expect((await h.call('GET', `/api/doors/${d.id}/history`, { token: lead })).json).toEqual({ history: [] });
    expect((await h.call('GET', '/api/doors/00000000-0000-4000-8000-000000000000/history', { token: lead })).status).toBe(404);
  });

  test('a technician may not read a door history: 403 (A-3)', async () => {
    const d = await doorByLabel('BL-101');
    expect((await h.call('GET', `/api/doors/${d.id}/history`, { token: await h.tokenFor('technician') })).status).toBe(403);
  });
});
