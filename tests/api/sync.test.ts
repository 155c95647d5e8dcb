// POST /api/sync. Cases S1, S2, S3, S5, S6 of ../shared/design/reliability.md (Stripe idempotency
// keys; IETF draft "The Idempotency-Key HTTP Header Field"; PouchDB replication tests).
import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, beforeEach, describe, expect, test } from 'vitest';
import type { Packet } from '../../shared/schemas/packet';
import { completionFor, installFor, techPacket } from './factories';
import { countRows, startHarness, type Harness } from './harness';

let h: Harness;
let token: string;
let packet: Packet;
const deviceId = randomUUID();
const sync = (records: unknown[], tok = token, dev = deviceId) => h.call('POST', '/api/sync', { token: tok, body: { deviceId: dev, records } });

beforeAll(async () => {
  h = await startHarness({}, { demo: true });
});
beforeEach(async () => {
  await h.reset();
  ({ token, packet } = await techPacket(h));
});
afterAll(async () => h.close());

describe('idempotency', () => {
  test('S1: the same batch three times gives one row per client id; replies 2 and 3 match and name every record a duplicate', async () => {
    const records = packet.cores.slice(0, 3).map((c) => completionFor(packet.workOrder.id, c));
    const before = await countRows(h.db, 'completions');
    const r1 = await sync(records);
    const r2 = await sync(records);
    const r3 = await sync(records);
    expect(r1.status).toBe(200);
    expect(r1.json.accepted.sort()).toEqual(records.map((r) => r.clientId).sort());
    expect(r2.json).toEqual(r3.json);
    expect(r2.json.duplicates.sort()).toEqual(r1.json.accepted.sort());
    expect(r2.json.accepted).toEqual([]);
    expect((await countRows(h.db, 'completions')).completions).toBe(before.completions! + 3);
  });

  test('S2: the same client id with another payload is refused and the stored row stays as it was', async () => {
    const record = completionFor(packet.workOrder.id, packet.cores[0]!);
    await sync([record]);
    const stored = await h.db('completions').where({ id: record.clientId }).first();
    const changed = { ...record, notes: 'edited afterwards' };
    const res = await sync([changed]);
    expect(res.json.rejected).toEqual([expect.objectContaining({ clientId: record.clientId, error: expect.objectContaining({ code: 'conflict' }) })]);
    expect(await h.db('completions').where({ id: record.clientId }).first()).toEqual(stored);
  });

  test('S3: 20 parallel requests carrying the same record land one row', async () => {
    const record = completionFor(packet.workOrder.id, packet.cores[1]!);
    const replies = await Promise.all(Array.from({ length: 20 }, () => sync([record])));
    expect(replies.every((r) => r.status === 200)).toBe(true);
    const accepted = replies.filter((r) => r.json.accepted.includes(record.clientId)).length;
    const duplicates = replies.filter((r) => r.json.duplicates.includes(record.clientId)).length;
    expect(accepted).toBe(1);
    expect(duplicates).toBe(19);
    expect(await h.db('completions').where({ id: record.clientId }).count({ n: '*' }).first()).toEqual({ n: 1 });
  });

  test('S6: the answer lost after commit: the retry gets the stored outcome, one row', async () => {
    const record = completionFor(packet.workOrder.id, packet.cores[2]!);
    await sync([record]); // pretend this reply never reached the tablet
    const retry = await sync([record]);
    expect(retry.json.duplicates).toEqual([record.clientId]);
    expect(await h.db('completions').where({ core_id: packet.cores[2]!.id }).count({ n: '*' }).first()).toEqual({ n: 1 });
  });
});

