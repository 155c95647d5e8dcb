// Key systems and keys: list and read, create with a control key, keys, progression preview,
// the bitting-list CSV import, the system audit, and bittings at rest. Cases A-3, A5, A7 and A10
// of ../shared/design/reliability.md.
import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { checkKeyPlacement, keyOperates, pinCore, builtInProfiles, type Profile } from '../../shared/keying';
import { countRows, startHarness, type Harness } from './harness';

let h: Harness;
let admin: string;
let lead: string;
let tech: string;
let demoId: string;
/** Every bitting of the demo system (its control key and its 85 keys), from an audited reveal. */
let demoBittings: string[];
let demoKeys: { id: string; symbol: string; level: string; parentId: string | null; bitting: string }[];

// From server/seed/demo.ts: the grand master and the control key of the demo campus.
const SEED_GM = '4628462';
const SEED_CONTROL = '7351735';

beforeAll(async () => {
  h = await startHarness({}, { demo: true });
  [admin, lead, tech] = await Promise.all([h.tokenFor('admin'), h.tokenFor('supervisor'), h.tokenFor('technician')]);
  demoId = (await h.db('key_systems').where({ name: 'Quillon Hill College' }).first('id')).id;
  const control = (await h.call('GET', `/api/key-systems/${demoId}?reveal=1`, { token: admin })).json.keySystem.control as string;
  demoKeys = (await h.call('GET', `/api/key-systems/${demoId}/keys?reveal=1`, { token: admin })).json.keys;
  demoBittings = [control, ...demoKeys.map((k) => k.bitting)];
});
afterAll(async () => h.close());

function csvForm(text: string): FormData {
  const form = new FormData();
  form.append('file', new Blob([text], { type: 'text/csv' }), 'keys.csv');
  return form;
}
const fieldsOf = (res: { json: { error: { details?: { field?: string }[] } } }) => (res.json.error.details ?? []).map((d) => d.field);
/** Every property name anywhere in a JSON value. */
function propertyNames(value: unknown, out = new Set<string>()): Set<string> {
  if (Array.isArray(value)) value.forEach((v) => propertyNames(v, out));
  else if (value && typeof value === 'object') {
    for (const [k, v] of Object.entries(value)) {
      out.add(k);
      propertyNames(v, out);
    }
  }
  return out;
}

describe('the demo bittings used by these tests (control case for A10)', () => {
  test('86 distinct 7-digit bittings: the control key, the grand master, 4 masters and 80 change keys (the seed)', () => {
    expect(demoBittings).toHaveLength(86);
    expect(new Set(demoBittings).size).toBe(86);
    expect(demoBittings.every((b) => /^\d{7}$/.test(b))).toBe(true);
    expect(demoBittings[0]).toBe(SEED_CONTROL);
    expect(demoKeys.find((k) => k.symbol === 'A')).toMatchObject({ level: 'gm', bitting: SEED_GM });
  });
});

describe('the demo seed under the hierarchy rules', () => {
  test('every demo key passes checkKeyPlacement against the rest of the system (keying primer: a key under a master keeps its constant positions, parity, and equals no other key)', () => {
    const control = demoBittings[0]!;
    const system = { control, topMasterId: demoKeys.find((k) => k.symbol === 'A')!.id, keys: demoKeys };
    const sfic7 = builtInProfiles['sfic-7'] as Profile;
    for (const k of demoKeys) expect(checkKeyPlacement(sfic7, system, { id: k.id, bitting: k.bitting, parentId: k.parentId }), k.symbol).toEqual([]);
    // Control case: the same check does refuse a demo change key moved under another master.
    const aa1 = demoKeys.find((k) => k.symbol === 'AA1')!;
    const ab = demoKeys.find((k) => k.symbol === 'AB')!;
    expect(checkKeyPlacement(sfic7, system, { id: aa1.id, bitting: aa1.bitting, parentId: ab.id }).map((p) => p.code)).toContain('placement-master-constant');
  });
});

