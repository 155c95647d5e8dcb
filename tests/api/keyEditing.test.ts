// A key's page: the doors and cores it operates (the engine's keyOperates, intended or incidental),
// edit, retire and replace. Cases A-3, A5, A7 and A10 of ../shared/design/reliability.md.
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { KeyOperatesRow } from '../../shared/schemas/records';
import { countRows, startHarness, type Harness } from './harness';

let h: Harness;
let admin: string;
let lead: string;
let ks: string;
const keyId: Record<string, string> = {};
let bittings: string[] = [];
beforeAll(async () => {
  h = await startHarness({}, { demo: true });
  admin = await h.tokenFor('admin');
  lead = await h.tokenFor('supervisor');
  ks = (await h.db('key_systems').first('id')).id;
  for (const k of await h.db('keys').select('id', 'symbol')) keyId[k.symbol] = k.id;
  bittings = ((await h.call('GET', `/api/key-systems/${ks}/keys?reveal=1`, { token: admin })).json.keys as { bitting: string }[]).map((k) => k.bitting);
});
afterAll(async () => h.close());

const operates = async (symbol: string) => {
  const res = await h.call('GET', `/api/key-systems/${ks}/keys/${keyId[symbol]}/operates`, { token: lead });
  expect(res.status, res.text).toBe(200);
  for (const b of bittings) expect(res.text).not.toContain(b);
  return res.json.cores.map((c: unknown) => KeyOperatesRow.parse(c)) as KeyOperatesRow[];
};

describe('GET .../keys/:keyId/operates', () => {
  test('a change key opens the cores pinned for it (intended); no bitting in the answer (A10)', async () => {
    // A change key of the seed that has live cores pinned for it.
    const { symbol } = await h.db('core_keys as ck').join('cores as c', 'c.id', 'ck.core_id').join('keys as k', 'k.id', 'ck.key_id').where('k.level', 'change').whereNot('c.state', 'retired').first('k.symbol');
    const pinned = await h.db('core_keys as ck').join('cores as c', 'c.id', 'ck.core_id').where('ck.key_id', keyId[symbol]).whereNot('c.state', 'retired').pluck('c.tag');
    const rows = await operates(symbol);
    expect(rows.filter((r) => r.intended).map((r) => r.tag).sort()).toEqual([...pinned].sort());
    expect(pinned.length).toBeGreaterThan(0);
  });

  test('the grand master opens every live core of the system, all intended (keying primer: the top master turns every core)', async () => {
    const live = Number(((await h.db('cores').whereNot('state', 'retired').whereExists(h.db('core_keys').whereRaw('core_keys.core_id = cores.id')).count({ n: '*' }).first()) as { n: number }).n);
    const rows = await operates('A');
    expect(rows).toHaveLength(live);
    expect(rows.every((r) => r.intended)).toBe(true);
  });

  test('a key a core is not pinned for but turns anyway is listed as incidental (brute force: the engine over every core)', async () => {
    // Every core the engine says AB1 turns, computed here by listing each core's keys: a core with AB1 in its chain is intended.
    const rows = await operates('AB1');
    for (const r of rows.filter((x) => !x.intended)) {
      const chain = await h.db('core_keys').where({ core_id: r.coreId }).pluck('key_id');
      expect(chain).not.toContain(keyId.AB1);
    }
    expect(rows.some((r) => r.intended)).toBe(true);
  });
});

describe('edit, retire, replace', () => {
  test('PATCH renames and annotates a key; retire is audited as key.retired (A7 names the field on a bad symbol)', async () => {
    const bad = await h.call('PATCH', `/api/key-systems/${ks}/keys/${keyId.AC9}`, { token: admin, body: { symbol: 'AC 9' } });
    expect(bad.status).toBe(400);
    expect(bad.json.error.details[0].field).toBe('symbol');
    const ok = await h.call('PATCH', `/api/key-systems/${ks}/keys/${keyId.AC9}`, { token: admin, body: { notes: 'Issued to the caretaker' } });
    expect(ok.status).toBe(200);
    const retired = await h.call('PATCH', `/api/key-systems/${ks}/keys/${keyId.AC9}`, { token: admin, body: { status: 'retired' } });
    expect(retired.status).toBe(200);
    expect(await h.db('audit_events').where({ action: 'key.retired', target_id: keyId.AC9 }).first('id')).toBeDefined();
  });

  test('replace a lost change key: a new key under the same master, the old one lost, its doors moved; cores to rekey listed; audited', async () => {
    const doorsBefore = await h.db('doors').where({ key_id: keyId.AA2 }).pluck('label');
    const res = await h.call('POST', `/api/key-systems/${ks}/keys/${keyId.AA2}/replace`, { token: admin, body: { symbol: 'AA2R', bitting: '4628462', oldStatus: 'lost' } });
    // The grand master's bitting is taken: the engine's rules refuse it, naming the field (A7).
    expect(res.status).toBe(400);
    expect(JSON.stringify(res.json.error.details)).toMatch(/bitting/);
    expect((await h.db('keys').where({ id: keyId.AA2 }).first('status')).status).toBe('active');

    const preview = await h.call('POST', `/api/key-systems/${ks}/progression`, { token: admin, body: { parentId: keyId.AA, progress: [5, 6, 7], limit: 1 } });
    const fresh = (preview.json.keys as { bitting: string }[])[0]!.bitting;
    const ok = await h.call('POST', `/api/key-systems/${ks}/keys/${keyId.AA2}/replace`, { token: admin, body: { symbol: 'aa2r', bitting: fresh, oldStatus: 'lost' } });
    expect(ok.status, ok.text).toBe(201);
    expect(ok.json).toMatchObject({ symbol: 'AA2R', doors: doorsBefore });
    const row = await h.db('keys').where({ id: ok.json.id }).first('level', 'parent_id', 'status');
    expect(row).toEqual({ level: 'change', parent_id: keyId.AA, status: 'active' });
    expect((await h.db('keys').where({ id: keyId.AA2 }).first('status')).status).toBe('lost');
    expect(await h.db('audit_events').where({ action: 'key.replaced', target_id: keyId.AA2 }).first('id')).toBeDefined();
  });

  test('a master with keys under it is not replaced: 409, nothing written', async () => {
    const before = await countRows(h.db, 'keys', 'audit_events');
    const res = await h.call('POST', `/api/key-systems/${ks}/keys/${keyId.AB}/replace`, { token: admin, body: { symbol: 'ABR', bitting: '1234567' } });
    expect(res.status).toBe(409);
    expect(await countRows(h.db, 'keys', 'audit_events')).toEqual(before);
  });

  test('a supervisor reads what a key operates but cannot replace it (A-3); an extra field is a 400 (A5)', async () => {
    expect((await h.call('POST', `/api/key-systems/${ks}/keys/${keyId.AB1}/replace`, { token: lead, body: { symbol: 'X1', bitting: '1234567' } })).status).toBe(403);
    const extra = await h.call('POST', `/api/key-systems/${ks}/keys/${keyId.AB1}/replace`, { token: admin, body: { symbol: 'X1', bitting: '1234567', level: 'gm' } });
    expect(extra.status).toBe(400);
  });
});
