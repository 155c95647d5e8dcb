// Key control, restoring control checked through the engine: a lost key's report closes only when the
// old key turns no installed core of the system, not when its work order's cores are in some door.
// Two ways the work order alone misleads: a rebuilt core installed in another door (the old core is
// still in its own, reliability.md T4 allows the move when the door's key operates the core) and a
// core the key turns only through master wafers (incidental), which its rekey does not rebuild.
// Sources: the primer's "Key control" (a lost key is contained when no core takes it; incidental
// openings) and common practice (an office may accept a residual risk in writing). The remaining
// cores are checked against brute force through keyOperates on each installed core's pinCore chart.
import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { keyOperates, pinCore } from '../../shared/keying';
import { loadSystem } from '../../server/services/keySystems';
import { buildAndInstallRecords } from './factories';
import { startHarness, type Harness } from './harness';

let h: Harness;
let lead: string;
let admin: string;
let tech: string;
let techId: string;
let systemId: string;
const deviceId = randomUUID();
const ack = { name: 'Holder (demo)', accepted: true };
const keyIdOf = async (symbol: string) => (await h.db('keys').where({ symbol }).first('id')).id as string;
const sync = (records: unknown[]) => h.call('POST', '/api/sync', { token: tech, body: { deviceId, records } });
const report = (id: string) => h.db('key_reports').where({ id }).first('status', 'rebuilt_at', 'remaining', 'close_note', 'closed_by');
const events = async (action: string, id: string) => Number((await h.db('audit_events').where({ action, target_id: id }).count({ n: '*' }).first())!.n);

beforeAll(async () => {
  h = await startHarness({}, { demo: true });
  lead = await h.tokenFor('supervisor');
  admin = await h.tokenFor('admin');
  tech = await h.tokenFor('technician');
  techId = (await h.db('users').where({ email: 'tech@demo.corewright.test' }).first('id')).id;
  systemId = (await h.db('key_systems').first('id')).id;
});
afterAll(async () => h.close());

const recordsFor = (workOrderId: string) => buildAndInstallRecords(h, tech, workOrderId);

/** Builds and installs a door's core for its key, as a maintenance work order. */
async function buildFor(doorId: string, keyId: string, title: string) {
  const wo = await h.call('POST', '/api/work-orders', { token: lead, body: { title, purpose: 'maintenance', keySystemId: systemId, assigneeId: techId, doors: [{ doorId, keyId }] } });
  expect(wo.status, wo.text).toBe(201);
  const recs = await recordsFor(wo.json.workOrder.id);
  const res = await sync(recs.flatMap((r) => [r.completion, r.install]));
  expect(res.json.rejected, JSON.stringify(res.json.rejected)).toEqual([]);
}

async function addDoor(label: string, keyId: string): Promise<string> {
  const door = await h.call('POST', '/api/doors', { token: admin, body: { site: 'Quillon Hill College', building: 'Cinder Works', floor: '2', room: label.slice(3), label, keySystemId: systemId, keyId } });
  expect(door.status, door.text).toBe(201);
  return door.json.door.id;
}

async function lostReport(keyId: string, who: string): Promise<string> {
  const holder = (await h.call('POST', '/api/holders', { token: lead, body: { name: who, department: 'Facilities' } })).json.holder.id;
  const issue = await h.call('POST', '/api/key-issues', { token: lead, body: { holderId: holder, keyId, acknowledgement: ack } });
  expect(issue.status, issue.text).toBe(201);
  const made = await h.call('POST', `/api/key-issues/${issue.json.issue.id}/report`, { token: lead, body: { kind: 'lost' } });
  expect(made.status, made.text).toBe(200);
  return made.json.report.id;
}

/** Brute force: every installed core of the system whose chart the bitting turns or whose control line it lines up. */
async function turnedBy(bitting: string): Promise<string[]> {
  const system = await loadSystem(h.db, h.sealer, systemId);
  const cores = (await h.db('cores').where({ key_system_id: systemId, state: 'installed' }).orderBy('tag').select<{ id: string; tag: string }[]>('id', 'tag'));
  const out: string[] = [];
  for (const c of cores) {
    const operating = (await h.db('core_keys').where({ core_id: c.id }).pluck('key_id')) as string[];
    const pinning = pinCore(system.profile, { operating: operating.map((id) => system.keys.find((k) => k.id === id)!.bitting), control: system.control });
    const does = keyOperates(pinning, system.profile, bitting);
    if (does.plug || does.control) out.push(c.tag);
  }
  return out;
}

