// Key control, exposure: what a key opens as the cores are installed, checked against brute force
// through the engine's keyOperates on each installed core's chart (pinCore); who else holds it;
// lost and stolen reports; who can open a door and what a holder can open. Sources: the primer's
// "Key control" (ANSI/BHMA A156.28; ALOA Keynotes, Jan 2015): a lost key's exposure includes the
// doors it opens incidentally, and a lost control key exposes every core. reliability.md A-3, A7.
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { keyOperates, pinCore } from '../../shared/keying';
import { loadSystem, type LoadedSystem } from '../../server/services/keySystems';
import { countRows, startHarness, type Harness } from './harness';

let h: Harness;
let lead: string;
let admin: string;
let tech: string;
let systemId: string;
let system: LoadedSystem;
const keyId = new Map<string, string>();
beforeAll(async () => {
  h = await startHarness({}, { demo: true });
  lead = await h.tokenFor('supervisor');
  admin = await h.tokenFor('admin');
  tech = await h.tokenFor('technician');
  systemId = (await h.call('GET', '/api/key-systems', { token: lead })).json.keySystems[0].id;
  await refresh();
});
afterAll(async () => h.close());

async function refresh(): Promise<void> {
  system = await loadSystem(h.db, h.sealer, systemId);
  for (const k of system.keys) keyId.set(k.symbol, k.id);
}

/** The rule, core by core: every installed core's chart from pinCore, then keyOperates. */
async function bruteForce(bitting: string, id: string | null): Promise<string[]> {
  const cores = await h.db('cores').where({ key_system_id: systemId, state: 'installed' }).select<{ id: string }[]>('id');
  const links = await h.db('core_keys').whereIn('core_id', cores.map((c) => c.id)).select<{ core_id: string; key_id: string }[]>('core_id', 'key_id');
  const out: string[] = [];
  for (const c of cores) {
    const chain = links.filter((l) => l.core_id === c.id).map((l) => l.key_id);
    const pinning = pinCore(system.profile, { operating: chain.map((k) => system.keys.find((x) => x.id === k)!.bitting), control: system.control });
    const does = keyOperates(pinning, system.profile, bitting);
    if (does.plug) out.push(`${c.id}:${id && chain.includes(id) ? 'intended' : 'incidental'}`);
    else if (does.control) out.push(`${c.id}:control`);
  }
  return out.sort();
}
const asSet = (cores: { id: string; how: string }[]) => cores.map((c) => `${c.id}:${c.how}`).sort();

async function holder(name: string): Promise<string> {
  return (await h.call('POST', '/api/holders', { token: lead, body: { name, department: 'Library' } })).json.holder.id;
}
async function issue(holderId: string, symbol: string) {
  const res = await h.call('POST', '/api/key-issues', { token: lead, body: { holderId, keyId: keyId.get(symbol), acknowledgement: { name: 'X', accepted: true } } });
  expect(res.status).toBe(201);
  return res.json.issue as { id: string; copyNumber: number };
}