describe('GET /api/key-systems and /api/key-systems/:id', () => {
  test('a supervisor lists the systems with key and core counts, without the control key (A-3; A10 key control)', async () => {
    const res = await h.call('GET', '/api/key-systems', { token: lead });
    expect(res.status).toBe(200);
    const qhc = res.json.keySystems.find((s: { id: string }) => s.id === demoId);
    // the seed: grand master A, masters AA..AD, 20 change keys each; 14 + 6 + 3 cores in three work orders
    expect(qhc).toMatchObject({ name: 'Quillon Hill College', profileId: 'sfic-7', keyCount: 85, coreCount: 23 });
    expect(propertyNames(res.json).has('control')).toBe(false);
  });

  test('a supervisor reads one system; without reveal there is no bitting field and no bitting anywhere in the answer (A10; ASVS 5 14.2.6 minimal data)', async () => {
    const one = await h.call('GET', `/api/key-systems/${demoId}`, { token: lead });
    expect(one.status).toBe(200);
    expect(one.json.keySystem).toMatchObject({ id: demoId, name: 'Quillon Hill College' });
    const keys = await h.call('GET', `/api/key-systems/${demoId}/keys`, { token: lead });
    expect(keys.status).toBe(200);
    expect(keys.json.keys).toHaveLength(85);
    for (const res of [one, keys]) {
      const names = propertyNames(res.json);
      expect(names.has('bitting')).toBe(false);
      expect(names.has('control')).toBe(false);
      for (const b of demoBittings) expect(res.text).not.toContain(b);
    }
  });

  test('reveal=1 returns the bittings and writes a "bittings.viewed" audit row for the supervisor (A10, key control)', async () => {
    const before = await countRows(h.db, 'audit_events');
    const sys = await h.call('GET', `/api/key-systems/${demoId}?reveal=1`, { token: lead });
    expect(sys.status).toBe(200);
    expect(sys.json.keySystem.control).toBe(SEED_CONTROL);
    const keys = await h.call('GET', `/api/key-systems/${demoId}/keys?reveal=1`, { token: lead });
    expect(keys.json.keys.find((k: { symbol: string }) => k.symbol === 'A').bitting).toBe(SEED_GM);
    expect(keys.json.keys.every((k: { bitting?: string }) => /^\d{7}$/.test(k.bitting ?? ''))).toBe(true);
    expect(await countRows(h.db, 'audit_events')).toEqual({ audit_events: before.audit_events! + 2 });
    const rows = await h.db('audit_events').where({ action: 'bittings.viewed', actor_email: 'lead@demo.corewright.test', target_id: demoId }).orderBy('id').select('target_type', 'details');
    expect(rows.map((r) => [r.target_type, r.details.what])).toEqual([
      ['key-system', 'control'],
      ['key-system', 'keys'],
    ]);
  });

  test('reveal takes only 0 or 1: reveal=yes is a 400 and no audit row (A7)', async () => {
    const before = await countRows(h.db, 'audit_events');
    const res = await h.call('GET', `/api/key-systems/${demoId}?reveal=yes`, { token: lead });
    expect(res.status).toBe(400);
    expect(fieldsOf(res)).toEqual(['reveal']);
    expect(await countRows(h.db, 'audit_events')).toEqual(before);
  });

  test.each([
    ['GET', '/api/key-systems'],
    ['GET', '/api/key-systems/{id}'],
    ['GET', '/api/key-systems/{id}?reveal=1'],
    ['GET', '/api/key-systems/{id}/keys?reveal=1'],
    ['GET', '/api/key-systems/{id}/system-audit'],
  ])('a technician gets 403 on %s %s, with no bitting and no audit of a view (A-3, ASVS 5 V8)', async (method, path) => {
    const res = await h.call(method, path.replace('{id}', demoId), { token: tech });
    expect(res.status).toBe(403);
    for (const b of demoBittings) expect(res.text).not.toContain(b);
    expect(await h.db('audit_events').where({ action: 'bittings.viewed', actor_email: 'tech@demo.corewright.test' }).first('id')).toBeUndefined();
  });

  test('an unknown system is a 404, a malformed id a 400 (RFC 9110 15.5.5; A7)', async () => {
    expect((await h.call('GET', `/api/key-systems/${randomUUID()}`, { token: lead })).status).toBe(404);
    expect((await h.call('GET', '/api/key-systems/nope', { token: lead })).status).toBe(400);
  });
});

describe('POST /api/key-systems: the control key is checked against the profile', () => {
  const shallow = {
    id: 'test-seven-shallow',
    label: 'Test 7-pin, depths 0 to 7, stack 23',
    chambers: 7,
    minDepth: 0,
    maxDepth: 7,
    stackUnits: 23,
    sleeveUnits: 10,
    minWaferUnits: 2,
    step: 2,
    maxAdjacentCut: 7,
    bottomPins: [0, 1, 2, 3, 4, 5, 6, 7],
    wafers: [2, 3, 4, 5, 6, 7, 8, 9, 10],
    topPins: [3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13],
    chamberOneAt: 'back',
  };

  test('a custom profile with depths 0..7 (for the depth case below; keying primer: a profile sets the depths)', async () => {
    const res = await h.call('POST', '/api/profiles', { token: admin, body: shallow });
    expect(res.status).toBe(201);
    expect(res.json.profile).toMatchObject({ id: shallow.id, maxDepth: 7 });
  });

  test.each([
    ['too short for 7 chambers', 'sfic-7', '135713', /has 6 cuts.*takes 7/],
    ['a letter in it', 'sfic-7', '13571a5', /5 to 8 digits/],
    ['a depth past the profile', 'test-seven-shallow', '1357193', /Chamber 6: depth 9 is outside/],
  ])('a control key %s: 400 naming control, nothing written (A7)', async (_name, profileId, control, message) => {
    const before = await countRows(h.db, 'key_systems', 'keys', 'audit_events');
    const res = await h.call('POST', '/api/key-systems', { token: admin, body: { name: `Rejected ${control}`, profileId, control } });
    expect(res.status).toBe(400);
    expect(res.json.error.code).toBe('validation');
    expect(fieldsOf(res)).toEqual(['control']);
    expect(res.json.error.details[0].message).toMatch(message);
    expect(await countRows(h.db, 'key_systems', 'keys', 'audit_events')).toEqual(before);
  });

  test('an extra field (A5) and a supervisor (A-3) are refused; nothing written', async () => {
    const before = await countRows(h.db, 'key_systems', 'audit_events');
    const extra = await h.call('POST', '/api/key-systems', { token: admin, body: { name: 'Extra', profileId: 'sfic-7', control: '1357135', id: randomUUID() } });
    expect(extra.status).toBe(400);
    expect(extra.json.error.message).toMatch(/remove "id"/);
    const sup = await h.call('POST', '/api/key-systems', { token: lead, body: { name: 'By a supervisor', profileId: 'sfic-7', control: '1357135' } });
    expect(sup.status).toBe(403);
    expect(await countRows(h.db, 'key_systems', 'audit_events')).toEqual(before);
  });

  test('a name used already is a 409 naming name (RFC 9110 15.5.10)', async () => {
    const res = await h.call('POST', '/api/key-systems', { token: admin, body: { name: 'Quillon Hill College', profileId: 'sfic-7', control: '1357135' } });
    expect(res.status).toBe(409);
    expect(fieldsOf(res)).toEqual(['name']);
  });
});