describe('a rebuilt core installed in another door', () => {
  test('the old core still in its own door keeps the report open (old key retired, tasks made); rebuilding that door closes it', async () => {
    // A change key with an installed core (not AB1, which the next test uses), and a second door keyed to its
    // master, which operates the rebuilt core too: the server lets the technician put it there, with a reason.
    const key = (await h.db('core_keys as ck').join('cores as c', 'c.id', 'ck.core_id').join('keys as k', 'k.id', 'ck.key_id').where({ 'c.state': 'installed', 'k.level': 'change' }).whereNot('k.symbol', 'AB1').orderBy('k.symbol', 'desc').first<{ id: string; symbol: string; parent_id: string }>('k.id', 'k.symbol', 'k.parent_id'));
    const masterDoor = await addDoor('CW-M21', key.parent_id);
    const reportId = await lostReport(key.id, 'Rebuilt core holder (demo)');
    const made = await h.call('POST', `/api/key-reports/${reportId}/work-order`, { token: lead, body: { assigneeId: techId } });
    expect(made.status, made.text).toBe(201);
    const recs = await recordsFor(made.json.workOrderId);
    const [moved, ...rest] = recs;
    const ownDoor = moved!.doorId;
    const oldCore = (await h.db('cores').where({ door_id: ownDoor, state: 'installed' }).first<{ id: string; tag: string }>('id', 'tag'));
    const wrongDoor = { ...moved!.install, doorId: masterDoor, removedCoreTag: null, mismatchReason: 'Planned door was blocked; fitted to the plant room door instead' };
    const batch = [...recs.map((r) => r.completion), wrongDoor, ...rest.map((r) => r.install)];
    const landed = await sync(batch);
    expect(landed.json.rejected, JSON.stringify(landed.json.rejected)).toEqual([]);

    // Every core of the work order is in a door, yet the old key still turns the old core in its own.
    const row = await report(reportId);
    expect(row).toMatchObject({ status: 'open', close_note: null });
    expect(row!.rebuilt_at).not.toBeNull();
    expect((await h.db('keys').where({ id: key.id }).first('status')).status).toBe('retired');
    expect(row!.remaining).toEqual([{ coreId: oldCore.id, tag: oldCore.tag, doorId: ownDoor, doorLabel: expect.any(String), keySymbol: key.symbol, how: 'intended' }]);
    const system = await loadSystem(h.db, h.sealer, systemId);
    expect(row!.remaining.map((c: { tag: string }) => c.tag)).toEqual(await turnedBy(system.keys.find((k) => k.id === key.id)!.bitting));
    const answer = await h.call('GET', `/api/key-reports/${reportId}`, { token: lead });
    expect(answer.json.report).toMatchObject({ status: 'open', rebuiltAt: expect.any(String), remaining: [{ tag: oldCore.tag, keySymbol: key.symbol, how: 'intended' }], closeNote: null });
    expect(Number((await h.db('key_reissue_tasks').where({ report_id: reportId }).count({ n: '*' }).first())!.n)).toBe(1);
    expect(await events('key-report.rebuilt', reportId)).toBe(1);
    expect(await events('key-report.still-turns', reportId)).toBe(1);
    expect(await events('key-report.closed', reportId)).toBe(0);
    // No bitting in the answer.
    for (const b of [system.control, ...system.keys.map((k) => k.bitting)]) expect(answer.text.includes(b)).toBe(false);

    // Replayed: nothing lands, nothing is audited twice.
    expect((await sync(batch)).json.accepted).toEqual([]);
    expect(await events('key-report.still-turns', reportId)).toBe(1);
    expect(await events('key-report.rebuilt', reportId)).toBe(1);

    // The door's own core rebuilt for its new key (any work order): that install closes the report.
    const doorKey = (await h.db('doors').where({ id: ownDoor }).first('key_id')).key_id as string;
    expect(doorKey).toBe(made.json.newKeyId);
    await buildFor(ownDoor, doorKey, 'Rebuild the door the lost key still opened');
    expect(await report(reportId)).toMatchObject({ status: 'closed', remaining: [] });
    expect(await events('key-report.closed', reportId)).toBe(1);
    expect(await turnedBy(system.keys.find((k) => k.id === key.id)!.bitting)).toEqual([]);
  });
});

