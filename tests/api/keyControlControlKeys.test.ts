// Key control, control keys tracked like any key: a copy of a system's control key is issued (by a
// supervisor or an administrator only), returned, passed on and reported lost; its exposure is every
// core built for it, checked against brute force through keyOperates on each installed core's chart;
// its rekey plan is a new control key that passes the system audit and that the lost one cannot use
// on any rebuilt core (brute force again), one step makes the work order, and the old control key is
// retired when the rebuilt cores are installed. Sources: the primer's "Key control" (a lost control
// key exposes every core of the system; bittings never on a receipt or answer); the engine's rules
// for a control key (systemAudit: control-equals-key, control-turns-plug, key-releases-core);
// reliability.md A-3, A7.
import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { auditSystem, keyOperates, pinCore } from '../../shared/keying';
import type { Packet } from '../../shared/schemas/packet';
import { loadSystem, type LoadedSystem } from '../../server/services/keySystems';
import { systemAuditInputFor } from '../../server/services/systemAudit';
import { completionFor } from './factories';
import { countRows, startHarness, type Harness } from './harness';

let h: Harness;
let lead: string;
let admin: string;
let tech: string;
let techId: string;
let systemId: string;
let system: LoadedSystem;
let ck: string;
const deviceId = randomUUID();
const ack = (name: string) => ({ name, accepted: true });

beforeAll(async () => {
  h = await startHarness({}, { demo: true });
  lead = await h.tokenFor('supervisor');
  admin = await h.tokenFor('admin');
  tech = await h.tokenFor('technician');
  techId = (await h.db('users').where({ email: 'tech@demo.corewright.test' }).first('id')).id;
  systemId = (await h.call('GET', '/api/key-systems', { token: lead })).json.keySystems[0].id;
  system = await loadSystem(h.db, h.sealer, systemId);
  ck = (await h.call('GET', `/api/key-systems/${systemId}/control-keys`, { token: lead })).json.controlKeys[0].id;
});
afterAll(async () => h.close());

async function holder(name: string): Promise<string> {
  return (await h.call('POST', '/api/holders', { token: lead, body: { name, department: 'Facilities' } })).json.holder.id;
}
const issue = (holderId: string, keyId: string, token = lead) => h.call('POST', '/api/key-issues', { token, body: { holderId, keyId, acknowledgement: ack('Holder') } });

/** The rule, core by core: each installed core's chart from pinCore with the control key it was built for, then keyOperates. */
async function bruteForce(bitting: string): Promise<string[]> {
  const s = await loadSystem(h.db, h.sealer, systemId);
  const cores = await h.db('cores').where({ key_system_id: systemId, state: 'installed' }).select<{ id: string; control_key_id: string | null }[]>('id', 'control_key_id');
  const links = await h.db('core_keys').whereIn('core_id', cores.map((c) => c.id)).select<{ core_id: string; key_id: string }[]>('core_id', 'key_id');
  const out: string[] = [];
  for (const c of cores) {
    const operating = links.filter((l) => l.core_id === c.id).map((l) => s.keys.find((k) => k.id === l.key_id)!.bitting);
    const control = c.control_key_id ? s.replacedControls[c.control_key_id]! : s.control;
    const does = keyOperates(pinCore(s.profile, { operating, control }), s.profile, bitting);
    if (does.plug) out.push(`${c.id}:incidental`);
    else if (does.control) out.push(`${c.id}:control`);
  }
  return out.sort();
}
const asSet = (cores: { id: string; how: string }[]) => cores.map((c) => `${c.id}:${c.how}`).sort();
const bittingsIn = (text: string, bittings: string[]) => bittings.filter((b) => text.includes(b));