describe('a new key system: keys added, changed, imported', () => {
  const CONTROL = '1357135';
  let sysId: string;
  let masterId: string;

  test('an admin creates a key system: 201, the control key sealed, not echoed (A10; ASVS 5 V11 encryption at rest)', async () => {
    const res = await h.call('POST', '/api/key-systems', { token: admin, body: { name: 'Test Annex (invented)', profileId: 'sfic-7', control: CONTROL, notes: 'Made by the API tests.' } });
    expect(res.status).toBe(201);
    expect(res.json.keySystem).toMatchObject({ name: 'Test Annex (invented)', keyCount: 0, coreCount: 0 });
    expect(res.text).not.toContain(CONTROL);
    sysId = res.json.keySystem.id;
    const row = await h.db('key_systems').where({ id: sysId }).first('control_enc');
    expect(row.control_enc).toMatch(/^v1\./);
    expect(row.control_enc).not.toContain(CONTROL);
  });

  test('keys added one at a time: 201 with the new id (RFC 9110 15.3.2)', async () => {
    const m = await h.call('POST', `/api/key-systems/${sysId}/keys`, { token: admin, body: { symbol: 'k', level: 'master', bitting: '2468024' } });
    expect(m.status).toBe(201);
    expect(m.json.ids).toHaveLength(1);
    masterId = m.json.ids[0];
    const c = await h.call('POST', `/api/key-systems/${sysId}/keys`, { token: admin, body: { symbol: 'K1', level: 'change', parentId: masterId, bitting: '2468046' } });
    expect(c.status).toBe(201);
    const keys = (await h.call('GET', `/api/key-systems/${sysId}/keys`, { token: lead })).json.keys;
    expect(keys.map((k: { symbol: string; parentId: string | null }) => [k.symbol, k.parentId])).toEqual([
      ['K', null],
      ['K1', masterId],
    ]);
  });

  test('a symbol used already (any case) is a 409 naming symbol; nothing written (keying primer: one key per symbol; RFC 9110 15.5.10)', async () => {
    const before = await countRows(h.db, 'keys', 'audit_events');
    const res = await h.call('POST', `/api/key-systems/${sysId}/keys`, { token: admin, body: { symbol: 'k1', level: 'change', parentId: masterId, bitting: '2468068' } });
    expect(res.status).toBe(409);
    expect(fieldsOf(res)).toEqual(['symbol']);
    expect(await countRows(h.db, 'keys', 'audit_events')).toEqual(before);
  });

  test("an operating key with the control key's bitting is a 400 (keying primer, key control: the control key only releases cores)", async () => {
    const before = await countRows(h.db, 'keys');
    const res = await h.call('POST', `/api/key-systems/${sysId}/keys`, { token: admin, body: { symbol: 'K9', level: 'change', parentId: masterId, bitting: CONTROL } });
    expect(res.status).toBe(400);
    expect(fieldsOf(res)).toEqual(['bitting']);
    expect(await countRows(h.db, 'keys')).toEqual(before);
  });

  test('a key is changed with PATCH; a symbol in use is a 409; an extra field a 400 (A5)', async () => {
    const keys = (await h.call('GET', `/api/key-systems/${sysId}/keys`, { token: lead })).json.keys;
    const k1 = keys.find((k: { symbol: string }) => k.symbol === 'K1');
    const ok = await h.call('PATCH', `/api/key-systems/${sysId}/keys/${k1.id}`, { token: admin, body: { status: 'lost', notes: 'Reported lost at the front desk.' } });
    expect(ok.status).toBe(200);
    const after = (await h.call('GET', `/api/key-systems/${sysId}/keys`, { token: lead })).json.keys.find((k: { id: string }) => k.id === k1.id);
    expect(after).toMatchObject({ status: 'lost', notes: 'Reported lost at the front desk.' });

    const clash = await h.call('PATCH', `/api/key-systems/${sysId}/keys/${k1.id}`, { token: admin, body: { symbol: 'K' } });
    expect(clash.status).toBe(409);
    expect(fieldsOf(clash)).toEqual(['symbol']);
    const extra = await h.call('PATCH', `/api/key-systems/${sysId}/keys/${k1.id}`, { token: admin, body: { level: 'gm' } });
    expect(extra.status).toBe(400);
    expect(extra.json.error.message).toMatch(/remove "level"/);
    expect((await h.db('keys').where({ id: k1.id }).first('symbol', 'level'))).toEqual({ symbol: 'K1', level: 'change' });
    expect((await h.call('PATCH', `/api/key-systems/${sysId}/keys/${k1.id}`, { token: lead, body: { status: 'active' } })).status).toBe(403);
  });

  const header = 'symbol,level,parent,bitting';
  const fixed = [header, 'T,master,,2468002', 'T1,cr,T,2468020', 'T2,change,T,2468042', 'T3,change,K,2468064'].join('\n');

  test('a bitting-list CSV with bad rows: 422 with row, column and message; no key added (RFC 4180; common practice: all-or-nothing imports)', async () => {
    const text = [
      header,
      'T,master,,2468002', // row 2: fine
      'T1,cr,T,2468020', // row 3: fine ("cr" is a change key)
      'T2,change,T,246804', // row 4: 6 cuts for a 7-pin profile
      'T3,change,ZZ,2468064', // row 5: no key ZZ
      'T4,boss,T,2468066', // row 6: not a level
    ].join('\n');
    const before = await countRows(h.db, 'keys', 'audit_events');
    const res = await h.call('POST', `/api/key-systems/${sysId}/import?commit=1`, { token: admin, raw: csvForm(text) });
    expect(res.status).toBe(422);
    expect(res.json).toMatchObject({ rows: 5, committed: false, created: 0 });
    expect(res.json.errors).toEqual([
      { row: 4, column: 'bitting', message: expect.stringMatching(/has 6 cuts/) },
      { row: 5, column: 'parent', message: 'no key ZZ in the file or the key system' },
      { row: 6, column: 'level', message: 'level is ggm, gm, master or change' },
    ]);
    expect(await countRows(h.db, 'keys', 'audit_events')).toEqual(before);
  });

  test('a key already in the system, or twice in the file, is an error on its row (keying primer: one key per symbol)', async () => {
    const res = await h.call('POST', `/api/key-systems/${sysId}/import`, { token: admin, raw: csvForm([header, 'K,master,,2468088', 'T5,change,K,2468086', 't5,change,K,2468084'].join('\n')) });
    expect(res.status).toBe(422);
    expect(res.json.errors).toEqual([
      expect.objectContaining({ row: 2, column: 'symbol', message: 'K is in the key system already' }),
      expect.objectContaining({ row: 4, column: 'symbol', message: 'T5 appears more than once in the file (first on row 3)' }),
    ]);
  });
  test('a parent that is a change key is an error on its row in the preview (keying primer: change keys hang under masters)', async () => {
    const res = await h.call('POST', `/api/key-systems/${sysId}/import`, { token: admin, raw: csvForm([header, 'T9,change,K1,2468080'].join('\n')) });
    expect(res.status).toBe(422);
    expect(res.json.errors).toEqual([expect.objectContaining({ row: 2, column: 'parent' })]);
  });

  test('a parent that is a change key: the commit writes nothing (common practice: all-or-nothing imports)', async () => {
    const before = await countRows(h.db, 'keys', 'audit_events');
    const res = await h.call('POST', `/api/key-systems/${sysId}/import?commit=1`, { token: admin, raw: csvForm([header, 'T8,master,,2468082', 'T9,change,K1,2468080'].join('\n')) });
    expect(res.status).toBeGreaterThanOrEqual(400);
    expect(res.status).toBeLessThan(500);
    expect(await countRows(h.db, 'keys', 'audit_events')).toEqual(before);
  });

  test('the fixed file: the preview saves nothing, commit=1 adds every key under the right parent, audited (common practice: preview, then commit)', async () => {
    const before = await countRows(h.db, 'keys');
    const preview = await h.call('POST', `/api/key-systems/${sysId}/import`, { token: admin, raw: csvForm(fixed) });
    expect(preview.status).toBe(200);
    expect(preview.json).toMatchObject({ rows: 4, errors: [], committed: false, created: 0 });
    expect(preview.text).not.toMatch(/2468002|2468020/); // the preview lists symbols, not bittings
    expect(await countRows(h.db, 'keys')).toEqual(before);

    const commit = await h.call('POST', `/api/key-systems/${sysId}/import?commit=1`, { token: admin, raw: csvForm(fixed) });
    expect(commit.status).toBe(200);
    expect(commit.json).toMatchObject({ committed: true, created: 4 });
    expect(await countRows(h.db, 'keys')).toEqual({ keys: before.keys! + 4 });
    const keys = (await h.call('GET', `/api/key-systems/${sysId}/keys?reveal=1`, { token: admin })).json.keys as { id: string; symbol: string; level: string; parentId: string | null; bitting: string }[];
    const bySymbol = new Map(keys.map((k) => [k.symbol, k]));
    expect(bySymbol.get('T')).toMatchObject({ level: 'master', parentId: null, bitting: '2468002' });
    expect(bySymbol.get('T1')).toMatchObject({ level: 'change', parentId: bySymbol.get('T')!.id, bitting: '2468020' });
    expect(bySymbol.get('T3')).toMatchObject({ parentId: masterId });
    expect(await h.db('audit_events').where({ action: 'keys.imported', target_id: sysId }).count({ n: '*' }).first()).toEqual({ n: 1 });
  });

  test('a supervisor may not import keys: 403, nothing written (A-3)', async () => {
    const before = await countRows(h.db, 'keys');
    expect((await h.call('POST', `/api/key-systems/${sysId}/import?commit=1`, { token: lead, raw: csvForm(fixed) })).status).toBe(403);
    expect(await countRows(h.db, 'keys')).toEqual(before);
  });
});