describe('GET /api/keys/:id/exposure', () => {
  test('every key of the demo system: the cores equal brute force through keyOperates over the installed cores', async () => {
    for (const k of system.keys) {
      const res = await h.call('GET', `/api/keys/${k.id}/exposure`, { token: lead });
      expect(res.status).toBe(200);
      expect(asSet(res.json.exposure.cores), k.symbol).toEqual(await bruteForce(k.bitting, k.id));
    }
  }, 180_000);

  test('the grand master turns every installed core, each intended; a core not installed yet (planned) is not counted', async () => {
    const installed = await h.db('cores').where({ key_system_id: systemId, state: 'installed' }).count({ n: '*' }).first();
    const planned = await h.db('cores').where({ key_system_id: systemId, state: 'planned' }).first('id');
    const res = await h.call('GET', `/api/keys/${keyId.get('A')}/exposure`, { token: lead });
    expect(res.json.exposure.counts).toMatchObject({ cores: Number(installed!.n), intended: Number(installed!.n), incidental: 0 });
    expect(res.json.exposure.cores.map((c: { id: string }) => c.id)).not.toContain(planned!.id);
    expect(res.json.exposure.cores[0]).toEqual({ id: expect.any(String), tag: expect.stringMatching(/^CR-/), doorId: expect.any(String), doorLabel: expect.stringMatching(/^BL-/), how: 'intended' });
  });

  test('a key that turns a core only through its master wafers is incidental (primer: incidental openings)', async () => {
    // BL-101's core is pinned for AB1, AB and A: a key with AB1's cuts in chambers 5 and 7 and
    // AB's in chamber 6 meets a break in every chamber without being one of its keys.
    const ab1 = system.keys.find((k) => k.symbol === 'AB1')!.bitting.split('');
    const ab = system.keys.find((k) => k.symbol === 'AB')!.bitting.split('');
    const mixed = [...ab1.slice(0, 5), ab[5], ab1[6]].join('');
    expect(mixed).not.toBe(ab1.join(''));
    const added = await h.call('POST', `/api/key-systems/${systemId}/keys`, { token: admin, body: { symbol: 'ABX', level: 'change', parentId: keyId.get('AB'), bitting: mixed } });
    expect(added.status, added.text).toBe(201);
    await refresh();
    const res = await h.call('GET', `/api/keys/${keyId.get('ABX')}/exposure`, { token: lead });
    const bl101 = res.json.exposure.cores.find((c: { doorLabel: string }) => c.doorLabel === 'BL-101');
    expect(bl101.how).toBe('incidental');
    expect(asSet(res.json.exposure.cores)).toEqual(await bruteForce(mixed, keyId.get('ABX')!));
  });

  test('the control key removes every installed core (primer: a lost control key exposes every core)', async () => {
    const res = await h.call('GET', `/api/key-systems/${systemId}/control-exposure`, { token: lead });
    expect(res.status).toBe(200);
    const installed = Number((await h.db('cores').where({ key_system_id: systemId, state: 'installed' }).count({ n: '*' }).first())!.n);
    expect(res.json.exposure).toMatchObject({ keyId: null, counts: { cores: installed, control: installed } });
    expect(asSet(res.json.exposure.cores)).toEqual(await bruteForce(system.control, null));
  });

  test('every other holder of that key: each copy out, with its copy number', async () => {
    const a = await holder('Exposure One');
    const b = await holder('Exposure Two');
    const one = await issue(a, 'AB2');
    const two = await issue(b, 'AB2');
    const res = await h.call('GET', `/api/keys/${keyId.get('AB2')}/exposure`, { token: lead });
    expect(res.json.exposure.holders).toEqual(expect.arrayContaining([
      { issueId: one.id, holderId: a, name: 'Exposure One', department: 'Library', copyNumber: one.copyNumber, status: 'out' },
      { issueId: two.id, holderId: b, name: 'Exposure Two', department: 'Library', copyNumber: two.copyNumber, status: 'out' },
    ]));
  });

  test('unknown key 404, bad id 400', async () => {
    expect((await h.call('GET', '/api/keys/00000000-0000-4000-8000-000000000000/exposure', { token: lead })).status).toBe(404);
    expect((await h.call('GET', '/api/keys/nope/exposure', { token: lead })).status).toBe(400);
  });
});

describe('POST /api/key-issues/:id/report: lost or stolen', () => {
  test('answers { report } with report.exposure as GET exposure computes it; the copy is marked; audited; a second report is a conflict', async () => {
    const lost = await holder('Lost Copy');
    const copy = await issue(lost, 'AB3');
    const res = await h.call('POST', `/api/key-issues/${copy.id}/report`, { token: lead, body: { kind: 'lost', note: 'Left on the bus' } });
    expect(res.status).toBe(200);
    expect(res.json.report).toMatchObject({ issueId: copy.id, kind: 'lost', status: 'open', keySymbol: 'AB3', copyNumber: copy.copyNumber, note: 'Left on the bus' });
    const now = (await h.call('GET', `/api/keys/${keyId.get('AB3')}/exposure`, { token: lead })).json.exposure;
    expect(res.json.report.exposure).toEqual(now);
    expect(asSet(res.json.report.exposure.cores)).toEqual(await bruteForce(system.keys.find((k) => k.symbol === 'AB3')!.bitting, keyId.get('AB3')!));
    expect(now.holders.find((x: { issueId: string }) => x.issueId === copy.id).status).toBe('lost');
    expect((await h.call('GET', `/api/key-issues/${copy.id}`, { token: lead })).json.issue.status).toBe('lost');
    expect(await h.db('audit_events').where({ action: 'key.reported' }).first('id')).toBeTruthy();
    expect((await h.call('POST', `/api/key-issues/${copy.id}/report`, { token: lead, body: { kind: 'stolen' } })).status).toBe(409);
    const list = await h.call('GET', '/api/key-reports?status=open', { token: lead });
    expect(list.json.reports.map((r: { id: string }) => r.id)).toContain(res.json.report.id);
  });
  test('bad input: 400 naming the field, nothing stored (A7)', async () => {
    const copy = await issue(await holder('Bad Report'), 'AB4');
    const before = await countRows(h.db, 'key_reports');
    for (const [body, field] of [[{ kind: 'misplaced' }, 'kind'], [{}, 'kind'], [{ kind: 'lost', note: 'a\u0000b' }, 'note']] as const) {
      const res = await h.call('POST', `/api/key-issues/${copy.id}/report`, { token: lead, body });
      expect(res.status).toBe(400);
      expect((res.json.error.details as { field: string }[]).map((d) => d.field)).toContain(field);
    }
    expect(await countRows(h.db, 'key_reports')).toEqual(before);
    expect((await h.call('GET', `/api/key-issues/${copy.id}`, { token: lead })).json.issue.status).toBe('out');
  });
});

