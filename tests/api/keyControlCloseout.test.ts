// Key control, restoring control after a lost key: the report's work order is built and installed
// through the normal sync path (the server is the authority), and the install that finishes it
// retires the old key(s), gives every holder of a copy a re-issue task and closes the report, in
// the same transaction; a replayed batch changes nothing (reliability.md S1: idempotent replay).
// The office closes a task by issuing the new key. Source: the primer's "Key control" (lost keys,
// re-issue) and common practice (the old key is retired once no core takes it).
import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { keyOperates, pinCore } from '../../shared/keying';
import { loadSystem } from '../../server/services/keySystems';
import { buildAndInstallRecords } from './factories';
import { startHarness, type Harness } from './harness';

let h: Harness;
let lead: string;
let tech: string;
let techId: string;
const deviceId = randomUUID();
const keyIdOf = async (symbol: string) => (await h.db('keys').where({ symbol }).first('id')).id as string;
const ack = { name: 'Holder (demo)', accepted: true };

beforeAll(async () => {
  h = await startHarness({}, { demo: true });
  lead = await h.tokenFor('supervisor');
  tech = await h.tokenFor('technician');
  techId = (await h.db('users').where({ email: 'tech@demo.corewright.test' }).first('id')).id;
});
afterAll(async () => h.close());

const recordsFor = (workOrderId: string) => buildAndInstallRecords(h, tech, workOrderId);
const sync = (records: unknown[]) => h.call('POST', '/api/sync', { token: tech, body: { deviceId, records } });

async function report(reportId: string) {
  return h.db('key_reports').where({ id: reportId }).first('status', 'closed_at');
}

