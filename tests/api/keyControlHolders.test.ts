// Key control, people: departments with their authorisers, key holders by hand and from CSV
// (preview, row errors, all-or-nothing), office roles only. Cases A-3 (roles), A5 (mass
// assignment) and A7 (bad input names the field, nothing written) of ../shared/design/reliability.md.
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { countRows, startHarness, type Harness } from './harness';

let h: Harness;
let lead: string;
let admin: string;
let tech: string;
beforeAll(async () => {
  h = await startHarness();
  lead = await h.tokenFor('supervisor');
  admin = await h.tokenFor('admin');
  tech = await h.tokenFor('technician');
});
afterAll(async () => h.close());

const fieldsOf = (res: { json: { error: { details?: { field?: string }[] } } }) => (res.json.error.details ?? []).map((d) => d.field);
function csvForm(text: string): FormData {
  const form = new FormData();
  form.append('file', new Blob([text], { type: 'text/csv' }), 'holders.csv');
  return form;
}

describe('departments and their authorisers', () => {
  test('a supervisor adds a department with authorisers; the list shows them (common practice: a named authoriser per department)', async () => {
    const res = await h.call('POST', '/api/departments', { token: lead, body: { name: 'Chemistry', authorisers: [{ name: 'Kim Head', email: 'Kim.Head@example.test' }] } });
    expect(res.status).toBe(201);
    expect(res.json.department).toMatchObject({ name: 'Chemistry', holderCount: 0, authorisers: [{ name: 'Kim Head', email: 'kim.head@example.test' }] });
    const list = await h.call('GET', '/api/departments', { token: admin });
    expect(list.json.departments.map((d: { name: string }) => d.name)).toContain('Chemistry');
  });
  test('a second department of the same name (any case) is a conflict; a bad e-mail is a 400 naming the field; nothing stored', async () => {
    const before = await countRows(h.db, 'departments', 'department_authorisers');
    expect((await h.call('POST', '/api/departments', { token: lead, body: { name: 'chemistry' } })).status).toBe(409);
    const bad = await h.call('POST', '/api/departments', { token: lead, body: { name: 'Physics', authorisers: [{ name: 'X', email: 'not-mail' }] } });
    expect(bad.status).toBe(400);
    expect(fieldsOf(bad)).toContain('authorisers.0.email');
    expect(await countRows(h.db, 'departments', 'department_authorisers')).toEqual(before);
  });
});

