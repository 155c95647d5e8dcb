// Key control, transfers: a key copy passes from one holder to another in one step, keeping the
// copy number stamped on it; the old record closes as transferred, linked to the new one; the new
// holder acknowledges as on issue, and who authorised it is recorded. Refusals change nothing.
// Exposure, door and holder access, keys to chase and key audits count the copy under its new
// holder only. Sources: the primer's "Key control" (ANSI/BHMA A156.28; ALOA Keynotes, Jan 2015:
// every key tracked individually, authorised in writing, cross-referenced holder to doors);
// reliability.md A-3, A5, A7.
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { loadSystem } from '../../server/services/keySystems';
import { countRows, startHarness, type Harness } from './harness';

let h: Harness;
let lead: string;
let admin: string;
let tech: string;
let systemId: string;
const keyId = new Map<string, string>();
beforeAll(async () => {
  h = await startHarness({}, { demo: true });
  lead = await h.tokenFor('supervisor');
  admin = await h.tokenFor('admin');
  tech = await h.tokenFor('technician');
  systemId = (await h.call('GET', '/api/key-systems', { token: lead })).json.keySystems[0].id;
  for (const k of (await h.call('GET', `/api/key-systems/${systemId}/keys`, { token: lead })).json.keys) keyId.set(k.symbol, k.id);
});
afterAll(async () => h.close());

const fieldsOf = (res: { json: { error: { details?: { field?: string }[] } } }) => (res.json.error.details ?? []).map((d) => d.field);
/** A 1x1 PNG (its first bytes are PNG's signature, ISO/IEC 15948 5.2). */
const PNG = 'data:image/png;base64,iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAYAAAAfFcSJAAAADUlEQVR42mNk+M9QDwADhgGAWjR9awAAAABJRU5ErkJggg==';
const ack = (name: string) => ({ name, accepted: true });

async function holder(name: string, email?: string): Promise<string> {
  const res = await h.call('POST', '/api/holders', { token: lead, body: { name, department: 'Physics', ...(email ? { email } : {}) } });
  expect(res.status).toBe(201);
  return res.json.holder.id;
}
async function issue(holderId: string, symbol: string) {
  const res = await h.call('POST', '/api/key-issues', { token: lead, body: { holderId, keyId: keyId.get(symbol), acknowledgement: ack('First Holder') } });
  expect(res.status).toBe(201);
  return res.json.issue as { id: string; copyNumber: number; keySymbol: string };
}
/** The door of a key whose core is installed (the demo's Birchwood Library, AB1..AB14): a request names doors in service. */
async function installedDoorOf(symbol: string): Promise<string> {
  const door = await h.db('doors as d').join('cores as c', 'c.door_id', 'd.id').where({ 'd.key_id': keyId.get(symbol), 'c.state': 'installed' }).first<{ id: string }>('d.id');
  return door.id;
}
const transfer = (id: string, body: Record<string, unknown>, token = lead) => h.call('POST', `/api/key-issues/${id}/transfer`, { token, body });
const row = (id: string) => h.db('key_issues').where({ id }).first();