describe('a control key issued, returned and passed on like any key', () => {
  test('GET /api/key-systems/:id/control-keys: the control key on record, by symbol, never its bitting', async () => {
    const res = await h.call('GET', `/api/key-systems/${systemId}/control-keys`, { token: lead });
    expect(res.json.controlKeys).toEqual([{ id: ck, keySystemId: systemId, symbol: 'CK', status: 'active', copiesOut: 0 }]);
    expect(res.text.includes(system.control)).toBe(false);
    expect((await h.call('GET', `/api/key-systems/${systemId}/control-keys`, { token: tech })).status).toBe(403);
  });

  test('only a supervisor or an administrator issues one: 201 with its own copy numbers, audited as a control key; a technician 403, nothing stored (A-3)', async () => {
    const pat = await holder('Pat Shop (demo)');
    const before = await countRows(h.db, 'key_issues');
    expect((await issue(pat, ck, tech)).status).toBe(403);
    expect((await h.call('POST', '/api/key-issues', { body: { holderId: pat, keyId: ck, acknowledgement: ack('Pat') } })).status).toBe(401);
    expect(await countRows(h.db, 'key_issues')).toEqual(before);
    const one = await issue(pat, ck);
    expect(one.status, one.text).toBe(201);
    expect(one.json.issue).toMatchObject({ keyId: ck, keySymbol: 'CK', control: true, copyNumber: 1, keySystemId: systemId, status: 'out' });
    const two = await issue(await holder('Ola Shop (demo)'), ck, admin);
    expect(two.json.issue.copyNumber).toBe(2);
    expect((await h.db('audit_events').where({ action: 'key.issued', target_id: two.json.issue.id }).first()).details).toMatchObject({ control: true });
    expect((await h.call('GET', `/api/key-systems/${systemId}/control-keys`, { token: lead })).json.controlKeys[0].copiesOut).toBe(2);
    // A key of the system keeps its own numbering.
    const ab = await issue(pat, (await h.db('keys').where({ symbol: 'AB9' }).first('id')).id);
    expect(ab.json.issue).toMatchObject({ control: false, keySymbol: 'AB9' });
    // Back and passed on: the copy number stays.
    const back = await h.call('POST', `/api/key-issues/${one.json.issue.id}/return`, { token: lead, body: {} });
    expect(back.json.issue).toMatchObject({ status: 'returned', control: true });
    const passed = await h.call('POST', `/api/key-issues/${two.json.issue.id}/transfer`, { token: lead, body: { holderId: pat, acknowledgement: ack('Pat') } });
    expect(passed.status, passed.text).toBe(201);
    expect(passed.json.issue).toMatchObject({ keySymbol: 'CK', copyNumber: 2, control: true, holderId: pat });
    // The cut list is the one answer with the control key's bitting (restricted, audited).
    const cut = await h.call('GET', `/api/key-issues/cut-list?issueIds=${passed.json.issue.id}`, { token: lead });
    expect(cut.json.cutList).toEqual([{ keyId: ck, keySymbol: 'CK', bitting: system.control, copyNumbers: [2], quantity: 1 }]);
  });

  test('the control key cannot be changed by hand while copies of it are out: 409 naming the field, nothing changed', async () => {
    const res = await h.call('PATCH', `/api/key-systems/${systemId}`, { token: admin, body: { control: '1111111' } });
    expect(res.status).toBe(409);
    expect(res.json.error.details[0].field).toBe('control');
    expect((await loadSystem(h.db, h.sealer, systemId)).control).toBe(system.control);
  });
});

