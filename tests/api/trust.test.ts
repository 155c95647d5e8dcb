// Trust: the server decides what a synced record means. Cases T2 (sync part), T3, T4, T5, T9 and
// the duplicate-access part of T10 of ../shared/design/reliability.md. References beside each case.
import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, beforeEach, describe, expect, test } from 'vitest';
import type { Packet, PacketCore } from '../../shared/schemas/packet';
import type { CompletionRecord } from '../../shared/schemas/sync';
import { openPinSizes } from '../../server/services/pinSizes';
import { completionFor, installFor, techPacket } from './factories';
import { countRows, startHarness, type Harness } from './harness';

let h: Harness;
let token: string;
let packet: Packet;
const deviceId = randomUUID();
const sync = (records: unknown[], tok = token, dev = deviceId) => h.call('POST', '/api/sync', { token: tok, body: { deviceId: dev, records } });
const stateOf = async (coreId: string) => (await h.db('cores').where({ id: coreId }).first<{ state: string }>('state')).state;
const wo = () => packet.workOrder.id;

beforeAll(async () => {
  h = await startHarness({}, { demo: true });
});
beforeEach(async () => {
  await h.reset();
  ({ token, packet } = await techPacket(h));
});
afterAll(async () => h.close());

/** A record claiming "passed" whose last attempt is replaced by `attempt`. */
function claimPassed(core: PacketCore, change: (a: CompletionRecord['attempts'][number]) => CompletionRecord['attempts'][number]): CompletionRecord {
  const r = completionFor(wo(), core);
  return { ...r, attempts: [change(r.attempts[0]!)] };
}

describe('T2 a NUL byte in one sync record (PostgreSQL docs: text cannot hold NUL)', () => {
  test('only that record is rejected, naming its field; the others land and the batch is a 200', async () => {
    const [a, b, c] = packet.cores.slice(0, 3).map((core) => completionFor(wo(), core));
    const badNote = { ...b!, notes: 'set aside\u0000bad' };
    const res = await sync([a, badNote, c]);
    expect(res.status).toBe(200);
    expect(res.json.accepted.sort()).toEqual([a!.clientId, c!.clientId].sort());
    expect(res.json.rejected).toHaveLength(1);
    expect(res.json.rejected[0]).toMatchObject({ index: 1, clientId: b!.clientId, error: { code: 'validation' } });
    expect(res.json.rejected[0].error.details[0].field).toBe('notes');
  });

  test('a NUL in a key-check note inside the attempts and in an install tag: rejected alone, naming the nested field', async () => {
    const core = packet.cores[0]!;
    const r = completionFor(wo(), core, { result: 'failed' });
    r.attempts[0]!.keyChecks[0]!.note = 'would not\u0000turn';
    const install = { ...installFor(packet.cores[1]!), removedCoreTag: 'CR\u00001' };
    const ok = completionFor(wo(), packet.cores[2]!);
    const res = await sync([r, install, ok]);
    expect(res.status).toBe(200);
    expect(res.json.accepted).toEqual([ok.clientId]);
    expect(res.json.rejected.map((x: { index: number; error: { details: { field: string }[] } }) => [x.index, x.error.details[0]!.field])).toEqual([
      [0, 'attempts.0.keyChecks.0.note'],
      [1, 'removedCoreTag'],
    ]);
  });
});