describe('the hierarchy rules on hand entry and import (keying primer: "A key under a master keeps its master’s constant positions")', () => {
  // A system of our own: top master M (all even), master M1 progressed in chamber 1 under it.
  const CONTROL = '3571357';
  let sysId: string;
  let topId: string;
  let m1Id: string;
  const add = (body: object) => h.call('POST', `/api/key-systems/${sysId}/keys`, { token: admin, body });

  beforeAll(async () => {
    sysId = (await h.call('POST', '/api/key-systems', { token: admin, body: { name: 'Hierarchy Hall (invented)', profileId: 'sfic-7', control: CONTROL } })).json.keySystem.id;
    topId = (await add({ symbol: 'M', level: 'gm', bitting: '4646464' })).json.ids[0];
    m1Id = (await add({ symbol: 'M1', level: 'master', parentId: topId, bitting: '2646464' })).json.ids[0];
    expect((await add({ symbol: 'M1-1', level: 'change', parentId: m1Id, bitting: '2646420' })).status).toBe(201);
  });

  test.each([
    ['identical to its master', '2646464', /same as its master M1/, undefined],
    ['identical to a sibling', '2646420', /same as M1-1, a key under the same master/, undefined],
    ['changing chamber 1, which its master holds constant', '0646420', /^Chamber 1: master M1 holds this position constant/, 1],
    ['with an odd cut under the even top master', '2646421', /^Chamber 7: the cut breaks top master M’s parity/, 7],
    ['cut to the control key', CONTROL, /the control key’s/, undefined],
  ])('a change key %s is a 400 naming bitting and the rule; nothing written (A7)', async (_name, bitting, message, chamber) => {
    const before = await countRows(h.db, 'keys', 'audit_events');
    const res = await add({ symbol: 'M1-9', level: 'change', parentId: m1Id, bitting });
    expect(res.status).toBe(400);
    expect(res.json.error.message).toMatch(message);
    if (chamber) expect(res.json.error.message).toContain(`Chamber ${chamber}`);
    expect(fieldsOf(res)[0]).toBe('bitting');
    expect(await countRows(h.db, 'keys', 'audit_events')).toEqual(before);
  });

  test('a batch is all or nothing: a bad second key leaves the first unwritten, the message names the row (A7)', async () => {
    const before = await countRows(h.db, 'keys');
    const res = await h.call('POST', `/api/key-systems/${sysId}/keys`, { token: admin, body: { keys: [
      { symbol: 'M1-2', level: 'change', parentId: m1Id, bitting: '2646440' },
      { symbol: 'M1-3', level: 'change', parentId: m1Id, bitting: '2646440' },
    ] } });
    expect(res.status).toBe(400);
    expect(res.json.error.message).toMatch(/^row 2: The bitting is the same as M1-2/);
    expect(fieldsOf(res)).toEqual(['1.bitting']);
    expect(await countRows(h.db, 'keys')).toEqual(before);
  });

  test('changing a master’s bitting so that its key no longer keeps the master’s cuts is refused, naming that key (A7)', async () => {
    const res = await h.call('PATCH', `/api/key-systems/${sysId}/keys/${m1Id}`, { token: admin, body: { bitting: '6646464' } });
    expect(res.status).toBe(400);
    expect(res.json.error.message).toMatch(/^Key M1-1 hangs under this key and would break the hierarchy: Chamber 1:/);
    expect(fieldsOf(res)).toEqual(['bitting']);
  });

  test('moving a key under a master whose constant positions it does not keep is refused, naming parentId (A7)', async () => {
    const m2 = (await add({ symbol: 'M2', level: 'master', parentId: topId, bitting: '4446464' })).json.ids[0];
    const keys = (await h.call('GET', `/api/key-systems/${sysId}/keys`, { token: admin })).json.keys as { id: string; symbol: string }[];
    const child = keys.find((k) => k.symbol === 'M1-1')!;
    const res = await h.call('PATCH', `/api/key-systems/${sysId}/keys/${child.id}`, { token: admin, body: { parentId: m2 } });
    expect(res.status).toBe(400);
    expect(res.json.error.message).toMatch(/^Chamber 2: master M2 holds this position constant/);
    expect(fieldsOf(res)).toContain('parentId');
    expect((await h.db('keys').where({ id: child.id }).first('parent_id')).parent_id).toBe(m1Id);
  });

  test('a CSV import with rows that break the hierarchy: 422, each row named with column and rule; nothing added (common practice: all-or-nothing imports)', async () => {
    const before = await countRows(h.db, 'keys', 'audit_events');
    const text = [
      'symbol,level,parent,bitting',
      'M1-5,change,M1,2646460', // row 2: fine
      'M1-6,change,M1,2646464', // row 3: its master's bitting
      'M1-7,change,M1,6646460', // row 4: chamber 1 held by M1
      'M3,master,M,4664464', // row 5: fine (a new master under M)
      'M3-1,change,M3,4664461', // row 6: odd cut in chamber 7, under a master from the same file
      'M1-8,change,M1,2646460', // row 7: same as row 2
    ].join('\n');
    const res = await h.call('POST', `/api/key-systems/${sysId}/import?commit=1`, { token: admin, raw: csvForm(text) });
    expect(res.status).toBe(422);
    expect(res.json.committed).toBe(false);
    expect(res.json.errors.map((e: { row: number; column: string }) => [e.row, e.column])).toEqual([[2, 'bitting'], [3, 'bitting'], [4, 'bitting'], [6, 'bitting'], [7, 'bitting']]);
    const byRow = new Map((res.json.errors as { row: number; message: string }[]).map((e) => [e.row, e.message]));
    expect(byRow.get(2)).toMatch(/same as M1-8, a key under the same master/);
    expect(byRow.get(3)).toMatch(/same as its master M1/);
    expect(byRow.get(4)).toMatch(/^Chamber 1: master M1 holds this position constant/);
    expect(byRow.get(6)).toMatch(/^Chamber 7: the cut breaks top master M’s parity/);
    expect(await countRows(h.db, 'keys', 'audit_events')).toEqual(before);
  });
});