describe('who can open this door, what can this person open', () => {
  test('GET /api/doors/:id/access: every holder of a copy out whose key turns the door\'s installed core, brute force through keyOperates', async () => {
    const door = await h.db('doors').where({ label: 'BL-101' }).first('id');
    const core = await h.db('cores').where({ door_id: door.id, state: 'installed' }).first('id', 'tag');
    const gm = await holder('Access Grand');
    const near = await holder('Access Near');
    const far = await holder('Access Far');
    await issue(gm, 'A');
    await issue(near, 'AB1');
    await issue(far, 'AC1');
    const res = await h.call('GET', `/api/doors/${door.id}/access`, { token: lead });
    expect(res.status).toBe(200);
    expect(res.json.coreTag).toBe(core.tag);
    const names = res.json.holders.map((x: { name: string; how: string }) => `${x.name}:${x.how}`);
    expect(names).toEqual(expect.arrayContaining(['Access Grand:intended', 'Access Near:intended']));
    expect(names.some((n: string) => n.startsWith('Access Far'))).toBe(false);
    // Brute force: every copy out in the system, its key through keyOperates on this core's chart.
    const chain = (await h.db('core_keys').where({ core_id: core.id }).pluck('key_id')) as string[];
    const pinning = pinCore(system.profile, { operating: chain.map((k) => system.keys.find((x) => x.id === k)!.bitting), control: system.control });
    const out = await h.db('key_issues').where({ status: 'out' }).select<{ id: string; key_id: string }[]>('id', 'key_id');
    const expected = out.filter((i) => { const d = keyOperates(pinning, system.profile, system.keys.find((k) => k.id === i.key_id)!.bitting); return d.plug || d.control; }).map((i) => i.id).sort();
    expect(res.json.holders.map((x: { issueId: string }) => x.issueId).sort()).toEqual(expected);
  });
  test('a door without an installed core: no core, nobody', async () => {
    const door = await h.db('doors').where({ label: 'AH-101' }).first('id');
    expect((await h.call('GET', `/api/doors/${door.id}/access`, { token: lead })).json).toEqual({ coreId: null, coreTag: null, holders: [] });
  });
  test('GET /api/holders/:id/access: every door their copies out turn, equal to the exposure of each key', async () => {
    const who = await holder('Access Holder');
    await issue(who, 'AB5');
    await issue(who, 'AB');
    const res = await h.call('GET', `/api/holders/${who}/access`, { token: lead });
    expect(res.status).toBe(200);
    const expected: string[] = [];
    for (const s of ['AB', 'AB5']) {
      for (const c of (await h.call('GET', `/api/keys/${keyId.get(s)}/exposure`, { token: lead })).json.exposure.cores) expected.push(`${s}:${c.doorLabel}:${c.how}`);
    }
    expect(res.json.doors.map((d: { keySymbol: string; doorLabel: string; how: string }) => `${d.keySymbol}:${d.doorLabel}:${d.how}`).sort()).toEqual(expected.sort());
  });
});

describe('access and secrecy', () => {
  test('office roles only: technician 403, anonymous 401 (A-3)', async () => {
    const door = await h.db('doors').first('id');
    const any = await h.db('key_issues').first('id');
    for (const [method, path] of [
      ['GET', `/api/keys/${keyId.get('A')}/exposure`], ['GET', `/api/key-systems/${systemId}/control-exposure`], ['GET', `/api/doors/${door.id}/access`],
      ['GET', `/api/holders/${any ? (await h.db('key_holders').first('id')).id : door.id}/access`], ['POST', `/api/key-issues/${any?.id ?? door.id}/report`], ['GET', '/api/key-reports'],
    ] as const) {
      const body = method === 'POST' ? { kind: 'lost' } : undefined;
      expect((await h.call(method, path, { token: tech, body })).status, path).toBe(403);
      expect((await h.call(method, path, { body })).status, path).toBe(401);
    }
  });
  test('no exposure, report or access answer holds a bitting of the system (brute force over every key and the control key)', async () => {
    const bittings = [system.control, ...system.keys.map((k) => k.bitting)];
    const door = await h.db('doors').where({ label: 'BL-101' }).first('id');
    const texts = [
      (await h.call('GET', `/api/keys/${keyId.get('A')}/exposure`, { token: lead })).text,
      (await h.call('GET', `/api/key-systems/${systemId}/control-exposure`, { token: lead })).text,
      (await h.call('GET', `/api/doors/${door.id}/access`, { token: lead })).text,
      (await h.call('GET', '/api/key-reports', { token: lead })).text,
    ];
    for (const r of (await h.call('GET', '/api/key-reports', { token: lead })).json.reports) texts.push((await h.call('GET', `/api/key-reports/${r.id}`, { token: lead })).text);
    for (const text of texts) for (const b of bittings) expect(text.includes(b), b).toBe(false);
  });
});