describe('POST /api/key-issues/:id/transfer', () => {
  test('201 { issue }: the new record keeps the copy number, under the new holder, acknowledged; the old record closes as transferred, linked to it and dated (primer: the copy number is stamped on the key)', async () => {
    const from = await holder('Tove Giver');
    const to = await holder('Ulla Taker');
    const out = await issue(from, 'AC5');
    const res = await transfer(out.id, { holderId: to, acknowledgement: { ...ack('Ulla Taker'), signature: PNG } });
    expect(res.status, res.text).toBe(201);
    const fresh = res.json.issue;
    expect(fresh).toMatchObject({ holderId: to, holderName: 'Ulla Taker', keySymbol: 'AC5', copyNumber: out.copyNumber, status: 'out', acknowledgement: { name: 'Ulla Taker', signed: true }, issuedBy: 'Sam Lead (demo)', authorisedBy: null, transferredTo: null, transferredFrom: { issueId: out.id, holderId: from, holderName: 'Tove Giver' } });
    expect(fresh.id).not.toBe(out.id);
    const old = (await h.call('GET', `/api/key-issues/${out.id}`, { token: lead })).json.issue;
    expect(old).toMatchObject({ status: 'transferred', holderId: from, copyNumber: out.copyNumber, returnedAt: null, transferredTo: { issueId: fresh.id, holderId: to, holderName: 'Ulla Taker' } });
    expect(Date.parse(old.transferredAt)).toBeGreaterThan(Date.now() - 60_000);
    // The receipt of the new record carries the new holder's drawn signature.
    expect((await h.call('GET', `/api/key-issues/${fresh.id}`, { token: lead })).json.issue.signature).toBe(PNG);
    // Both holders' histories show it; only the new holder counts it as held.
    const giver = (await h.call('GET', `/api/key-issues?holderId=${from}`, { token: lead })).json.issues;
    expect(giver.map((i: { id: string; status: string }) => [i.id, i.status])).toEqual([[out.id, 'transferred']]);
    const taker = (await h.call('GET', `/api/key-issues?holderId=${to}`, { token: lead })).json.issues;
    expect(taker.map((i: { id: string; status: string }) => [i.id, i.status])).toEqual([[fresh.id, 'out']]);
    expect((await h.call('GET', `/api/holders/${from}`, { token: lead })).json.holder.keysOut).toBe(0);
    expect((await h.call('GET', `/api/holders/${to}`, { token: lead })).json.holder.keysOut).toBe(1);
    // Audited in the transaction, in words on the audit trail.
    const event = await h.db('audit_events').where({ action: 'key.transferred', target_id: fresh.id }).first();
    expect(event.details).toMatchObject({ copy: `AC5 #${out.copyNumber}`, from, to, signed: true });
    const trail = await h.call('GET', '/api/audit-events?action=key.transferred', { token: admin });
    const line = trail.json.rows.find((e: { targetId: string }) => e.targetId === fresh.id);
    expect(line).toMatchObject({ actionName: 'Passed a key copy to another holder', target: `Key copy AC5 #${out.copyNumber} of Ulla Taker` });
    expect(line.summary).toContain('from: Tove Giver');
    expect(line.summary).toContain('to: Ulla Taker');
  });

  test('authorised like an issue: an approved request for the new holder and this key names who authorised it; the due date is kept', async () => {
    const from = await holder('Vera Giver');
    const to = await holder('Wim Taker');
    const out = await issue(from, 'AB10');
    const asked = await h.call('POST', '/api/key-requests', { token: lead, body: { holderId: to, doorIds: [await installedDoorOf('AB10')], reason: 'Takes over the lab rounds', keyId: keyId.get('AB10') } });
    expect(asked.status, asked.text).toBe(201);
    const requestId = asked.json.request.id;
    // Not approved yet: refused, nothing changed.
    const early = await transfer(out.id, { holderId: to, requestId, acknowledgement: ack('Wim Taker') });
    expect(early.status).toBe(409);
    expect(fieldsOf(early)).toEqual(['requestId']);
    expect((await row(out.id)).status).toBe('out');
    expect((await h.call('POST', `/api/key-requests/${requestId}/decision`, { token: lead, body: { decision: 'approved' } })).status).toBe(200);
    const res = await transfer(out.id, { holderId: to, requestId, dueDate: '2027-03-01', acknowledgement: ack('Wim Taker') });
    expect(res.status, res.text).toBe(201);
    expect(res.json.issue).toMatchObject({ requestId, authorisedBy: 'Sam Lead (demo)', dueDate: '2027-03-01', copyNumber: out.copyNumber });
    expect((await h.db('audit_events').where({ action: 'key.transferred', target_id: res.json.issue.id }).first()).details.request).toBe(`#${asked.json.request.number}`);
  });

  test('refused with a message that says what to fix, and nothing changes: not out, the same holder, a holder leaving or gone, a request for someone else, bad input (A5, A7)', async () => {
    const from = await holder('Xan Giver');
    const to = await holder('Yan Taker');
    const leaving = await holder('Zed Leaving');
    const gone = await holder('Abe Gone');
    await h.call('PATCH', `/api/holders/${leaving}`, { token: lead, body: { status: 'leaving' } });
    await h.call('PATCH', `/api/holders/${gone}`, { token: lead, body: { status: 'left' } });
    const out = await issue(from, 'AC7');
    const back = await issue(from, 'AC8');
    await h.call('POST', `/api/key-issues/${back.id}/return`, { token: lead, body: {} });
    const other = await h.call('POST', '/api/key-requests', { token: lead, body: { holderId: from, doorIds: [await installedDoorOf('AB11')], reason: 'For someone else', keyId: keyId.get('AB11') } });
    expect(other.status, other.text).toBe(201);
    await h.call('POST', `/api/key-requests/${other.json.request.id}/decision`, { token: lead, body: { decision: 'approved' } });
    const before = await countRows(h.db, 'key_issues', 'audit_events');
    const snapshot = [await row(out.id), await row(back.id)];
    const cases: [string, Record<string, unknown>, number, string, string][] = [
      [back.id, { holderId: to, acknowledgement: ack('Yan') }, 409, 'status', 'returned, not out'],
      [out.id, { holderId: from, acknowledgement: ack('Xan') }, 400, 'holderId', 'holds AC7'],
      [out.id, { holderId: leaving, acknowledgement: ack('Zed') }, 409, 'holderId', 'marked leaving'],
      [out.id, { holderId: gone, acknowledgement: ack('Abe') }, 409, 'holderId', 'marked left'],
      [out.id, { holderId: '00000000-0000-4000-8000-000000000000', acknowledgement: ack('Nobody') }, 400, 'holderId', 'no key holder'],
      [out.id, { holderId: to, requestId: other.json.request.id, acknowledgement: ack('Yan') }, 400, 'requestId', 'another holder or key'],
      [out.id, { holderId: to, acknowledgement: { name: 'Yan', accepted: false } }, 400, 'acknowledgement.accepted', 'tick'],
      [out.id, { holderId: to, acknowledgement: { ...ack('Yan'), signature: 'data:image/svg+xml;base64,PHN2Zz4=' } }, 400, 'acknowledgement.signature', 'PNG'],
      [out.id, { holderId: to }, 400, 'acknowledgement', ''],
      [out.id, { holderId: to, acknowledgement: ack('Yan'), copyNumber: 99 }, 400, '', '"copyNumber"'],
      ['00000000-0000-4000-8000-000000000000', { holderId: to, acknowledgement: ack('Yan') }, 404, '', 'key issue'],
    ];
    for (const [id, body, status, field, words] of cases) {
      const res = await transfer(id, body);
      expect(res.status, JSON.stringify(body)).toBe(status);
      if (field) expect(fieldsOf(res), JSON.stringify(body)).toContain(field);
      expect(res.json.error.message, JSON.stringify(body)).toContain(words);
    }
    // A copy of a key that is no longer active comes back instead of passing on.
    await h.db('keys').where({ id: keyId.get('AC7') }).update({ status: 'retired' });
    const retired = await transfer(out.id, { holderId: to, acknowledgement: ack('Yan') });
    await h.db('keys').where({ id: keyId.get('AC7') }).update({ status: 'active' });
    expect(retired.status).toBe(409);
    expect(retired.json.error.message).toContain('take AC7');
    expect(await countRows(h.db, 'key_issues', 'audit_events')).toEqual(before);
    expect([await row(out.id), await row(back.id)]).toEqual(snapshot);
    // The closed record of a transfer cannot be passed on again (the copy is the new record's now).
    const done = await transfer(out.id, { holderId: to, acknowledgement: ack('Yan') });
    expect(done.status).toBe(201);
    const again = await transfer(out.id, { holderId: leaving, acknowledgement: ack('Zed') });
    expect(again.status).toBe(409);
    expect(again.json.error.message).toContain('transferred, not out');
  });

  test('parallel transfers of one copy: one passes, the rest are refused; one live record per copy, and the next issue of the key takes a new number', async () => {
    const from = await holder('Bea Giver');
    const takers = await Promise.all(['Cy', 'Di', 'Ed', 'Fi'].map((n) => holder(`${n} Racer`)));
    const out = await issue(from, 'AD2');
    const replies = await Promise.all(takers.map((t) => transfer(out.id, { holderId: t, acknowledgement: ack('Racer') })));
    expect(replies.map((r) => r.status).sort()).toEqual([201, 409, 409, 409]);
    const live = await h.db('key_issues').where({ key_id: keyId.get('AD2'), copy_number: out.copyNumber }).whereNot('status', 'transferred').select('id');
    expect(live).toHaveLength(1);
    const max = (await h.db('key_issues').where({ key_id: keyId.get('AD2') }).max({ m: 'copy_number' }).first()) as { m: number };
    expect((await issue(from, 'AD2')).copyNumber).toBe(max.m + 1);
  });

  test('the old record closed by a transfer cannot be returned or reported; the new one can, and its report names the new holder', async () => {
    const from = await holder('Gus Giver');
    const to = await holder('Hal Taker');
    const out = await issue(from, 'AD3');
    const fresh = (await transfer(out.id, { holderId: to, acknowledgement: ack('Hal') })).json.issue;
    expect((await h.call('POST', `/api/key-issues/${out.id}/return`, { token: lead, body: {} })).status).toBe(409);
    expect((await h.call('POST', `/api/key-issues/${out.id}/report`, { token: lead, body: { kind: 'lost' } })).status).toBe(409);
    const report = await h.call('POST', `/api/key-issues/${fresh.id}/report`, { token: lead, body: { kind: 'stolen' } });
    expect(report.status).toBe(200);
    expect(report.json.report).toMatchObject({ holderId: to, holderName: 'Hal Taker', copyNumber: out.copyNumber });
  });

  test('office roles only: technician 403, anonymous 401 (A-3)', async () => {
    const out = await issue(await holder('Ivo Roles'), 'AD4');
    const to = await holder('Jan Roles');
    expect((await transfer(out.id, { holderId: to, acknowledgement: ack('Jan') }, tech)).status).toBe(403);
    expect((await h.call('POST', `/api/key-issues/${out.id}/transfer`, { body: { holderId: to, acknowledgement: ack('Jan') } })).status).toBe(401);
    expect((await row(out.id)).status).toBe('out');
    expect((await transfer(out.id, { holderId: to, acknowledgement: ack('Jan') }, admin)).status).toBe(201);
  });
});