describe('MACS is an error for the key that breaks it (keying primer, MACS)', () => {
  test('hand entry and import refuse a key that breaks the profile’s maximum adjacent cut, naming the chambers (A7)', async () => {
    const profile = { ...(builtInProfiles['sfic-7'] as Profile), id: 'test-seven-macs4', label: 'Test 7-pin, MACS 4', maxAdjacentCut: 4 };
    expect((await h.call('POST', '/api/profiles', { token: admin, body: profile })).status).toBe(201);
    const sysId = (await h.call('POST', '/api/key-systems', { token: admin, body: { name: 'Close Cuts Lab (invented)', profileId: profile.id, control: '5353535' } })).json.keySystem.id;
    const hand = await h.call('POST', `/api/key-systems/${sysId}/keys`, { token: admin, body: { symbol: 'A', level: 'gm', bitting: '2828282' } });
    expect(hand.status).toBe(400);
    expect(hand.json.error.message).toMatch(/^Chambers 1 and 2: cuts 2 and 8 differ by 6, more than the maximum adjacent cut of 4; the key cannot be cut/);
    const csv = await h.call('POST', `/api/key-systems/${sysId}/import`, { token: admin, raw: csvForm(['symbol,level,parent,bitting', 'A,gm,,2424242', 'A1,change,A,2424282'].join('\n')) });
    expect(csv.status).toBe(422);
    expect(csv.json.errors).toEqual([{ row: 3, column: 'bitting', message: expect.stringMatching(/^Chambers 5 and 6: cuts 2 and 8 differ by 6/) }]);
    // 4 apart is within the limit (MACS is the largest difference allowed).
    expect((await h.call('POST', `/api/key-systems/${sysId}/keys`, { token: admin, body: { symbol: 'A', level: 'gm', bitting: '2626262' } })).status).toBe(201);
  });
});