describe('POST /api/holders and GET /api/holders?q=', () => {
  test('201 { holder }: by department name (a new name adds the department), e-mail and badge id optional', async () => {
    const res = await h.call('POST', '/api/holders', { token: lead, body: { name: 'Pat Example', department: 'Chemistry', email: 'pat@example.test', badgeId: 'B-100' } });
    expect(res.status).toBe(201);
    expect(res.json.holder).toMatchObject({ name: 'Pat Example', department: 'Chemistry', email: 'pat@example.test', badgeId: 'B-100', status: 'active', keysOut: 0 });
    const plain = await h.call('POST', '/api/holders', { token: admin, body: { name: 'Lee Sample', department: 'Grounds' } });
    expect(plain.status).toBe(201);
    expect(plain.json.holder).toMatchObject({ department: 'Grounds', email: null, badgeId: null });
    const byId = await h.call('POST', '/api/holders', { token: admin, body: { name: 'Ari Test', department: plain.json.holder.departmentId } });
    expect(byId.json.holder.department).toBe('Grounds');
  });
  test('q= finds by name, e-mail, badge id or department', async () => {
    const find = async (q: string) => ((await h.call('GET', `/api/holders?q=${encodeURIComponent(q)}`, { token: lead })).json.holders as { name: string }[]).map((x) => x.name);
    expect(await find('pat')).toEqual(['Pat Example']);
    expect(await find('B-100')).toEqual(['Pat Example']);
    expect(await find('grounds')).toEqual(['Ari Test', 'Lee Sample']);
    expect(await find('%')).toEqual([]);
  });
  test('bad input is a 400 naming the field with nothing stored; an extra field (status) is refused (A5, A7)', async () => {
    const before = await countRows(h.db, 'key_holders', 'departments');
    for (const [body, field] of [
      [{ department: 'Chemistry' }, 'name'],
      [{ name: 'X', department: '' }, 'department'],
      [{ name: 'X', department: 'Chemistry', email: 'nope' }, 'email'],
      [{ name: 'X\u202Eevil', department: 'Chemistry' }, 'name'],
    ] as const) {
      const res = await h.call('POST', '/api/holders', { token: lead, body });
      expect(res.status, JSON.stringify(body)).toBe(400);
      expect(fieldsOf(res)).toContain(field);
    }
    const extra = await h.call('POST', '/api/holders', { token: lead, body: { name: 'X', department: 'Chemistry', status: 'left' } });
    expect(extra.status).toBe(400);
    expect(extra.json.error.message).toContain('"status"');
    const unknown = await h.call('POST', '/api/holders', { token: lead, body: { name: 'X', department: '00000000-0000-4000-8000-000000000000' } });
    expect(unknown.status).toBe(400);
    expect(fieldsOf(unknown)).toEqual(['department']);
    const twice = await h.call('POST', '/api/holders', { token: lead, body: { name: 'X', department: 'Chemistry', badgeId: 'b-100' } });
    expect(twice.status).toBe(409);
    expect(fieldsOf(twice)).toEqual(['badgeId']);
    expect(await countRows(h.db, 'key_holders', 'departments')).toEqual(before);
  });
  test('office roles only: a technician gets 403, no token 401 (A-3; issue: holders shown only to office roles)', async () => {
    for (const [method, path] of [['GET', '/api/holders'], ['POST', '/api/holders'], ['GET', '/api/departments'], ['POST', '/api/departments'], ['POST', '/api/holders/import']] as const) {
      const body = method === 'POST' ? { name: 'X', department: 'Y' } : undefined;
      expect((await h.call(method, path, { token: tech, body })).status, `${method} ${path}`).toBe(403);
      expect((await h.call(method, path)).status, `${method} ${path}`).toBe(401);
    }
  });
  test('marking a holder leaving is audited and answers with the keys to return', async () => {
    const list = (await h.call('GET', '/api/holders?q=Lee', { token: lead })).json.holders;
    const res = await h.call('PATCH', `/api/holders/${list[0].id}`, { token: lead, body: { status: 'leaving' } });
    expect(res.status).toBe(200);
    expect(res.json.holder.status).toBe('leaving');
    expect(res.json.keysToReturn).toEqual([]);
    expect(await h.db('audit_events').where({ action: 'holder.leaving', target_id: list[0].id }).first('id')).toBeTruthy();
  });
});

describe('POST /api/holders/import: preview, row errors, all-or-nothing (RFC 4180)', () => {
  test('a clean file previews without writing, then commits every row', async () => {
    const csv = 'name,department,email,badge_id\r\n# a comment line\r\nJo One,Library,jo@example.test,L-1\r\nMo Two,Library,,\r\n';
    const before = await countRows(h.db, 'key_holders');
    const preview = await h.call('POST', '/api/holders/import', { token: lead, raw: csvForm(csv) });
    expect(preview.status).toBe(200);
    expect(preview.json).toMatchObject({ rows: 2, errors: [], committed: false, created: 0 });
    expect(preview.json.preview[0]).toEqual({ name: 'Jo One', department: 'Library', email: 'jo@example.test', badgeId: 'L-1' });
    expect(await countRows(h.db, 'key_holders')).toEqual(before);
    const done = await h.call('POST', '/api/holders/import?commit=1', { token: lead, raw: csvForm(csv) });
    expect(done.json).toMatchObject({ committed: true, created: 2 });
    expect((await countRows(h.db, 'key_holders')).key_holders).toBe(before.key_holders! + 2);
  });
  test('one bad row: 422 with the row number and column, nothing written, not even the good rows', async () => {
    const csv = 'name,department,email,badge_id\nGood Row,Library,,L-9\n,Library,,\nBad Mail,Library,nope,\nSame Badge,Library,,l-1\nTwice,Library,,L-9\n';
    const before = await countRows(h.db, 'key_holders', 'departments');
    const res = await h.call('POST', '/api/holders/import?commit=1', { token: lead, raw: csvForm(csv) });
    expect(res.status).toBe(422);
    expect(res.json.committed).toBe(false);
    expect(res.json.errors.map((e: { row: number; column: string }) => `${e.row}:${e.column}`)).toEqual(['3:name', '4:email', '5:badge_id', '6:badge_id']);
    expect(await countRows(h.db, 'key_holders', 'departments')).toEqual(before);
  });
  test('a missing column or unknown column is a 400 naming it', async () => {
    const res = await h.call('POST', '/api/holders/import', { token: lead, raw: csvForm('name,email\nX,x@example.test\n') });
    expect(res.status).toBe(400);
    expect(fieldsOf(res)).toEqual(['department']);
  });
});