describe('T3 the server derives the result (ASVS 5 V2 business logic; key control: a failed test is recorded, not hidden)', () => {
  test('"passed" with its only key check failed is not landed; the answer names what is missing; an install is then refused', async () => {
    const core = packet.cores[0]!;
    const failed = completionFor(wo(), core, { result: 'failed' });
    const claim: CompletionRecord = { ...failed, result: 'passed', attempts: [{ ...failed.attempts[0]!, result: 'passed' }] };
    const res = await sync([claim]);
    expect(res.json.accepted).toEqual([]);
    expect(res.json.rejected[0]).toMatchObject({ clientId: claim.clientId, error: { code: 'unprocessable' } });
    expect(res.json.rejected[0].error.message).toMatch(/cannot be recorded as passed/);
    expect(res.json.rejected[0].error.message).toMatch(/failed key check/);
    expect(res.json.rejected[0].error.message).toMatch(/after capping/);
    expect(await h.db('completions').where({ id: claim.clientId }).first('id')).toBeUndefined();
    expect(await stateOf(core.id)).toBe('planned');
    const install = await sync([installFor(core)]);
    expect(install.json.rejected[0].error.message).toMatch(/no passed key check/);
    expect(await stateOf(core.id)).toBe('planned');
  });

  test('"passed" with no steps and no key checks is refused, naming the parts and the keys', async () => {
    const core = packet.cores[1]!;
    const res = await sync([claimPassed(core, (a) => ({ ...a, steps: [], keyChecks: [] }))]);
    expect(res.json.accepted).toEqual([]);
    const msg: string = res.json.rejected[0].error.message;
    expect(msg).toMatch(/parts of the chart not loaded/);
    expect(msg).toMatch(/the control key releasing before capping/);
    expect(msg).toMatch(/that must not turn, tried before capping/);
    expect(msg).toContain(core.keyCheck.find((k) => k.role === 'change')!.symbol);
    expect(await stateOf(core.id)).toBe('planned');
  });

  test('every key passed before capping but none after capping: refused, "after capping" named', async () => {
    const core = packet.cores[2]!;
    const res = await sync([claimPassed(core, (a) => ({ ...a, keyChecks: a.keyChecks.filter((k) => k.phase === 'before-cap') }))]);
    expect(res.json.rejected[0].error.message).toMatch(/turning after capping/);
    expect(res.json.rejected[0].error.message).not.toMatch(/before capping/);
  });

  test('a "must-not-turn" check naming a key that does turn the core (its own master) does not count', async () => {
    const core = packet.cores[0]!;
    const master = core.keyCheck.find((k) => k.role === 'master')!.symbol;
    const res = await sync([claimPassed(core, (a) => ({ ...a, keyChecks: a.keyChecks.map((k) => (k.role === 'must-not-turn' ? { ...k, symbol: master } : k)) }))]);
    expect(res.json.rejected[0].error.message).toMatch(/that must not turn, tried before capping/);
  });

  test('every must-not-turn key of the plan is tried: leaving one out is refused', async () => {
    const core = packet.cores[0]!;
    const outsiders = core.keyCheck.filter((k) => k.role === 'must-not-turn');
    expect(outsiders.length).toBeGreaterThanOrEqual(1);
    const dropped = outsiders[outsiders.length - 1]!.symbol;
    const res = await sync([claimPassed(core, (a) => ({ ...a, keyChecks: a.keyChecks.filter((k) => k.symbol !== dropped) }))]);
    expect(res.json.rejected[0].error.message).toMatch(/must not turn, tried before capping/);
  });

  test('parts of the wrong size are not the chart: refused naming the chamber', async () => {
    const core = packet.cores[0]!;
    const res = await sync([claimPassed(core, (a) => ({ ...a, steps: a.steps.map((s) => (s.kind === 'top' && s.chamber === 1 ? { ...s, size: (s.size ?? 0) + 1 } : s)) }))]);
    expect(res.json.rejected[0].error.message).toMatch(/1 part of the chart not loaded \(chamber 1 top pin\)/);
  });

  test('the result comes from the LAST attempt: passed then failed is refused as "passed"', async () => {
    const core = packet.cores[0]!;
    const good = completionFor(wo(), core);
    const bad = completionFor(wo(), core, { result: 'failed' });
    const res = await sync([{ ...good, attempts: [good.attempts[0]!, { ...bad.attempts[0]!, n: 2 }] }]);
    expect(res.json.rejected[0].error.message).toMatch(/attempt 2, the last one, is marked failed/);
  });

  test('a failed completion is evidence and lands as failed; a rebuild that passed on its second attempt lands as passed', async () => {
    const [a, b] = packet.cores;
    const failed = completionFor(wo(), a!, { result: 'failed' });
    const second = completionFor(wo(), b!, { failFirst: true });
    const res = await sync([failed, second]);
    expect(res.json.accepted.sort()).toEqual([failed.clientId, second.clientId].sort());
    expect(await h.db('completions').whereIn('id', [failed.clientId, second.clientId]).orderBy('result').pluck('result')).toEqual(['failed', 'passed']);
    expect(await stateOf(a!.id)).toBe('planned');
    expect(await stateOf(b!.id)).toBe('capped');
  });
});