describe('after a transfer the copy counts under its new holder only', () => {
  test('exposure, who can open the door, what each can open, keys to chase and a key audit', async () => {
    const from = await holder('Kai Leaver', 'kai.leaver@demo.corewright.test');
    const to = await holder('Lou Keeper', 'lou.keeper@demo.corewright.test');
    const out = await issue(from, 'AB12');
    await h.call('PATCH', `/api/holders/${from}`, { token: lead, body: { status: 'leaving' } });
    const chased = () => h.call('GET', '/api/key-issues/outstanding', { token: lead }).then((r) => (r.json.issues as { keySymbol: string; copyNumber: number; holderId: string }[]).filter((i) => i.keySymbol === 'AB12' && i.copyNumber === out.copyNumber));
    expect((await chased()).map((i) => i.holderId)).toEqual([from]);
    // Someone leaving hands the copy to a colleague: it leaves the keys to chase.
    const fresh = (await transfer(out.id, { holderId: to, acknowledgement: ack('Lou') })).json.issue;
    expect(await chased()).toEqual([]);
    const exposure = (await h.call('GET', `/api/keys/${keyId.get('AB12')}/exposure`, { token: lead })).json.exposure;
    const copies = exposure.holders.filter((x: { copyNumber: number }) => x.copyNumber === out.copyNumber);
    expect(copies.map((x: { holderId: string; issueId: string }) => [x.holderId, x.issueId])).toEqual([[to, fresh.id]]);
    const door = exposure.cores.find((c: { how: string; doorId: string | null }) => c.how === 'intended' && c.doorId);
    const access = (await h.call('GET', `/api/doors/${door.doorId}/access`, { token: lead })).json.holders as { holderId: string; issueId: string }[];
    expect(access.some((x) => x.issueId === fresh.id && x.holderId === to)).toBe(true);
    expect(access.some((x) => x.holderId === from || x.issueId === out.id)).toBe(false);
    expect((await h.call('GET', `/api/holders/${from}/access`, { token: lead })).json.doors).toEqual([]);
    expect((await h.call('GET', `/api/holders/${to}/access`, { token: lead })).json.doors.map((d: { issueId: string }) => d.issueId)).toContain(fresh.id);
    const round = await h.call('POST', '/api/key-audits', { token: lead, body: { title: 'After a transfer', keySystemId: systemId } });
    expect(round.status, round.text).toBe(201);
    const people = round.json.keyAudit.people as { holderId: string; copies: { issueId: string }[] }[];
    expect(people.find((p) => p.holderId === to)?.copies.map((c) => c.issueId)).toEqual([fresh.id]);
    expect(people.find((p) => p.holderId === from)).toBeUndefined();
  });

  test('no bitting in the transfer answer, the receipt or the lists (primer: symbol and copy number identify a key)', async () => {
    const system = await loadSystem(h.db, h.sealer, systemId);
    const bittings = [system.control, ...system.keys.map((k) => k.bitting)];
    const out = await issue(await holder('Mia Scan'), 'A');
    const res = await transfer(out.id, { holderId: await holder('Ned Scan'), acknowledgement: ack('Ned') });
    const texts = [res.text, (await h.call('GET', `/api/key-issues/${res.json.issue.id}`, { token: lead })).text, (await h.call('GET', `/api/key-issues/${out.id}`, { token: lead })).text, (await h.call('GET', '/api/key-issues', { token: lead })).text];
    for (const text of texts) for (const b of bittings) expect(text.includes(b), `bitting ${b}`).toBe(false);
  });
});