describe('a bitting list that would open existing cores', () => {
  test('is previewed with a warning on its row naming the cores (keying primer: incidental keys), and nothing is saved', async () => {
    // 2428402 keeps master AA's depths in chambers 1-4 and takes cuts the Aster Hall cores accept: brute force over
    // their operating depths is what the engine's audit does (shared/keying/audit).
    const before = await countRows(h.db, 'keys');
    const text = ['symbol,level,parent,bitting', 'AAX1,change,AA,2428402', 'AAX2,change,AA,2428064'].join('\n');
    const res = await h.call('POST', `/api/key-systems/${demoId}/import`, { token: admin, raw: csvForm(text) });
    expect(res.status).toBe(200);
    expect(res.json.errors).toEqual([]);
    expect(res.json.warnings.length).toBeGreaterThan(0);
    expect(res.json.warnings[0]).toMatchObject({ row: 2, column: 'bitting' });
    expect(res.json.warnings[0].message).toMatch(/AAX1 turns \d+ cores? it is not meant to operate: CR-\d+/);
    expect(await countRows(h.db, 'keys')).toEqual(before);
  });
});

describe('POST /api/key-systems/:id/progression: a preview, nothing saved', () => {
  test('change keys by total position progression under master AA: new bittings, same parity, nothing saved (keying primer: TPP)', async () => {
    const aa = demoKeys.find((k) => k.symbol === 'AA')!;
    const before = await countRows(h.db, 'keys');
    const res = await h.call('POST', `/api/key-systems/${demoId}/progression`, { token: admin, body: { progress: [5, 6, 7], parentId: aa.id, limit: 10 } });
    expect(res.status).toBe(200);
    const keys = res.json.keys as { symbol: string; level: string; parentId: string; bitting: string }[];
    expect(keys).toHaveLength(10);
    const taken = new Set(demoBittings);
    const usedSymbols = new Set(demoKeys.map((k) => k.symbol));
    for (const k of keys) {
      expect(k).toMatchObject({ level: 'change', parentId: aa.id });
      expect(usedSymbols.has(k.symbol)).toBe(false);
      expect(k.symbol).toMatch(/^AA\d+$/);
      expect(taken.has(k.bitting)).toBe(false);
      // chambers 1-4 keep the master's depths; 5-7 differ from it, by an even step (two-step progression)
      expect(k.bitting.slice(0, 4)).toBe(aa.bitting.slice(0, 4));
      for (let c = 4; c < 7; c++) {
        const diff = Number(k.bitting[c]) - Number(aa.bitting[c]);
        expect(diff).not.toBe(0);
        expect(Math.abs(diff % 2)).toBe(0);
      }
    }
    expect(new Set(keys.map((k) => k.bitting)).size).toBe(10);
    expect(new Set(keys.map((k) => k.symbol)).size).toBe(10);
    expect(await countRows(h.db, 'keys')).toEqual(before);
  });

  test('rotating constant under AA: each key keeps exactly one of chambers 5-7 at the master’s depth, and which one rotates (keying primer: rotating constant)', async () => {
    const aa = demoKeys.find((k) => k.symbol === 'AA')!;
    const res = await h.call('POST', `/api/key-systems/${demoId}/progression`, { token: admin, body: { progress: [5, 6, 7], parentId: aa.id, method: 'rotating-constant', limit: 12 } });
    expect(res.status).toBe(200);
    const keys = res.json.keys as { bitting: string }[];
    expect(keys.length).toBeGreaterThan(0);
    const constantAt = keys.map((k) => [4, 5, 6].filter((c) => k.bitting[c] === aa.bitting[c]));
    for (const [i, k] of keys.entries()) {
      expect(k.bitting.slice(0, 4)).toBe(aa.bitting.slice(0, 4));
      expect(constantAt[i]).toHaveLength(1);
      expect(demoBittings).not.toContain(k.bitting);
    }
    expect(new Set(constantAt.map((c) => c[0])).size).toBe(3);
  });

  test('the preview runs the system audit on its keys: a key that would turn existing cores is held back with the audit’s reason, and no saved key turns a core it is not meant to (brute force with keyOperates)', async () => {
    const aa = demoKeys.find((k) => k.symbol === 'AA')!;
    // Rotating constant keeps one of chambers 5-7 at AA's depth, so some keys match an Aster Hall core's change key elsewhere.
    const res = await h.call('POST', `/api/key-systems/${demoId}/progression`, { token: admin, body: { progress: [5, 6, 7], parentId: aa.id, method: 'rotating-constant', limit: 500 } });
    expect(res.status).toBe(200);
    const held = res.json.held as { bitting: string; reasons: { code: string; message: string }[] }[];
    expect(held.length).toBeGreaterThan(0);
    for (const k of held) {
      expect(k.reasons.map((r) => r.code)).toContain('unintended-access');
      expect(k.reasons[0]!.message).toMatch(/^This key turns \d+ cores? it is not meant to operate/);
    }
    // Brute force: pin every live core of the system with the engine and try each proposed key in it.
    const sfic7 = builtInProfiles['sfic-7'] as Profile;
    const links = await h.db('core_keys as ck').join('cores as c', 'c.id', 'ck.core_id').where('c.key_system_id', demoId).whereNot('c.state', 'retired').select('ck.core_id', 'ck.key_id');
    const byCore = new Map<string, string[]>();
    for (const l of links) byCore.set(l.core_id, [...(byCore.get(l.core_id) ?? []), demoKeys.find((k) => k.id === l.key_id)!.bitting]);
    const pinnings = [...byCore.values()].map((operating) => pinCore(sfic7, { operating, control: SEED_CONTROL }));
    const turnsAny = (b: string) => pinnings.some((p) => keyOperates(p, sfic7, b).plug);
    for (const k of res.json.keys as { bitting: string }[]) expect(turnsAny(k.bitting), k.bitting).toBe(false);
    for (const k of held) expect(turnsAny(k.bitting), k.bitting).toBe(true);
  });

  test('progressing a chamber the master holds constant is a 400 naming progress and the chamber; a bad method or constant count names its field (A7)', async () => {
    const aa = demoKeys.find((k) => k.symbol === 'AA')!;
    const held = await h.call('POST', `/api/key-systems/${demoId}/progression`, { token: admin, body: { progress: [2, 6], parentId: aa.id } });
    expect(held.status).toBe(400);
    expect(fieldsOf(held)).toEqual(['progress']);
    expect(held.json.error.message).toMatch(/^Chamber 2: the master holds it constant/);
    const method = await h.call('POST', `/api/key-systems/${demoId}/progression`, { token: admin, body: { progress: [6], parentId: aa.id, method: 'sideways' } });
    expect(method.status).toBe(400);
    expect(fieldsOf(method)).toEqual(['method']);
    const constants = await h.call('POST', `/api/key-systems/${demoId}/progression`, { token: admin, body: { progress: [6, 7], parentId: aa.id, method: 'rotating-constant', constants: 2 } });
    expect(constants.status).toBe(400);
    expect(fieldsOf(constants)).toEqual(['constants']);
  });

  test('bad input names the field: no chamber, a chamber past the core, an unknown parent (A7)', async () => {
    const aa = demoKeys.find((k) => k.symbol === 'AA')!;
    const none = await h.call('POST', `/api/key-systems/${demoId}/progression`, { token: admin, body: { progress: [], parentId: aa.id } });
    expect(none.status).toBe(400);
    expect(fieldsOf(none)).toEqual(['progress']);
    const past = await h.call('POST', `/api/key-systems/${demoId}/progression`, { token: admin, body: { progress: [8], parentId: aa.id } });
    expect(past.status).toBe(400);
    expect(fieldsOf(past)).toEqual(['progress']);
    const unknown = await h.call('POST', `/api/key-systems/${demoId}/progression`, { token: admin, body: { progress: [7], parentId: randomUUID() } });
    expect(unknown.status).toBe(400);
    expect(fieldsOf(unknown)).toEqual(['parentId']);
  });

  test('a supervisor may not run a progression: 403 (A-3)', async () => {
    const aa = demoKeys.find((k) => k.symbol === 'AA')!;
    expect((await h.call('POST', `/api/key-systems/${demoId}/progression`, { token: lead, body: { progress: [7], parentId: aa.id } })).status).toBe(403);
  });
});