describe('T5 history, not arrival order (CouchDB replication: state follows the revisions, not their arrival)', () => {
  test('an older failed completion syncing after a newer passed one leaves the core capped and the work order counts right', async () => {
    const core = packet.cores[0]!;
    const hourAgo = new Date(Date.now() - 60 * 60_000);
    const older = completionFor(wo(), core, { result: 'failed', at: new Date(hourAgo.getTime() - 30 * 60_000) });
    const newer = completionFor(wo(), core, { at: hourAgo });
    expect((await sync([newer])).json.accepted).toEqual([newer.clientId]);
    expect((await sync([older])).json.accepted).toEqual([older.clientId]);
    expect(await stateOf(core.id)).toBe('capped');
    const lead = await h.tokenFor('supervisor');
    const detail = (await h.call('GET', `/api/work-orders/${wo()}`, { token: lead })).json.workOrder;
    expect(detail).toMatchObject({ doneCount: 1, failedCount: 0 });
    // and in one batch, the older listed last: the same
    const core2 = packet.cores[1]!;
    const n2 = completionFor(wo(), core2, { at: hourAgo });
    const o2 = completionFor(wo(), core2, { result: 'failed', at: new Date(hourAgo.getTime() - 30 * 60_000) });
    await sync([n2, o2]);
    expect(await stateOf(core2.id)).toBe('capped');
  });

  test('finishedAt more than 10 minutes ahead of the server clock is refused naming the field; 5 minutes ahead is tablet drift and lands', async () => {
    const ahead = completionFor(wo(), packet.cores[0]!, { at: new Date(Date.now() - 16 * 60_000 + 11 * 60_000) });
    const drift = completionFor(wo(), packet.cores[1]!, { at: new Date(Date.now() - 16 * 60_000 + 5 * 60_000) });
    const res = await sync([ahead, drift]);
    expect(res.json.accepted).toEqual([drift.clientId]);
    expect(res.json.rejected[0]).toMatchObject({ clientId: ahead.clientId, error: { code: 'validation', details: [{ field: 'finishedAt' }] } });
    expect(res.json.rejected[0].error.message).toMatch(/ahead of the server clock/);
  });

  test('a completion dated before its work order existed is refused; received_at is the server\'s own time', async () => {
    const created = new Date((await h.db('work_orders').where({ id: wo() }).first('created_at')).created_at);
    const before = completionFor(wo(), packet.cores[0]!, { at: new Date(created.getTime() - 24 * 3600_000) });
    const fine = completionFor(wo(), packet.cores[1]!, { at: new Date(created.getTime() + 3600_000) });
    const t0 = Date.now();
    const res = await sync([before, fine]);
    expect(res.json.accepted).toEqual([fine.clientId]);
    expect(res.json.rejected[0].error.message).toMatch(/before work order #\d+ existed/);
    const row = await h.db('completions').where({ id: fine.clientId }).first('received_at', 'finished_at');
    expect(new Date(row.received_at).getTime()).toBeGreaterThanOrEqual(t0 - 1000);
    expect(new Date(row.finished_at).toISOString()).toBe(fine.finishedAt);
  });

  test('an install dated far in the future is refused, nothing installed', async () => {
    const core = packet.cores[0]!;
    await sync([completionFor(wo(), core)]);
    const install = { ...installFor(core), installedAt: new Date(Date.now() + 3 * 24 * 3600_000).toISOString() };
    const res = await sync([install]);
    expect(res.json.rejected[0]).toMatchObject({ error: { code: 'validation', details: [{ field: 'installedAt' }] } });
    expect(await stateOf(core.id)).toBe('capped');
  });
});

describe('T4 installs go where the pinning says (ASVS 5 8.2.2; the engine\'s keyOperates)', () => {
  async function built(core: PacketCore) {
    const res = await sync([completionFor(wo(), core)]);
    expect(res.json.accepted).toHaveLength(1);
  }

  test('a door of the work order whose key does not operate the core is refused; nothing installed or retired', async () => {
    const [a, b] = packet.cores;
    await built(a!);
    const res = await sync([{ ...installFor(a!), doorId: b!.door!.id, mismatchReason: 'label fell off' }]);
    expect(res.json.rejected[0].error.code).toBe('unprocessable');
    expect(res.json.rejected[0].error.message).toMatch(new RegExp(`The key of door ${b!.door!.label} \\(\\w+\\) does not operate core ${a!.tag}`));
    expect(await h.db('cores').where({ id: a!.id }).first('state', 'door_id')).toEqual({ state: 'capped', door_id: a!.door!.id });
    expect((await countRows(h.db, 'installs')).installs).toBe(14);
  });

  test('naming as "removed" a core installed in someone else\'s door is refused and that core stays installed', async () => {
    const core = packet.cores[0]!;
    await built(core);
    const elsewhere = await h.db('cores').where({ state: 'installed' }).first('id', 'tag');
    const res = await sync([installFor(core, { removedCoreTag: elsewhere.tag })]);
    expect(res.json.rejected[0].error.message).toMatch(/has no core on record/);
    expect(await stateOf(elsewhere.id)).toBe('installed');
    expect(await stateOf(core.id)).toBe('capped');
  });

  test('the core on record in the door must be named as removed; naming it retires exactly that core', async () => {
    const core = packet.cores[0]!;
    await built(core);
    const system = await h.db('cores').where({ id: core.id }).first('key_system_id');
    const [old] = await h.db('cores').insert({ tag: 'OLD-1', key_system_id: system.key_system_id, door_id: core.door!.id, planned_door_id: core.door!.id, state: 'installed' }).returning('id');
    const none = await sync([installFor(core)]);
    expect(none.json.rejected[0].error.message).toMatch(new RegExp(`holds core OLD-1 on record`));
    const named = installFor(core, { removedCoreTag: 'old-1' });
    expect((await sync([named])).json.accepted).toEqual([named.clientId]);
    expect(await h.db('cores').where({ id: old.id }).first('state', 'door_id')).toEqual({ state: 'retired', door_id: null });
    expect(await h.db('installs').where({ id: named.clientId }).first('removed_core_id', 'door_mismatch')).toEqual({ removed_core_id: old.id, door_mismatch: false });
  });

  test('another door whose key operates the core: refused without a reason, landed with one as a mismatch the office sees and a supervisor marks reviewed (audited)', async () => {
    const core = packet.cores[0]!;
    await built(core);
    const admin = await h.tokenFor('admin');
    const lead = await h.tokenFor('supervisor');
    // A store room keyed to the master of this core's chain: the master turns the core.
    const systemId = (await h.db('cores').where({ id: core.id }).first('key_system_id')).key_system_id;
    const masterSym = core.keyCheck.find((k) => k.role === 'master' && k.level === 'master')!.symbol;
    const master = await h.db('keys').where({ key_system_id: systemId, symbol: masterSym }).first('id');
    const door = await h.call('POST', '/api/doors', { token: admin, body: { site: 'Quillon Hill College', building: 'Aster Hall', floor: '2', room: '2S', label: 'AH-2STORE', keySystemId: systemId, keyId: master.id } });
    expect(door.status).toBe(201);
    const doorId = door.json.door.id as string;

    const bare = { ...installFor(core), doorId };
    const refused = await sync([bare]);
    expect(refused.json.rejected[0]).toMatchObject({ error: { code: 'validation', details: [{ field: 'mismatchReason' }] } });
    const install = { ...installFor(core), doorId, mismatchReason: 'Lab 207 door is being replaced; store room first' };
    expect((await sync([install])).json.accepted).toEqual([install.clientId]);
    expect(await h.db('cores').where({ id: core.id }).first('state', 'door_id')).toEqual({ state: 'installed', door_id: doorId });

    // The office: completion log (and CSV), completion detail, door history, work order, Overview list.
    const log = (await h.call('GET', `/api/completions?coreId=${core.id}`, { token: lead })).json.rows[0];
    expect(log).toMatchObject({ doorLabel: core.door!.label, installDoorLabel: 'AH-2STORE', doorMismatch: true, removedCoreTag: null, installedAt: install.installedAt });
    const csv = await h.call('GET', `/api/completions.csv?coreId=${core.id}`, { token: lead });
    expect(csv.text).toMatch(/installDoorLabel,installedAt,removedCoreTag,doorMismatch/);
    expect(csv.text).toMatch(/AH-2STORE,[^,]+,,yes/);
    const detail = (await h.call('GET', `/api/completions/${log.id}`, { token: lead })).json.completion;
    expect(detail.install).toMatchObject({ doorLabel: 'AH-2STORE', plannedDoorLabel: core.door!.label, doorMismatch: true, mismatchReason: install.mismatchReason, reviewedAt: null });
    const history = (await h.call('GET', `/api/doors/${doorId}/history`, { token: lead })).json.history;
    expect(history[0]).toMatchObject({ coreTag: core.tag, doorMismatch: true, plannedDoorLabel: core.door!.label });
    const woCores = (await h.call('GET', `/api/work-orders/${wo()}`, { token: lead })).json.cores;
    expect(woCores.find((c: { id: string }) => c.id === core.id)).toMatchObject({ doorLabel: 'AH-2STORE', plannedDoorLabel: core.door!.label, doorMismatch: true });
    const open = (await h.call('GET', '/api/installs/mismatches', { token: lead })).json.mismatches;
    expect(open).toEqual([expect.objectContaining({ id: install.clientId, coreTag: core.tag, doorLabel: 'AH-2STORE', plannedDoorLabel: core.door!.label, reason: install.mismatchReason })]);

    // Only the office marks it reviewed; the review is audited and clears the flag.
    expect((await h.call('POST', `/api/installs/${install.clientId}/review`, { token })).status).toBe(403);
    const review = await h.call('POST', `/api/installs/${install.clientId}/review`, { token: lead });
    expect(review.status).toBe(200);
    expect(review.json.review).toMatchObject({ reviewedBy: 'Sam Lead (demo)' });
    expect(await h.db('audit_events').where({ action: 'install.mismatch-reviewed', target_id: install.clientId }).first('actor_email')).toEqual({ actor_email: 'lead@demo.corewright.test' });
    expect((await h.call('GET', '/api/installs/mismatches', { token: lead })).json.mismatches).toEqual([]);
    expect((await h.call('GET', `/api/work-orders/${wo()}`, { token: lead })).json.cores.find((c: { id: string }) => c.id === core.id).doorMismatch).toBe(false);
  });
});

describe('T9 pin sizes are bittings in another form (ANSI/BHMA A156.28 restricted records; ASVS 5 11.3)', () => {
  test('a raw read of every table after synced work holds no bitting and no pin size; the sizes come back only on an audited reveal', async () => {
    const records = packet.cores.map((c, i) => completionFor(wo(), c, { failFirst: i === 1 }));
    expect((await sync(records)).json.accepted).toHaveLength(records.length);
    expect((await sync([installFor(packet.cores[0]!)])).json.accepted).toHaveLength(1);

    // Every table of the database as text, as a dump would show it.
    const tables = (await h.db('pg_tables').where({ schemaname: 'public' }).pluck('tablename')) as string[];
    let dump = '';
    for (const t of tables) dump += (await h.db.raw(`select t::text as row from "${t}" t`)).rows.map((r: { row: string }) => r.row).join('\n');
    expect(dump).toContain(records[0]!.clientId); // the dump really holds the synced rows
    const bittings = [...(await h.db('keys').select('id', 'bitting_enc')).map((k: { id: string; bitting_enc: string }) => h.sealer.open(k.bitting_enc, `key:${k.id}`))];
    const system = await h.db('key_systems').first('id', 'control_enc');
    bittings.push(h.sealer.open(system.control_enc, `key-system-control:${system.id}`));
    expect(bittings.length).toBeGreaterThan(80);
    for (const b of bittings) expect(dump).not.toContain(b);
    expect(dump).not.toMatch(/\\?"size\\?":\s*\d/);
    // each core's bottom-pin sizes in chamber order, as a list or a run of digits
    for (const c of packet.cores) {
      const bottoms = c.pinning.chambers.map((ch) => ch.bottom);
      expect(dump).not.toContain(bottoms.join(', '));
      expect(dump).not.toContain(bottoms.join(','));
    }

    const lead = await h.tokenFor('supervisor');
    const plain = (await h.call('GET', `/api/completions/${records[1]!.clientId}`, { token: lead })).json.completion;
    expect(plain.attempts.flatMap((a: { steps: { size: number | null }[] }) => a.steps.map((s) => s.size)).every((s: number | null) => s === null)).toBe(true);
    expect(plain.hasPinSizes).toBe(true);
    expect(await h.db('audit_events').where({ action: 'bittings.viewed', target_id: records[1]!.clientId }).first('id')).toBeUndefined();
    const shown = await h.call('GET', `/api/completions/${records[1]!.clientId}?reveal=1`, { token: lead });
    expect(shown.status).toBe(200);
    expect(shown.json.completion.attempts).toEqual(records[1]!.attempts);
    expect(await h.db('audit_events').where({ action: 'bittings.viewed', target_id: records[1]!.clientId }).first('actor_email', 'details')).toEqual({ actor_email: 'lead@demo.corewright.test', details: { what: 'pin-sizes' } });
    expect((await h.call('GET', `/api/completions/${records[1]!.clientId}?reveal=1`, { token })).status).toBe(403);
    // sealed to its own row: copied onto another completion it does not open
    const sealed = (await h.db('completions').where({ id: records[1]!.clientId }).first('pin_sizes_enc')).pin_sizes_enc;
    expect(() => openPinSizes(h.sealer, records[2]!.clientId, records[2]!.attempts, sealed)).toThrow();
    expect(openPinSizes(h.sealer, records[1]!.clientId, plain.attempts, sealed)).toEqual(records[1]!.attempts);
  });
});

describe('T10 access before duplicates (ASVS 5 8.2.2: no existence oracle for another user\'s records)', () => {
  test('another technician replaying a stored record is refused as forbidden, never told "duplicate" or "conflict"', async () => {
    const record = completionFor(wo(), packet.cores[0]!);
    expect((await sync([record])).json.accepted).toEqual([record.clientId]);
    const other = (await h.signIn('bench2@demo.corewright.test')).accessToken;
    const otherTablet = randomUUID();
    for (const body of [record, { ...record, notes: 'changed' }]) {
      const res = await sync([body], other, otherTablet);
      expect(res.status).toBe(200);
      expect(res.json.duplicates).toEqual([]);
      expect(res.json.rejected).toEqual([expect.objectContaining({ clientId: record.clientId, error: expect.objectContaining({ code: 'forbidden' }) })]);
    }
    const install = installFor(packet.cores[0]!);
    await sync([install]);
    const res = await sync([install], other, otherTablet);
    expect(res.json.duplicates).toEqual([]);
    expect(res.json.rejected[0].error.code).toBe('forbidden');
  });
});