describe('a core the lost key turns only through master wafers', () => {
  let reportId: string;
  let keySymbol: string;
  let incidental: string[];

  test('it is not rebuilt, so the report stays open naming it after the rekey is installed', async () => {
    // A key with AB1's cuts in chambers 1-5 and 7 and AB's in chamber 6 turns BL-101's core (AB1, AB, A)
    // through its master wafers (the exposure test's construction), and has a door of its own.
    const system = await loadSystem(h.db, h.sealer, systemId);
    const ab1 = system.keys.find((k) => k.symbol === 'AB1')!.bitting.split('');
    const ab = system.keys.find((k) => k.symbol === 'AB')!.bitting.split('');
    const mixed = [...ab1.slice(0, 5), ab[5], ab1[6]].join('');
    const added = await h.call('POST', `/api/key-systems/${systemId}/keys`, { token: admin, body: { symbol: 'ABX', level: 'change', parentId: await keyIdOf('AB'), bitting: mixed } });
    expect(added.status, added.text).toBe(201);
    const abx = await keyIdOf('ABX');
    keySymbol = 'ABX';
    const own = await addDoor('CW-X22', abx);
    await buildFor(own, abx, 'A core for ABX');
    const bl101 = (await h.db('cores as c').join('doors as d', 'd.id', 'c.door_id').where({ 'd.label': 'BL-101', 'c.state': 'installed' }).first('c.tag')).tag as string;
    expect(await turnedBy(mixed)).toEqual(expect.arrayContaining([bl101]));

    reportId = await lostReport(abx, 'Incidental holder (demo)');
    const plan = (await h.call('GET', `/api/key-reports/${reportId}/plan`, { token: lead })).json.plan;
    expect(plan.incidentalCores.map((c: { tag: string }) => c.tag)).toContain(bl101);
    const made = await h.call('POST', `/api/key-reports/${reportId}/work-order`, { token: lead, body: { assigneeId: techId } });
    expect(made.status, made.text).toBe(201);
    const recs = await recordsFor(made.json.workOrderId);
    expect(recs.map((r) => r.doorId)).toEqual([own]);
    expect((await sync(recs.flatMap((r) => [r.completion, r.install]))).json.rejected).toEqual([]);

    const row = await report(reportId);
    expect(row).toMatchObject({ status: 'open' });
    expect(row!.rebuilt_at).not.toBeNull();
    // Brute force agrees: after the rekey, the old bitting still turns BL-101's core (and any other it turned
    // incidentally) and no core of its own door.
    incidental = await turnedBy(mixed);
    expect(incidental).toContain(bl101);
    expect(row!.remaining.map((c: { tag: string }) => c.tag).sort()).toEqual(incidental);
    expect(new Set(row!.remaining.map((c: { how: string; keySymbol: string }) => `${c.keySymbol} ${c.how}`))).toEqual(new Set(['ABX incidental']));
  });

  test('closing by hand: refused without a note (nothing changes), refused while a rekey is not installed; with a note, closed and audited with the core accepted', async () => {
    const empty = await h.call('POST', `/api/key-reports/${reportId}/close`, { token: lead, body: { note: '  ' } });
    expect(empty.status).toBe(400);
    expect(empty.json.error.details[0]).toMatchObject({ field: 'note', message: expect.stringMatching(/says why/) });
    const extra = await h.call('POST', `/api/key-reports/${reportId}/close`, { token: lead, body: { note: 'Fine', force: true } });
    expect(extra.status).toBe(400);
    expect((await report(reportId))!.status).toBe('open');

    // Another lost key with no work order yet cannot be closed by hand: its rekey comes first.
    const fresh = await lostReport(await keyIdOf('AA1'), 'Not rebuilt holder (demo)');
    const early = await h.call('POST', `/api/key-reports/${fresh}/close`, { token: lead, body: { note: 'We accept it' } });
    expect(early.status).toBe(409);
    expect(early.json.error.message).toMatch(/only after its rekey is installed.*no rekey work order yet/);
    expect(await report(fresh)).toMatchObject({ status: 'open', close_note: null });

    const closed = await h.call('POST', `/api/key-reports/${reportId}/close`, { token: lead, body: { note: 'BL-101 is rebuilt in the spring renovation; the door is alarmed meanwhile.' } });
    expect(closed.status, closed.text).toBe(200);
    expect(closed.json.report).toMatchObject({ status: 'closed', closeNote: 'BL-101 is rebuilt in the spring renovation; the door is alarmed meanwhile.', closedByName: expect.any(String), remaining: incidental.map((tag) => ({ tag, keySymbol, how: 'incidental' })) });
    const event = await h.db('audit_events').where({ action: 'key-report.closed', target_id: reportId }).first('details');
    expect(event.details).toMatchObject({ accepted: incidental.length, note: expect.stringMatching(/spring renovation/) });
    const again = await h.call('POST', `/api/key-reports/${reportId}/close`, { token: lead, body: { note: 'Twice' } });
    expect(again.status).toBe(409);
    expect(await events('key-report.closed', reportId)).toBe(1);
  });
});