describe('GET /api/key-systems/:id/system-audit', () => {
  test("the demo system's audit has the rights-amplification information finding (M. Blaze, IEEE S&P 2003)", async () => {
    const res = await h.call('GET', `/api/key-systems/${demoId}/system-audit`, { token: lead });
    expect(res.status).toBe(200);
    expect(res.json).toMatchObject({ keys: 85, cores: 23 });
    const ra = res.json.findings.find((f: { code: string }) => f.code === 'rights-amplification');
    // The seed: masters AA..AD differ from grand master A in chambers 1-2, change keys from their master in 5-7,
    // so 5 of 7 positions are mastered; two-step depths 0..9 leave 4 other depths per position: 5 x 4 and 7 x 4 test cuts.
    expect(ra).toMatchObject({ severity: 'info', keys: ['A'], chambers: [1, 2, 5, 6, 7] });
    expect(ra.data).toEqual({ positionsMastered: 5, chambers: 7, testCuts: 20, testCutsAllPositions: 28 });
    expect(ra.message).toMatch(/positions are mastered/);
    expect(await h.db('audit_events').where({ action: 'key-system.audited', target_id: demoId }).count({ n: '*' }).first()).toEqual({ n: 1 });
    // the findings name keys by symbol; no bitting leaves in an answer that is not audited as a view (A10)
    for (const b of demoBittings) expect(res.text).not.toContain(b);
  });
});

