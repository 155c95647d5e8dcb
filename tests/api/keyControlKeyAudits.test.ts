// Key control, key audits: holders periodically confirm the keys they still hold (the
// primer's "Key control", "Audits"; common practice). An office user starts one over a department
// or a key system; each holder with copies out gets a mailed link (single use, expiring, only the
// token's SHA-256 stored; OWASP Forgot Password Cheat Sheet for the token) with no bitting; a copy
// flagged missing opens a lost report in the office's queue; the key audit lists who has not answered.
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { actionGroups } from '../../shared/auditTrailWords';
import { loadSystem } from '../../server/services/keySystems';
import { sha256 } from '../../server/services/tokens';
import { startHarness, type Harness } from './harness';

let h: Harness;
let lead: string;
let tech: string;
let bittings: string[];
let library: string;
beforeAll(async () => {
  h = await startHarness({}, { demo: true });
  lead = await h.tokenFor('supervisor');
  tech = await h.tokenFor('technician');
  const system = await loadSystem(h.db, h.sealer, (await h.db('key_systems').first('id')).id);
  bittings = [system.control, ...system.keys.map((k) => k.bitting)];
  library = (await h.db('departments').where({ name: 'Library Services' }).first('id')).id;
});
afterAll(async () => h.close());

const tokenFrom = (text: string) => /\/confirm-keys#([A-Za-z0-9_-]{43})/.exec(text)![1]!;
const count = async (table: string) => Number((await h.db(table).count({ n: '*' }).first())!.n);

describe('starting a key audit', () => {
  test('bad scopes are refused naming the field, and nothing is stored', async () => {
    const before = await count('key_campaigns');
    for (const body of [{ title: 'Both' , departmentId: library, keySystemId: (await h.db('key_systems').first('id')).id }, { title: 'None' }, { title: 'Unknown', departmentId: '00000000-0000-4000-8000-000000000000' }, { title: 'Bad\u0000title', departmentId: library }, { title: 'x', departmentId: library, role: 'admin' }]) {
      const res = await h.call('POST', '/api/key-audits', { token: lead, body });
      expect(res.status, JSON.stringify(body)).toBe(400);
      expect(res.json.error.details?.length).toBeGreaterThan(0);
    }
    expect(await count('key_campaigns')).toBe(before);
    expect((await h.call('POST', '/api/key-audits', { token: tech, body: { title: 'x', departmentId: library } })).status).toBe(403);
  });

  test('a department: each holder with copies out gets one mail with a single-use link, the keys by symbol and copy number, no bitting', async () => {
    const res = await h.call('POST', '/api/key-audits', { token: lead, body: { title: 'Winter key audit', departmentId: library } });
    expect(res.status, res.text).toBe(201);
    const c = res.json.keyAudit;
    expect(c).toMatchObject({ title: 'Winter key audit', scope: { kind: 'department', name: 'Library Services' }, confirmed: 0, missing: 0 });
    // Ada holds AB1, Bo AB2 and AB5; Cass's only copy (AB7) is reported lost, so she is not asked.
    expect(c.people.map((p: { name: string }) => p.name)).toEqual(['Ada Quill (demo)', 'Bo Linden (demo)']);
    expect(c.people[1].copies.map((x: { keySymbol: string; copyNumber: number }) => `${x.keySymbol}/${x.copyNumber}`)).toEqual(['AB2/1', 'AB5/1']);
    const [mail] = await h.mailTo('bo@demo.corewright.test');
    expect(mail!.subject).toBe(`Key audit #${c.number}: please confirm the keys you hold`);
    expect(mail!.text).toContain('key AB2, copy 1');
    expect(mail!.text).toContain('key AB5, copy 1');
    for (const b of bittings) expect(mail!.text.includes(b)).toBe(false);
    // Only the token's hash is stored.
    const token = tokenFrom(mail!.text);
    expect(await h.db('key_campaign_holders').where({ token_hash: token }).first()).toBeUndefined();
    expect(await h.db('key_campaign_holders').where({ token_hash: sha256(token) }).first()).toBeDefined();
  });
});