describe('partial batches', () => {
  test('S5: record 4 of 10 invalid: 9 land, record 4 is rejected naming its field, a retry writes nothing twice', async () => {
    const cores = packet.cores;
    const records: unknown[] = Array.from({ length: 10 }, (_, i) => completionFor(packet.workOrder.id, cores[i % cores.length]!));
    (records[3] as Record<string, unknown>).finishedAt = 'yesterday';
    const first = await sync(records);
    expect(first.json.accepted).toHaveLength(9);
    expect(first.json.rejected).toHaveLength(1);
    expect(first.json.rejected[0]).toMatchObject({ index: 3, clientId: (records[3] as { clientId: string }).clientId, error: { code: 'validation' } });
    expect(first.json.rejected[0].error.message).toMatch(/finishedAt/);
    const again = await sync(records);
    expect(again.json.duplicates).toHaveLength(9);
    expect(again.json.accepted).toHaveLength(0);
    expect((await h.db('completions').count({ n: '*' }).first())!.n).toBe(9 + 14); // 14 from the demo history
  });

  test('a mixed batch (valid, duplicate, foreign core) lands the valid one only, and the foreign try is audited', async () => {
    const valid = completionFor(packet.workOrder.id, packet.cores[0]!);
    const dup = completionFor(packet.workOrder.id, packet.cores[1]!);
    await sync([dup]);
    const foreignCore = await h.db('cores as c').join('work_order_cores as x', 'x.core_id', 'c.id').join('work_orders as w', 'w.id', 'x.work_order_id').where('w.title', 'like', 'Birchwood%').first('c.id', 'w.id as woId');
    const foreign = { ...completionFor(packet.workOrder.id, packet.cores[0]!), coreId: foreignCore.id, workOrderId: foreignCore.woId };
    const before = await countRows(h.db, 'completions');
    const res = await sync([valid, dup, foreign]);
    expect(res.json.accepted).toEqual([valid.clientId]);
    expect(res.json.duplicates).toEqual([dup.clientId]);
    expect(res.json.rejected).toEqual([expect.objectContaining({ clientId: foreign.clientId, error: expect.objectContaining({ code: 'forbidden' }) })]);
    expect((await countRows(h.db, 'completions')).completions).toBe(before.completions! + 1);
    expect(await h.db('audit_events').where({ action: 'access.denied', target_id: foreign.clientId }).first('id')).toBeTruthy();
  });

  test('a body that is not a batch is a 400 and nothing is written', async () => {
    const before = await countRows(h.db, 'completions', 'installs');
    for (const body of [{ deviceId, records: [] }, { deviceId: 'tablet-1', records: [{}] }, { records: [{}] }, { deviceId, records: Array.from({ length: 101 }, () => ({})) }]) {
      const res = await h.call('POST', '/api/sync', { token, body });
      expect(res.status).toBe(400);
      expect(res.json.error.code).toBe('validation');
    }
    expect(await countRows(h.db, 'completions', 'installs')).toEqual(before);
  });
});

