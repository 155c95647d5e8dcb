// Key control, requests: the proposal is the lowest key of the system that opens every door asked
// for, through the engine on the installed cores, with every door it opens beyond them; the
// authoriser decides from a mailed link (single use, expiring, only its hash stored, no sign-in,
// no bitting) or a supervisor in the app; decision and decider recorded and audited.
// Sources: the primer's "Key control" (ANSI/BHMA A156.28: the lowest key that opens those doors
// and no more, authorised in writing); OWASP Forgot Password Cheat Sheet for the link token.
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { keyOperates, pinCore } from '../../shared/keying';
import { loadSystem, type LoadedSystem } from '../../server/services/keySystems';
import { sha256 } from '../../server/services/tokens';
import { countRows, startHarness, type Harness } from './harness';

let h: Harness;
let lead: string;
let tech: string;
let system: LoadedSystem;
const door = new Map<string, string>();
beforeAll(async () => {
  h = await startHarness({}, { demo: true });
  lead = await h.tokenFor('supervisor');
  tech = await h.tokenFor('technician');
  const systemId = (await h.db('key_systems').first('id')).id;
  system = await loadSystem(h.db, h.sealer, systemId);
  for (const d of await h.db('doors').select('id', 'label')) door.set(d.label, d.id);
  await h.call('POST', '/api/departments', { token: lead, body: { name: 'Library', authorisers: [{ name: 'Dee Head', email: 'dee.head@example.test' }, { name: 'Eli Deputy', email: 'eli.deputy@example.test' }] } });
});
afterAll(async () => h.close());

const fieldsOf = (res: { json: { error: { details?: { field?: string }[] } } }) => (res.json.error.details ?? []).map((d) => d.field);
async function holder(name: string): Promise<string> {
  return (await h.call('POST', '/api/holders', { token: lead, body: { name, department: 'Library', email: `${name.replace(/\W/g, '').toLowerCase()}@example.test` } })).json.holder.id;
}
/** Brute force: for every active key, keyOperates on every asked door's installed core. */
async function keysOpening(labels: string[]): Promise<string[]> {
  const charts: ReturnType<typeof pinCore>[] = [];
  for (const l of labels) {
    const core = await h.db('cores').where({ door_id: door.get(l), state: 'installed' }).first('id');
    const chain = (await h.db('core_keys').where({ core_id: core.id }).pluck('key_id')) as string[];
    charts.push(pinCore(system.profile, { operating: chain.map((id) => system.keys.find((k) => k.id === id)!.bitting), control: system.control }));
  }
  return system.keys.filter((k) => k.status === 'active' && charts.every((p) => keyOperates(p, system.profile, k.bitting).plug)).map((k) => k.symbol).sort();
}
function tokenFrom(text: string): string {
  return /#([A-Za-z0-9_-]{43})/.exec(text)![1]!;
}