describe('the holder answers from the mailed link', () => {
  test('view without signing in; a wrong answer set is refused and changes nothing; held and missing: the missing copy opens a lost report; the link works once', async () => {
    const [mail] = await h.mailTo('bo@demo.corewright.test');
    const token = tokenFrom(mail!.text);
    const view = await h.call('POST', '/api/key-audit-links/view', { body: { token } });
    expect(view.status, view.text).toBe(200);
    expect(view.json).toMatchObject({ holder: { name: 'Bo Linden (demo)' }, answeredAt: null });
    for (const b of bittings) expect(view.text.includes(b)).toBe(false);
    const [ab2, ab5] = view.json.copies as { issueId: string; keySymbol: string }[];
    expect([ab2!.keySymbol, ab5!.keySymbol]).toEqual(['AB2', 'AB5']);

    const reports = await count('key_reports');
    for (const copies of [[{ issueId: ab2!.issueId, held: true }], [{ issueId: ab2!.issueId, held: true }, { issueId: ab2!.issueId, held: false }], [{ issueId: ab2!.issueId, held: true }, { issueId: '00000000-0000-4000-8000-000000000000', held: true }]]) {
      const bad = await h.call('POST', '/api/key-audit-links/confirm', { body: { token, copies } });
      expect(bad.status, bad.text).toBe(400);
      expect(bad.json.error.message).toMatch(/every key listed/);
    }
    expect(await count('key_reports')).toBe(reports);
    expect((await h.db('key_campaign_holders').where({ token_hash: sha256(token) }).first('answered_at')).answered_at).toBeNull();

    const done = await h.call('POST', '/api/key-audit-links/confirm', { body: { token, copies: [{ issueId: ab2!.issueId, held: true }, { issueId: ab5!.issueId, held: false }] } });
    expect(done.status, done.text).toBe(200);
    expect(done.json.answeredAt).not.toBeNull();
    expect(done.json.copies.map((x: { answer: string }) => x.answer)).toEqual(['held', 'missing']);
    // The missing copy is in the office's queue as a lost report, with its exposure.
    const open = (await h.call('GET', '/api/key-reports?status=open', { token: lead })).json.reports as { id: string; keySymbol: string; holderName: string; kind: string; note: string }[];
    const flagged = open.find((r) => r.keySymbol === 'AB5');
    expect(flagged).toMatchObject({ holderName: 'Bo Linden (demo)', kind: 'lost' });
    expect(flagged!.note).toMatch(/key audit #/);
    expect((await h.db('key_issues').where({ id: ab5!.issueId }).first('status')).status).toBe('lost');
    expect(Number((await h.db('audit_events').where({ action: 'key.reported', target_id: flagged!.id }).count({ n: '*' }).first())!.n)).toBe(1);

    for (const path of ['/api/key-audit-links/view', '/api/key-audit-links/confirm']) {
      const again = await h.call('POST', path, { body: { token, copies: [{ issueId: ab2!.issueId, held: true }, { issueId: ab5!.issueId, held: true }] } });
      expect(again.status, path).toBe(path.endsWith('view') ? 400 : 422);
    }
    expect((await h.call('POST', '/api/key-audit-links/view', { body: { token } })).status).toBe(422);
  });

  test('the key audit report: who has not answered first, who answered, the missing count', async () => {
    const id = (await h.db('key_campaigns').first('id')).id;
    const res = await h.call('GET', `/api/key-audits/${id}`, { token: lead });
    expect(res.status).toBe(200);
    expect(res.json.keyAudit).toMatchObject({ holders: 2, confirmed: 1, missing: 1 });
    expect(res.json.keyAudit.people.map((p: { name: string; answeredAt: string | null }) => [p.name, Boolean(p.answeredAt)])).toEqual([['Ada Quill (demo)', false], ['Bo Linden (demo)', true]]);
    const list = await h.call('GET', '/api/key-audits', { token: lead });
    expect(list.json.keyAudits[0]).toMatchObject({ id, confirmed: 1, holders: 2 });
  });

  test('a holder whose e-mail is cleared after the mail went: the key audit still reads, the address shown as none', async () => {
    const id = (await h.db('key_campaigns').first('id')).id;
    const ada = (await h.db('key_holders').where({ name: 'Ada Quill (demo)' }).first('id', 'email'));
    const cleared = await h.call('PATCH', `/api/holders/${ada.id}`, { token: lead, body: { email: null } });
    expect(cleared.status).toBe(200);
    const res = await h.call('GET', `/api/key-audits/${id}`, { token: lead });
    expect(res.status).toBe(200);
    expect(res.json.keyAudit.people.find((p: { name: string }) => p.name === 'Ada Quill (demo)')).toMatchObject({ email: null });
    await h.call('PATCH', `/api/holders/${ada.id}`, { token: lead, body: { email: ada.email } });
  });

  test('an expired link or a made-up token: refused alike, nothing written', async () => {
    const [mail] = await h.mailTo('ada@demo.corewright.test');
    const token = tokenFrom(mail!.text);
    await h.db('key_campaigns').update({ expires_at: new Date(Date.now() - 1000) });
    const res = await h.call('POST', '/api/key-audit-links/view', { body: { token } });
    expect(res.status).toBe(422);
    expect(res.json.error.message).toMatch(/expired, was used already or is not valid/);
    const made = await h.call('POST', '/api/key-audit-links/view', { body: { token: 'A'.repeat(43) } });
    expect(made.status).toBe(422);
    expect((await h.db('key_campaign_holders').where({ token_hash: sha256(token) }).first('answered_at')).answered_at).toBeNull();
  });
});

describe('a key audit over a key system, and its trail', () => {
  test('every holder with a copy out of the system and an e-mail is asked, once; the audit trail\'s key control filter finds the key audit and the answers', async () => {
    const system = await h.db('key_systems').first<{ id: string; name: string }>('id', 'name');
    const expected = await h.db('key_issues as i').join('key_holders as h', 'h.id', 'i.holder_id').join('keys as k', 'k.id', 'i.key_id').where({ 'i.status': 'out', 'k.key_system_id': system.id }).whereNotNull('h.email').distinct<{ name: string }[]>('h.name');
    const res = await h.call('POST', '/api/key-audits', { token: lead, body: { title: 'Whole campus', keySystemId: system.id } });
    expect(res.status, res.text).toBe(201);
    expect(res.json.keyAudit.scope).toEqual({ kind: 'key-system', name: system.name });
    expect(res.json.keyAudit.people.map((p: { name: string }) => p.name).sort()).toEqual(expected.map((e) => e.name).sort());
    const admin = await h.tokenFor('admin');
    const group = actionGroups.find((g) => g.label.startsWith('Key control'))!;
    const trail = await h.call('GET', `/api/audit-events?action=${encodeURIComponent(group.value)}&pageSize=100`, { token: admin });
    expect(trail.status, trail.text).toBe(200);
    const actions = new Set((trail.json.rows as { action: string }[]).map((e) => e.action));
    for (const a of ['key-campaign.started', 'key-campaign.answered', 'key.reported']) expect(actions.has(a), a).toBe(true);
  });
});