describe('core states, installs and mail', () => {
  test('a passed completion caps the core; an install puts it in the door and retires the removed core', async () => {
    const core = packet.cores[0]!;
    // the door holds an old core on record (T4: only the core on record in that door can be named as removed)
    const system = await h.db('cores').where({ id: core.id }).first('key_system_id');
    await h.db('cores').insert({ tag: 'OLD-1', key_system_id: system.key_system_id, door_id: core.door!.id, state: 'installed' });
    const completion = completionFor(packet.workOrder.id, core);
    const install = installFor(core, { removedCoreTag: 'OLD-1' });
    // install listed first: the server lands completions first, so one batch does both
    const res = await sync([install, completion]);
    expect(res.json.accepted.sort()).toEqual([install.clientId, completion.clientId].sort());
    expect(await h.db('cores').where({ id: core.id }).first('state', 'door_id')).toEqual({ state: 'installed', door_id: core.door!.id });
    const row = await h.db('installs').where({ id: install.clientId }).first();
    expect(row).toMatchObject({ core_id: core.id, door_id: core.door!.id, removed_core_tag: 'OLD-1' });
    expect(await h.db('cores').where({ tag: 'OLD-1' }).first('state')).toEqual({ state: 'retired' });
    expect(await h.db('work_orders').where({ id: packet.workOrder.id }).first('status')).toEqual({ status: 'in-progress' });
  });

  test('an install without a passed key check is refused: a core goes into a door only after every check passed', async () => {
    const res = await sync([installFor(packet.cores[1]!)]);
    expect(res.json.rejected[0].error.code).toBe('unprocessable');
    expect(res.json.rejected[0].error.message).toMatch(/no passed key check/);
    expect(await h.db('installs').count({ n: '*' }).first()).toEqual({ n: 14 });
  });

  test('a failed key check puts the core back to planned and mails the supervisor', async () => {
    const core = packet.cores[1]!;
    await sync([completionFor(packet.workOrder.id, core, { result: 'failed' })]);
    expect(await h.db('cores').where({ id: core.id }).first('state')).toEqual({ state: 'planned' });
    const mail = await h.mailTo('lead@demo.corewright.test');
    expect(mail.map((m) => m.subject)).toContainEqual(`Failed key check: core ${core.tag} for ${core.door!.label}`);
    const body = mail.find((m) => m.subject.startsWith('Failed'))!.text;
    expect(body).toMatch(/would not turn/);
    // no bitting in the mail: none of the packet's depths strings
    for (const c of packet.cores) expect(body).not.toContain(c.pinning.chambers.map((ch) => ch.depths[0]).join(''));
  });

  test('the last core finishing the work order marks it done and mails the supervisor', async () => {
    const records = packet.cores.map((c) => completionFor(packet.workOrder.id, c));
    const res = await sync(records);
    expect(res.json.accepted).toHaveLength(packet.cores.length);
    expect(await h.db('work_orders').where({ id: packet.workOrder.id }).first('status')).toEqual({ status: 'done' });
    const mail = await h.mailTo('lead@demo.corewright.test');
    expect(mail.some((m) => m.subject === `Work order #${packet.workOrder.number} finished: ${packet.workOrder.title}`)).toBe(true);
  });

  test('a revoked tablet is told to wipe itself and lands nothing', async () => {
    const dev = randomUUID();
    const onTablet = await h.call('POST', '/api/auth/sign-in', { body: { email: 'tech@demo.corewright.test', password: 'corewright-demo', deviceId: dev } });
    await sync([completionFor(packet.workOrder.id, packet.cores[0]!)], token, dev);
    const admin = await h.tokenFor('admin');
    expect((await h.call('POST', `/api/devices/${dev}/revoke`, { token: admin })).status).toBe(200);
    // the tablet's own session learns it was revoked (403 device-revoked), on any route and on refresh
    const told = await h.call('GET', '/api/work-orders?mine=1', { token: onTablet.json.accessToken });
    expect(told.status).toBe(403);
    expect(told.json.error.code).toBe('device-revoked');
    const refresh = await h.call('POST', '/api/auth/refresh', { body: { refreshToken: onTablet.json.refreshToken } });
    expect(refresh.json.error.code).toBe('device-revoked');
    // revoking the device ended its sessions too: sign in again and try
    const fresh = (await h.signIn('tech@demo.corewright.test')).accessToken;
    const before = await countRows(h.db, 'completions');
    const res = await sync([completionFor(packet.workOrder.id, packet.cores[1]!)], fresh, dev);
    expect(res.json.deviceRevoked).toBe(true);
    expect(res.json.rejected[0].error.code).toBe('device-revoked');
    expect(await countRows(h.db, 'completions')).toEqual(before);
    const escrow = await h.call('POST', '/api/devices/escrow', { token: fresh, body: { deviceId: dev } });
    expect(escrow.status).toBe(403);
    expect(escrow.json.error.code).toBe('device-revoked');
  });

  test('the office sees what a tablet still holds: its outbox count less what landed', async () => {
    const dev = randomUUID();
    const records = packet.cores.slice(0, 2).map((c) => completionFor(packet.workOrder.id, c));
    const res = await h.call('POST', '/api/sync', { token, body: { deviceId: dev, records, outbox: { waiting: 7 } } });
    expect(res.json.accepted).toHaveLength(2);
    expect(await h.db('devices').where({ id: dev }).first('last_sync_waiting')).toEqual({ last_sync_waiting: 5 });
    const bad = await h.call('POST', '/api/sync', { token, body: { deviceId: dev, records, outbox: { waiting: -1 } } });
    expect(bad.status).toBe(400);
    expect(bad.json.error.details[0].field).toBe('outbox.waiting');
  });

  test('the escrow key is stable per device and refused to another user', async () => {
    const dev = randomUUID();
    const a = await h.call('POST', '/api/devices/escrow', { token, body: { deviceId: dev, label: 'Bench tablet 2' } });
    const b = await h.call('POST', '/api/devices/escrow', { token, body: { deviceId: dev } });
    expect(a.status).toBe(200);
    expect(Buffer.from(a.json.escrowKey, 'base64')).toHaveLength(32);
    expect(b.json.escrowKey).toBe(a.json.escrowKey);
    const other = await h.call('POST', '/api/devices/escrow', { token: await h.tokenFor('supervisor'), body: { deviceId: dev } });
    expect(other.status).toBe(403);
    const raw = await h.db.raw('select d::text as row from devices d');
    expect(raw.rows.map((r: { row: string }) => r.row).join(' ')).not.toContain(a.json.escrowKey);
  });
});