describe('the proposal: the lowest key that opens every door asked for', () => {
  test('one room: its change key, opening nothing beyond (if no incidental door); the candidates equal brute force through keyOperates', async () => {
    const res = await h.call('POST', '/api/key-requests/proposal', { token: lead, body: { doorIds: [door.get('BL-101')] } });
    expect(res.status).toBe(200);
    expect(res.json.proposal).toMatchObject({ keySymbol: 'AB1', level: 'change' });
    expect(res.json.proposal.opens.filter((o: { requested: boolean }) => o.requested).map((o: { doorLabel: string }) => o.doorLabel)).toEqual(['BL-101']);
    expect(res.json.candidates.map((c: { keySymbol: string }) => c.keySymbol).sort()).toEqual(await keysOpening(['BL-101']));
  });
  test('two rooms under one master: the master (no change key opens both), listing every door it opens beyond them', async () => {
    const res = await h.call('POST', '/api/key-requests/proposal', { token: lead, body: { doorIds: [door.get('BL-101'), door.get('BL-102')] } });
    expect(res.json.proposal).toMatchObject({ keySymbol: 'AB', level: 'master' });
    const installedBL = Number((await h.db('cores as c').join('doors as d', 'd.id', 'c.door_id').where('c.state', 'installed').whereLike('d.label', 'BL-%').count({ n: '*' }).first())!.n);
    expect(res.json.proposal.beyond).toBe(installedBL - 2);
    expect(res.json.candidates.map((c: { keySymbol: string }) => c.keySymbol).sort()).toEqual(await keysOpening(['BL-101', 'BL-102']));
  });
  test('a supervisor may choose another key: the same listing for it; a key that does not open every door is a 400 naming keyId', async () => {
    const gm = system.keys.find((k) => k.symbol === 'A')!.id;
    const res = await h.call('POST', '/api/key-requests/proposal', { token: lead, body: { doorIds: [door.get('BL-101')], keyId: gm } });
    expect(res.json.proposal).toMatchObject({ keySymbol: 'A', level: 'gm' });
    const wrong = await h.call('POST', '/api/key-requests/proposal', { token: lead, body: { doorIds: [door.get('BL-101')], keyId: system.keys.find((k) => k.symbol === 'AA')!.id } });
    expect(wrong.status).toBe(400);
    expect(fieldsOf(wrong)).toEqual(['keyId']);
  });
  test('a door without an installed core or unknown is a 400 naming its place in doorIds', async () => {
    const res = await h.call('POST', '/api/key-requests/proposal', { token: lead, body: { doorIds: [door.get('BL-101'), door.get('AH-101'), '00000000-0000-4000-8000-000000000000'] } });
    expect(res.status).toBe(400);
    expect(fieldsOf(res)).toEqual(['doorIds.1', 'doorIds.2']);
  });
});