describe('a lost control key: exposure, plan, work order, close-out', () => {
  let reportId: string;
  let lostCopy: string;
  let other: string;

  test('reported lost: the exposure is every installed core of the system, removed (control), equal to brute force through keyOperates; every door, every other holder', async () => {
    const shop = await holder('Ren Shop (demo)');
    other = await holder('Sol Shop (demo)');
    lostCopy = (await issue(shop, ck)).json.issue.id;
    const otherCopy = (await issue(other, ck)).json.issue;
    const res = await h.call('POST', `/api/key-issues/${lostCopy}/report`, { token: lead, body: { kind: 'lost', note: 'Left in a van' } });
    expect(res.status, res.text).toBe(200);
    const report = res.json.report;
    reportId = report.id;
    expect(report).toMatchObject({ keyId: ck, keySymbol: 'CK', control: true, holderName: 'Ren Shop (demo)' });
    const installed = await h.db('cores').where({ key_system_id: systemId, state: 'installed' }).pluck('id');
    expect(installed.length).toBeGreaterThan(0);
    expect(asSet(report.exposure.cores)).toEqual(await bruteForce(system.control));
    expect(report.exposure.counts).toMatchObject({ cores: installed.length, control: installed.length, intended: 0 });
    const doors = await h.db('cores').whereIn('id', installed).whereNotNull('door_id').countDistinct({ n: 'door_id' }).first();
    expect(report.exposure.counts.doors).toBe(Number(doors!.n));
    // Every other holder: Sol, and Pat, who was passed CK #2 above.
    const out = await h.db('key_issues').where({ control_key_id: ck, status: 'out' }).pluck('id');
    expect(out).toContain(otherCopy.id);
    expect(report.exposure.holders.map((x: { issueId: string; status: string }) => [x.issueId, x.status]).sort()).toEqual([[lostCopy, 'lost'], ...out.map((id: string) => [id, 'out'])].sort());
    // The same answer from the key's own exposure route, and who can open a door names the other holder.
    const again = (await h.call('GET', `/api/keys/${ck}/exposure`, { token: lead })).json.exposure;
    expect(asSet(again.cores)).toEqual(asSet(report.exposure.cores));
    const door = report.exposure.cores.find((c: { doorId: string | null }) => c.doorId).doorId;
    const access = (await h.call('GET', `/api/doors/${door}/access`, { token: lead })).json.holders as { holderId: string; keySymbol: string; how: string }[];
    const ckHolders = access.filter((a) => a.keySymbol === 'CK');
    expect(ckHolders.map((a) => a.holderId).sort()).toEqual((await h.db('key_issues').where({ control_key_id: ck, status: 'out' }).pluck('holder_id')).sort());
    expect(ckHolders.every((a) => a.how === 'control')).toBe(true);
    const theirs = (await h.call('GET', `/api/holders/${other}/access`, { token: lead })).json.doors as { doorId: string; how: string }[];
    expect(new Set(theirs.map((d) => d.doorId)).size).toBe(report.exposure.counts.doors);
    expect(theirs.every((d) => d.how === 'control')).toBe(true);
  });

  test('the plan: a new control key for the system, every core built for the lost one to rebuild, its copies to re-issue; no bitting', async () => {
    const res = await h.call('GET', `/api/key-reports/${reportId}/plan`, { token: lead });
    expect(res.status, res.text).toBe(200);
    const plan = res.json.plan;
    expect(plan.lostKey).toEqual({ id: ck, symbol: 'CK', level: 'control' });
    expect(plan.newKeySymbol).toBe('CK2');
    expect(plan.choices).toEqual([expect.objectContaining({ option: 'new-control-key', blocked: null, coresToBuild: plan.coresToRepin.length, keysToReissue: 3 })]);
    const installed = await h.db('cores').where({ key_system_id: systemId, state: 'installed' }).pluck('id');
    expect(plan.coresToRepin.map((c: { coreId: string }) => c.coreId).sort()).toEqual([...installed].sort());
    expect(plan.copiesToReissue.map((c: { holderName: string }) => c.holderName).sort()).toEqual(['Pat Shop (demo)', 'Ren Shop (demo)', 'Sol Shop (demo)']);
    expect(bittingsIn(res.text, [system.control, ...system.keys.map((k) => k.bitting)])).toEqual([]);
    expect((await h.call('GET', `/api/key-reports/${reportId}/plan`, { token: tech })).status).toBe(403);
  });

  test('one step makes the work order: the new control key passes the system audit and the lost one removes and turns none of the rebuilt cores (brute force); the old one is replaced, not yet retired', async () => {
    const { profile, audit: before } = await systemAuditInputFor(h.db, h.sealer, systemId);
    const errors = (control: string) => new Set(auditSystem(profile, { ...before, control }).filter((f) => f.severity === 'error').map((f) => `${f.code}|${f.message}`));
    const wrong = await h.call('POST', `/api/key-reports/${reportId}/work-order`, { token: lead, body: { option: 'new-change-key' } });
    expect(wrong.status).toBe(409);
    expect(wrong.json.error.message).toContain('new-control-key');
    const res = await h.call('POST', `/api/key-reports/${reportId}/work-order`, { token: lead, body: { assigneeId: techId } });
    expect(res.status, res.text).toBe(201);
    expect(res.json).toMatchObject({ newKeySymbol: 'CK2' });
    const after = await loadSystem(h.db, h.sealer, systemId);
    expect(after.control).not.toBe(system.control);
    expect(after.replacedControls).toEqual({ [ck]: system.control });
    // No system audit error the old control key did not raise; no key of the system cut like it; it differs from the lost one in every chamber.
    expect([...errors(after.control)].filter((e) => !errors(system.control).has(e))).toEqual([]);
    expect(after.keys.some((k) => k.bitting === after.control)).toBe(false);
    expect([...after.control].every((d, i) => d !== system.control[i])).toBe(true);
    // Brute force over the work order's cores as they will be built: the lost control key neither removes nor turns any.
    const woCores = await h.db('work_order_cores as x').join('cores as c', 'c.id', 'x.core_id').where('x.work_order_id', res.json.workOrderId).select<{ id: string; door_id: string }[]>('c.id', 'c.door_id');
    const installed = await h.db('cores').where({ key_system_id: systemId, state: 'installed' }).pluck('door_id');
    expect(woCores.map((c) => c.door_id).sort()).toEqual([...installed].sort());
    const links = await h.db('core_keys').whereIn('core_id', woCores.map((c) => c.id)).select<{ core_id: string; key_id: string }[]>('core_id', 'key_id');
    for (const c of woCores) {
      const operating = links.filter((l) => l.core_id === c.id).map((l) => after.keys.find((k) => k.id === l.key_id)!.bitting);
      const pinning = pinCore(after.profile, { operating, control: after.control });
      expect(keyOperates(pinning, after.profile, system.control)).toMatchObject({ plug: false, control: false });
      expect(keyOperates(pinning, after.profile, after.control).control).toBe(true);
    }
    // Until they are in, the installed cores are still built for CK: the exposure says so.
    const keys = (await h.call('GET', `/api/key-systems/${systemId}/control-keys`, { token: lead })).json.controlKeys;
    expect(keys.map((k: { symbol: string; status: string }) => [k.symbol, k.status])).toEqual([['CK2', 'active'], ['CK', 'replaced']]);
    expect(asSet((await h.call('GET', `/api/keys/${ck}/exposure`, { token: lead })).json.exposure.cores)).toEqual(await bruteForce(system.control));
    expect(await bruteForce(after.control)).toEqual([]);
    const plan = (await h.call('GET', `/api/key-reports/${reportId}/plan`, { token: lead })).json.plan;
    expect(plan).toMatchObject({ workOrderId: res.json.workOrderId, chosen: 'new-control-key', newKeySymbol: 'CK2' });
    expect(bittingsIn(JSON.stringify([res.json, plan]), [system.control, after.control])).toEqual([]);
    expect((await h.call('POST', `/api/key-reports/${reportId}/work-order`, { token: lead, body: {} })).status).toBe(409);
    // Not closed by hand before its cores are in: the message says what to do.
    const early = await h.call('POST', `/api/key-reports/${reportId}/close`, { token: lead, body: { note: 'Accepting the risk' } });
    expect(early.status).toBe(409);
    expect(early.json.error.message).toContain('only after its rekey is installed');
    expect((await h.db('key_reports').where({ id: reportId }).first('status')).status).toBe('open');
  });

  test('installed through sync: the report closes and the old control key is retired; copies of the new one are issued', async () => {
    const wo = (await h.db('key_reports').where({ id: reportId }).first('work_order_id')).work_order_id as string;
    const packet = (await h.call('GET', `/api/work-orders/${wo}/packet`, { token: tech })).json.packet as Packet;
    const records = [];
    for (const core of packet.cores) {
      const old = await h.db('cores').where({ door_id: core.door!.id, state: 'installed' }).first('tag');
      records.push(completionFor(wo, core), { clientId: randomUUID(), kind: 'install', coreId: core.id, doorId: core.door!.id, removedCoreTag: old?.tag ?? null, installedAt: new Date().toISOString() });
    }
    const res = await h.call('POST', '/api/sync', { token: tech, body: { deviceId, records } });
    expect(res.status, res.text).toBe(200);
    expect(res.json.accepted).toHaveLength(records.length);
    expect(await h.db('key_reports').where({ id: reportId }).first('status')).toMatchObject({ status: 'closed' });
    const keys = (await h.call('GET', `/api/key-systems/${systemId}/control-keys`, { token: lead })).json.controlKeys;
    expect(keys.map((k: { symbol: string; status: string }) => [k.symbol, k.status])).toEqual([['CK2', 'active'], ['CK', 'retired']]);
    expect(await h.db('audit_events').where({ action: 'control-key.retired', target_id: ck }).first('id')).toBeTruthy();
    // The lost control key removes nothing now; the new one removes every installed core.
    const after = await loadSystem(h.db, h.sealer, systemId);
    expect(await bruteForce(system.control)).toEqual([]);
    expect((await h.call('GET', `/api/keys/${ck}/exposure`, { token: lead })).json.exposure.cores).toEqual([]);
    const ck2 = keys[0].id as string;
    expect(asSet((await h.call('GET', `/api/keys/${ck2}/exposure`, { token: lead })).json.exposure.cores)).toEqual(await bruteForce(after.control));
    // Every holder of a copy of CK (out, and the lost one) has a re-issue task for CK2; issuing closes it and takes the old copy back.
    const tasks = (await h.call('GET', '/api/key-reissue-tasks?status=open', { token: lead })).json.tasks as { id: string; holderId: string; oldKeySymbol: string; newKeyId: string; newKeySymbol: string; oldCopyStatus: string }[];
    const mine = tasks.filter((t) => t.oldKeySymbol === 'CK');
    expect(mine.map((t) => t.holderId).sort()).toEqual((await h.db('key_issues').where({ control_key_id: ck }).whereIn('status', ['out', 'lost']).pluck('holder_id')).sort());
    expect(mine.every((t) => t.newKeyId === ck2 && t.newKeySymbol === 'CK2')).toBe(true);
    const sol = mine.find((t) => t.holderId === other)!;
    expect(sol.oldCopyStatus).toBe('out');
    const done = await h.call('POST', `/api/key-reissue-tasks/${sol.id}/issue`, { token: lead, body: { acknowledgement: ack('Sol') } });
    expect(done.status, done.text).toBe(200);
    expect(done.json.task).toMatchObject({ status: 'done', newKeySymbol: 'CK2', newCopyNumber: 1, oldCopyStatus: 'returned' });
    expect((await issue(other, ck)).status).toBe(409);
    // A copy of the retired control key still out is taken back, not passed on.
    const pats = mine.find((t) => t.oldCopyStatus === 'out' && t.holderId !== other)!;
    const stillOut = (await h.db('key_reissue_tasks').where({ id: pats.id }).first('old_issue_id')).old_issue_id as string;
    const passOn = await h.call('POST', `/api/key-issues/${stillOut}/transfer`, { token: lead, body: { holderId: other, acknowledgement: ack('Sol') } });
    expect(passOn.status).toBe(409);
    expect(passOn.json.error.message).toContain('Key CK is retired: take CK #2 back');
    expect((await h.call('POST', `/api/key-reports/${reportId}/close`, { token: lead, body: { note: 'Again' } })).json.error.message).toContain('closed already');
  });
});