describe('a lost change key: installed, retired, re-issued, closed', () => {
  test('the last install closes the report: the old key retired, a re-issue task for each holder of a copy, once, even when the batch is replayed', async () => {
    // The demo's open report: Cass's copy of AB7, lost. Two more holders have a copy.
    const reportId = (await h.db('key_reports').first('id')).id as string;
    const ab7 = await keyIdOf('AB7');
    const other = (await h.call('POST', '/api/holders', { token: lead, body: { name: 'Second AB7 holder (demo)', department: 'Library Services' } })).json.holder.id;
    const otherIssue = (await h.call('POST', '/api/key-issues', { token: lead, body: { holderId: other, keyId: ab7, acknowledgement: ack } })).json.issue;
    const third = (await h.call('POST', '/api/holders', { token: lead, body: { name: 'Third AB7 holder (demo)', department: 'Library Services' } })).json.holder.id;
    const thirdCopy = (await h.call('POST', '/api/key-issues', { token: lead, body: { holderId: third, keyId: ab7, acknowledgement: ack } })).json.issue.id as string;
    const made = await h.call('POST', `/api/key-reports/${reportId}/work-order`, { token: lead, body: { assigneeId: techId } });
    expect(made.status, made.text).toBe(201);
    // The third copy is reported stolen while the rekey is under way: no second rekey; it closes with the first.
    const second = await h.call('POST', `/api/key-issues/${thirdCopy}/report`, { token: lead, body: { kind: 'stolen' } });
    expect(second.status, second.text).toBe(200);
    const refused = await h.call('POST', `/api/key-reports/${second.json.report.id}/work-order`, { token: lead, body: {} });
    expect(refused.status).toBe(409);
    expect(refused.json.error.message).toMatch(/being rekeyed already by work order #\d+/);
    const recs = await recordsFor(made.json.workOrderId);
    expect(recs.length).toBeGreaterThan(0);

    // Built but not installed: the report stays open and the old key is only lost.
    expect((await sync(recs.map((r) => r.completion))).json.accepted).toHaveLength(recs.length);
    expect(await report(reportId)).toMatchObject({ status: 'open', closed_at: null });
    const [last, ...first] = recs.reverse();
    if (first.length) {
      expect((await sync(first.map((r) => r.install))).json.accepted).toHaveLength(first.length);
      expect((await report(reportId))!.status).toBe('open');
    }

    const batch = [last!.install];
    const landed = await sync(batch);
    expect(landed.json.accepted).toEqual([last!.install.clientId]);
    const closed = await report(reportId);
    expect(closed).toMatchObject({ status: 'closed' });
    expect(closed!.closed_at).not.toBeNull();
    const system = await loadSystem(h.db, h.sealer, (await h.db('key_systems').first('id')).id);
    expect(system.keys.find((k) => k.id === ab7)!.status).toBe('retired');
    const tasks = (await h.call('GET', '/api/key-reissue-tasks?status=open', { token: lead })).json.tasks as { id: string; holderName: string; oldKeySymbol: string; oldCopyStatus: string; newKeySymbol: string; newKeyId: string }[];
    const mine = tasks.filter((t) => t.oldKeySymbol === 'AB7');
    expect(mine.map((t) => [t.holderName, t.oldCopyStatus]).sort()).toEqual([['Cass Moreno (demo)', 'lost'], ['Second AB7 holder (demo)', 'out'], ['Third AB7 holder (demo)', 'stolen']]);
    expect((await report(second.json.report.id))!.status).toBe('closed');
    expect(new Set(mine.map((t) => t.newKeySymbol))).toEqual(new Set([made.json.newKeySymbol]));
    // No bitting in the tasks.
    for (const b of [system.control, ...system.keys.map((k) => k.bitting)]) expect(JSON.stringify(tasks).includes(b)).toBe(false);

    // Replayed: duplicates, and nothing changes (one closing event, the same tasks, the same close time).
    const again = await sync(batch);
    expect(again.json.accepted).toEqual([]);
    expect(again.json.duplicates).toEqual([last!.install.clientId]);
    expect(await report(reportId)).toEqual(closed);
    expect(Number((await h.db('key_reissue_tasks').where({ report_id: reportId }).count({ n: '*' }).first())!.n)).toBe(3);
    expect(Number((await h.db('audit_events').where({ action: 'key-report.closed' }).whereIn('target_id', [reportId, second.json.report.id]).count({ n: '*' }).first())!.n)).toBe(2);

    // The office closes a task by issuing the new key; the old copy still out comes back.
    const task = mine.find((t) => t.oldCopyStatus === 'out')!;
    const done = await h.call('POST', `/api/key-reissue-tasks/${task.id}/issue`, { token: lead, body: { acknowledgement: ack } });
    expect(done.status, done.text).toBe(200);
    expect(done.json.task).toMatchObject({ status: 'done', newCopyNumber: 1, oldCopyStatus: 'returned' });
    expect((await h.db('key_issues').where({ id: otherIssue.id }).first('status')).status).toBe('returned');
    expect(Number((await h.db('key_issues').where({ holder_id: other, key_id: task.newKeyId, status: 'out' }).count({ n: '*' }).first())!.n)).toBe(1);
    const twice = await h.call('POST', `/api/key-reissue-tasks/${task.id}/issue`, { token: lead, body: { acknowledgement: ack } });
    expect(twice.status).toBe(409);
    expect(Number((await h.db('key_issues').where({ key_id: task.newKeyId }).count({ n: '*' }).first())!.n)).toBe(1);
    const bad = await h.call('POST', `/api/key-reissue-tasks/${mine.find((t) => t.oldCopyStatus === 'lost')!.id}/issue`, { token: lead, body: { acknowledgement: { name: 'X', accepted: false } } });
    expect(bad.status).toBe(400);
    expect(bad.json.error.details[0].field).toMatch(/acknowledgement/);
  });
});

describe('a lost master: every key under it retired once the rekey is installed', () => {
  test('rekey under the master: the master and its change keys retire, every holder of their copies gets a task, the report closes', async () => {
    const ad = await keyIdOf('AB');
    const holder = (await h.call('POST', '/api/holders', { token: lead, body: { name: 'AB holder (demo)', department: 'Facilities' } })).json.holder.id;
    const issue = (await h.call('POST', '/api/key-issues', { token: lead, body: { holderId: holder, keyId: ad, acknowledgement: ack } })).json.issue;
    const reportId = (await h.call('POST', `/api/key-issues/${issue.id}/report`, { token: lead, body: { kind: 'stolen' } })).json.report.id;
    const made = await h.call('POST', `/api/key-reports/${reportId}/work-order`, { token: lead, body: { option: 'rekey-under-master', assigneeId: techId } });
    expect(made.status, made.text).toBe(201);
    const children = (await h.db('keys').where({ parent_id: ad }).pluck('id')) as string[];
    const recs = await recordsFor(made.json.workOrderId);
    const res = await sync(recs.flatMap((r) => [r.completion, r.install]));
    expect(res.json.rejected, JSON.stringify(res.json.rejected)).toEqual([]);
    expect((await report(reportId))!.status).toBe('closed');
    const statuses = (await h.db('keys').whereIn('id', [ad, ...children]).pluck('status')) as string[];
    expect(new Set(statuses)).toEqual(new Set(['retired']));
    const out = (await h.db('key_issues').whereIn('key_id', [ad, ...children]).where('status', 'out').count({ n: '*' }).first())!.n;
    const tasks = (await h.db('key_reissue_tasks').where({ report_id: reportId }).count({ n: '*' }).first())!.n;
    // Every copy still out of AB or a key under it, and the stolen copy itself.
    expect(Number(tasks)).toBe(Number(out) + 1);
  });
});

describe('a lost master keyed straight to its doors: re-mastered', () => {
  test('a new master in its place, the cores rebuilt for it; brute force: the old master turns none of them; installed: the old master retired, the report closed', async () => {
    const admin = await h.tokenFor('admin');
    const system = await loadSystem(h.db, h.sealer, (await h.db('key_systems').first('id')).id);
    // A store-room master under the grand master (chambers 1-2 progressed, as AA to AD), keying one door by itself.
    const added = await h.call('POST', `/api/key-systems/${system.id}/keys`, { token: admin, body: { symbol: 'AX', level: 'master', parentId: await keyIdOf('A'), bitting: '8828462' } });
    expect(added.status, added.text).toBe(201);
    const ax = await keyIdOf('AX');
    const door = await h.call('POST', '/api/doors', { token: admin, body: { site: 'Quillon Hill College', building: 'Cinder Works', floor: '1', room: 'ST1', label: 'CW-ST1', keySystemId: system.id, keyId: ax } });
    expect(door.status, door.text).toBe(201);
    const first = await h.call('POST', '/api/work-orders', { token: lead, body: { title: 'Store room core', purpose: 'maintenance', keySystemId: system.id, assigneeId: techId, doors: [{ doorId: door.json.door.id, keyId: ax }] } });
    expect(first.status, first.text).toBe(201);
    const built = await recordsFor(first.json.workOrder.id);
    expect((await sync(built.flatMap((r) => [r.completion, r.install]))).json.rejected).toEqual([]);

    const holder = (await h.call('POST', '/api/holders', { token: lead, body: { name: 'Store room holder (demo)', department: 'Facilities' } })).json.holder.id;
    const issue = (await h.call('POST', '/api/key-issues', { token: lead, body: { holderId: holder, keyId: ax, acknowledgement: ack } })).json.issue;
    const reportId = (await h.call('POST', `/api/key-issues/${issue.id}/report`, { token: lead, body: { kind: 'lost' } })).json.report.id;
    const plan = (await h.call('GET', `/api/key-reports/${reportId}/plan`, { token: lead })).json.plan;
    expect(plan.choices.map((c: { option: string; blocked: string | null }) => [c.option, c.blocked])).toEqual([['re-master', null], ['rekey-under-master', null]]);
    const made = await h.call('POST', `/api/key-reports/${reportId}/work-order`, { token: lead, body: { option: 're-master', assigneeId: techId } });
    expect(made.status, made.text).toBe(201);
    expect(made.json.plan.chosen).toBe('re-master');

    const after = await loadSystem(h.db, h.sealer, system.id);
    const fresh = after.keys.find((k) => k.id === made.json.newKeyId)!;
    expect(fresh).toMatchObject({ level: 'master', parentId: await keyIdOf('A'), status: 'active' });
    expect((await h.db('doors').where({ id: door.json.door.id }).first('key_id')).key_id).toBe(fresh.id);
    const oldBitting = '8828462';
    const cores = (await h.db('work_order_cores').where({ work_order_id: made.json.workOrderId }).pluck('core_id')) as string[];
    expect(cores).toHaveLength(1);
    for (const core of cores) {
      const operating = (await h.db('core_keys').where({ core_id: core }).pluck('key_id')) as string[];
      const pinning = pinCore(after.profile, { operating: operating.map((id) => after.keys.find((k) => k.id === id)!.bitting), control: after.control });
      expect(keyOperates(pinning, after.profile, oldBitting).plug).toBe(false);
      expect(keyOperates(pinning, after.profile, fresh.bitting).plug).toBe(true);
    }

    const rebuilt = await recordsFor(made.json.workOrderId);
    expect((await sync(rebuilt.flatMap((r) => [r.completion, r.install]))).json.rejected).toEqual([]);
    expect((await report(reportId))!.status).toBe('closed');
    expect((await h.db('keys').where({ id: ax }).first('status')).status).toBe('retired');
    const tasks = await h.db('key_reissue_tasks').where({ report_id: reportId }).select<{ holder_id: string; new_key_id: string }[]>('holder_id', 'new_key_id');
    expect(tasks).toEqual([{ holder_id: holder, new_key_id: fresh.id }]);
  });
});

describe('a rekey work order cancelled', () => {
  test('nothing closes; the report offers the step again and a new work order rebuilds the cores for the same new key; installed, it closes', async () => {
    // A change key in use: pinned into an installed core (the tests above rekeyed AB's branch, so ask the records).
    const key = (await h.db('core_keys as ck').join('cores as c', 'c.id', 'ck.core_id').join('keys as k', 'k.id', 'ck.key_id').where({ 'c.state': 'installed', 'k.level': 'change', 'k.status': 'active' }).orderBy('k.symbol').first('k.id')).id as string;
    const holder = (await h.call('POST', '/api/holders', { token: lead, body: { name: 'Change key holder (demo)', department: 'Facilities' } })).json.holder.id;
    const issue = (await h.call('POST', '/api/key-issues', { token: lead, body: { holderId: holder, keyId: key, acknowledgement: ack } })).json.issue;
    const reportId = (await h.call('POST', `/api/key-issues/${issue.id}/report`, { token: lead, body: { kind: 'lost' } })).json.report.id;
    const made = await h.call('POST', `/api/key-reports/${reportId}/work-order`, { token: lead, body: { assigneeId: techId } });
    expect(made.status, made.text).toBe(201);
    expect((await h.call('POST', `/api/key-reports/${reportId}/work-order`, { token: lead, body: {} })).status).toBe(409);
    const cancel = await h.call('PATCH', `/api/work-orders/${made.json.workOrderId}`, { token: lead, body: { status: 'cancelled' } });
    expect(cancel.status, cancel.text).toBe(200);
    expect((await report(reportId))!.status).toBe('open');
    expect((await h.call('GET', `/api/key-reports/${reportId}/plan`, { token: lead })).json.plan.workOrderId).toBeNull();

    const again = await h.call('POST', `/api/key-reports/${reportId}/work-order`, { token: lead, body: { assigneeId: techId } });
    expect(again.status, again.text).toBe(201);
    expect(again.json.workOrderId).not.toBe(made.json.workOrderId);
    expect([again.json.newKeyId, again.json.newKeySymbol]).toEqual([made.json.newKeyId, made.json.newKeySymbol]);
    const recs = await recordsFor(again.json.workOrderId);
    expect((await sync(recs.flatMap((r) => [r.completion, r.install]))).json.rejected).toEqual([]);
    expect((await report(reportId))!.status).toBe('closed');
    expect((await h.db('keys').where({ id: key }).first('status')).status).toBe('retired');
  });
});