describe('request, mailed link, decision', () => {
  test('a request mails each authoriser a link with no bitting; the link shows the request without sign-in, decides once, and the issue names the authoriser', async () => {
    const who = await holder('Req One');
    const before = await countRows(h.db, 'key_requests');
    const res = await h.call('POST', '/api/key-requests', { token: lead, body: { holderId: who, doorIds: [door.get('BL-103')], reason: 'Runs the reading room' } });
    expect(res.status).toBe(201);
    expect(res.json.request).toMatchObject({ holderName: 'Req One', department: 'Library', keySymbol: 'AB3', proposedKeySymbol: 'AB3', status: 'pending', decidedBy: null });
    expect((await countRows(h.db, 'key_requests')).key_requests).toBe(before.key_requests! + 1);
    const [mail] = await h.mailTo('dee.head@example.test');
    expect(mail!.subject).toContain(`Key request #${res.json.request.number}`);
    expect((await h.mailTo('eli.deputy@example.test')).length).toBe(1);
    const token = tokenFrom(mail!.text);
    // Only the token's hash is stored.
    const stored = (await h.db('key_request_links').pluck('token_hash')) as string[];
    expect(stored).toContain(sha256(token));
    expect(stored).not.toContain(token);
    const bittings = [system.control, ...system.keys.map((k) => k.bitting)];
    const view = await h.call('POST', '/api/key-request-links/view', { body: { token } });
    expect(view.status).toBe(200);
    expect(view.json.request).toMatchObject({ holderName: 'Req One', keySymbol: 'AB3', status: 'pending' });
    for (const text of [mail!.text, view.text, res.text]) for (const b of bittings) expect(text.includes(b), b).toBe(false);
    const decided = await h.call('POST', '/api/key-request-links/decide', { body: { token, decision: 'approved', note: 'Yes' } });
    expect(decided.status).toBe(200);
    expect(decided.json.request).toMatchObject({ status: 'approved', decidedBy: 'Dee Head' });
    // Single use: the same link again, for viewing or deciding, is refused.
    expect((await h.call('POST', '/api/key-request-links/decide', { body: { token, decision: 'refused' } })).status).toBe(422);
    expect((await h.call('POST', '/api/key-request-links/view', { body: { token } })).status).toBe(422);
    // The other authoriser's link still opens, but the request is decided already.
    const other = tokenFrom((await h.mailTo('eli.deputy@example.test'))[0]!.text);
    expect((await h.call('POST', '/api/key-request-links/decide', { body: { token: other, decision: 'refused' } })).status).toBe(409);
    expect(await h.db('audit_events').where({ action: 'key-request.decided', actor_email: 'dee.head@example.test' }).first('id')).toBeTruthy();
    const issued = await h.call('POST', '/api/key-issues', { token: lead, body: { holderId: who, keyId: res.json.request.keyId, requestId: res.json.request.id, acknowledgement: { name: 'Req One', accepted: true } } });
    expect(issued.status).toBe(201);
    expect(issued.json.issue.authorisedBy).toBe('Dee Head');
  });
  test('an expired link is refused and changes nothing; a made-up token too', async () => {
    const who = await holder('Req Expired');
    const res = await h.call('POST', '/api/key-requests', { token: lead, body: { holderId: who, doorIds: [door.get('BL-104')], reason: 'Night shift' } });
    const token = tokenFrom((await h.mailTo('dee.head@example.test', 2)).at(-1)!.text);
    await h.db('key_request_links').where({ token_hash: sha256(token) }).update({ expires_at: new Date(Date.now() - 1000) });
    expect((await h.call('POST', '/api/key-request-links/decide', { body: { token, decision: 'approved' } })).status).toBe(422);
    expect((await h.call('POST', '/api/key-request-links/decide', { body: { token: 'A'.repeat(43), decision: 'approved' } })).status).toBe(422);
    expect((await h.db('key_requests').where({ id: res.json.request.id }).first('status')).status).toBe('pending');
    const bad = await h.call('POST', '/api/key-request-links/decide', { body: { token: 'short', decision: 'approved' } });
    expect(bad.status).toBe(400);
    expect(fieldsOf(bad)).toEqual(['token']);
  });
  test('a supervisor approves in the app; decision and decider recorded and audited; an unapproved request cannot serve an issue', async () => {
    const who = await holder('Req App');
    const res = await h.call('POST', '/api/key-requests', { token: lead, body: { holderId: who, doorIds: [door.get('BL-105')], reason: 'Cleaning round' } });
    const pending = await h.call('POST', '/api/key-issues', { token: lead, body: { holderId: who, keyId: res.json.request.keyId, requestId: res.json.request.id, acknowledgement: { name: 'X', accepted: true } } });
    expect(pending.status).toBe(409);
    expect(fieldsOf(pending)).toEqual(['requestId']);
    const ok = await h.call('POST', `/api/key-requests/${res.json.request.id}/decision`, { token: lead, body: { decision: 'approved' } });
    expect(ok.json.request).toMatchObject({ status: 'approved', decidedBy: 'Sam Lead (demo)' });
    expect(ok.json.request.decidedAt).toEqual(expect.any(String));
    expect((await h.call('POST', `/api/key-requests/${res.json.request.id}/decision`, { token: lead, body: { decision: 'refused' } })).status).toBe(409);
    expect(await h.db('audit_events').where({ action: 'key-request.decided', target_id: res.json.request.id }).first('id')).toBeTruthy();
  });
  test('bad input: 400 naming the field, nothing stored, no mail (A7); technician 403, anonymous 401 (A-3)', async () => {
    const who = await holder('Req Bad');
    const before = await countRows(h.db, 'key_requests', 'key_request_links');
    const mailsBefore = h.smtp.messages.length;
    for (const [body, field] of [
      [{ holderId: who, doorIds: [], reason: 'Because' }, 'doorIds'],
      [{ holderId: who, doorIds: [door.get('BL-101')], reason: '' }, 'reason'],
      [{ holderId: who, doorIds: ['nope'], reason: 'Because' }, 'doorIds.0'],
      [{ doorIds: [door.get('BL-101')], reason: 'Because' }, 'holderId'],
    ] as const) {
      const res = await h.call('POST', '/api/key-requests', { token: lead, body });
      expect(res.status).toBe(400);
      expect(fieldsOf(res)).toContain(field);
    }
    expect(await countRows(h.db, 'key_requests', 'key_request_links')).toEqual(before);
    expect(h.smtp.messages.length).toBe(mailsBefore);
    for (const [method, path] of [['POST', '/api/key-requests'], ['POST', '/api/key-requests/proposal'], ['GET', '/api/key-requests']] as const) {
      const body = method === 'POST' ? {} : undefined;
      expect((await h.call(method, path, { token: tech, body })).status).toBe(403);
      expect((await h.call(method, path, { body })).status).toBe(401);
    }
  });
});