describe('A10: the database read raw holds no bitting in plain text (ANSI/BHMA A156.28 key control)', () => {
  const found = (text: string) => demoBittings.filter((b) => text.includes(b));

  test('a control: the search does find the bittings where they are plain (the reveal answer; A10 control case)', async () => {
    const res = await h.call('GET', `/api/key-systems/${demoId}/keys?reveal=1`, { token: admin });
    expect(found(res.text).length).toBe(85);
  });

  test.each(['keys', 'key_systems', 'devices'])('every row of %s, read as text, carries no demo bitting (A10)', async (table) => {
    // a device row, so the devices table is not empty
    await h.call('POST', '/api/devices/escrow', { token: tech, body: { deviceId: randomUUID(), label: 'Bench tablet 1' } });
    const rows = (await h.db.raw(`select t::text as row from "${table}" t`)).rows as { row: string }[];
    expect(rows.length).toBeGreaterThan(0);
    for (const { row } of rows) expect(found(row), row).toEqual([]);
  });

  test('a pg_dump-like full read of every table carries no demo bitting (A10; ASVS 5 V11)', async () => {
    const keysDump = (await h.db.raw(`select string_agg(t::text, ' ') as dump from keys t`)).rows[0].dump as string;
    const keyRows = (await countRows(h.db, 'keys')).keys!;
    expect(keyRows).toBeGreaterThanOrEqual(85);
    // every key row holds one sealed bitting (services/secrets.ts: v1.<iv>.<tag>.<ciphertext>)
    expect(keysDump.match(/\bv1\.[A-Za-z0-9_-]{16}\.[A-Za-z0-9_-]{22}\.[A-Za-z0-9_-]+/g)).toHaveLength(keyRows);
    expect(found(keysDump)).toEqual([]);
    const tables = (await h.db('pg_tables').where({ schemaname: 'public' }).pluck('tablename')) as string[];
    expect(tables).toEqual(expect.arrayContaining(['keys', 'key_systems', 'devices', 'cores', 'completions', 'audit_events', 'work_orders']));
    for (const t of tables) {
      const dump = ((await h.db.raw(`select coalesce(string_agg(t::text, ' '), '') as dump from "${t}" t`)).rows[0].dump as string) ?? '';
      expect(found(dump), `table ${t}`).toEqual([]);
    }
  });
});
