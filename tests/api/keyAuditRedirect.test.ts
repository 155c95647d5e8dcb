// The key audit's API moved from /api/key-campaigns to /api/key-audits and its holder's link from
// /api/key-campaign-links to /api/key-audit-links (one name, as on screen). The old paths answer 308 Permanent
// Redirect (RFC 9110 15.4.9: the method and body are kept), so an older client's calls still work, and the new
// route decides who may.
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { countRows, startHarness, type Harness } from './harness';

let h: Harness;
let lead: string;
let tech: string;
let library: string;

beforeAll(async () => {
  h = await startHarness({}, { demo: true });
  [lead, tech] = await Promise.all([h.tokenFor('supervisor'), h.tokenFor('technician')]);
  library = (await h.db('departments').where({ name: 'Library Services' }).first('id')).id;
});
afterAll(async () => h.close());

describe('the old key audit paths (RFC 9110 15.4.9, 308 Permanent Redirect)', () => {
  test('each old path answers 308 to its new one, the query kept', async () => {
    const id = '00000000-0000-4000-8000-000000000000';
    expect(await h.unfollowed('GET', '/api/key-campaigns', lead)).toEqual({ status: 308, location: '/api/key-audits' });
    expect(await h.unfollowed('GET', '/api/key-campaigns?x=1', lead)).toEqual({ status: 308, location: '/api/key-audits?x=1' });
    expect(await h.unfollowed('GET', `/api/key-campaigns/${id}`, lead)).toEqual({ status: 308, location: `/api/key-audits/${id}` });
    expect(await h.unfollowed('POST', '/api/key-campaigns', lead, {})).toEqual({ status: 308, location: '/api/key-audits' });
    // The holder's link needs no sign-in, before or after the move.
    expect(await h.unfollowed('POST', '/api/key-campaign-links/view', undefined, {})).toEqual({ status: 308, location: '/api/key-audit-links/view' });
    expect(await h.unfollowed('POST', '/api/key-campaign-links/confirm', undefined, {})).toEqual({ status: 308, location: '/api/key-audit-links/confirm' });
  });

  test('followed, the old POST keeps its body: the key audit is started once, and the old GETs read what the new paths read', async () => {
    const before = await countRows(h.db, 'key_campaigns');
    const res = await h.call('POST', '/api/key-campaigns', { token: lead, body: { title: 'Through the old path', departmentId: library } });
    expect(res.status, res.text).toBe(201);
    expect(res.json.keyAudit.title).toBe('Through the old path');
    expect(await countRows(h.db, 'key_campaigns')).toEqual({ key_campaigns: before.key_campaigns! + 1 });
    const id = res.json.keyAudit.id as string;
    expect((await h.call('GET', `/api/key-campaigns/${id}`, { token: lead })).json).toEqual((await h.call('GET', `/api/key-audits/${id}`, { token: lead })).json);
    expect((await h.call('GET', '/api/key-campaigns', { token: lead })).json).toEqual((await h.call('GET', '/api/key-audits', { token: lead })).json);
  });

  test('the holder\'s old link path, followed, views and answers like the new one', async () => {
    const [mail] = await h.mailTo('bo@demo.corewright.test');
    const token = /\/confirm-keys#([A-Za-z0-9_-]{43})/.exec(mail!.text)![1]!;
    const view = await h.call('POST', '/api/key-campaign-links/view', { body: { token } });
    expect(view.status, view.text).toBe(200);
    expect(view.json.holder.name).toBe('Bo Linden (demo)');
    const copies = (view.json.copies as { issueId: string }[]).map((c) => ({ issueId: c.issueId, held: true }));
    const done = await h.call('POST', '/api/key-campaign-links/confirm', { body: { token, copies } });
    expect(done.status, done.text).toBe(200);
    expect(done.json.answeredAt).not.toBeNull();
  });

  test('the redirect grants nothing: followed, the new route still refuses a technician (403) and no token (401), and starts nothing', async () => {
    const before = await countRows(h.db, 'key_campaigns');
    expect((await h.call('GET', '/api/key-campaigns', { token: tech })).status).toBe(403);
    expect((await h.call('POST', '/api/key-campaigns', { token: tech, body: { title: 'No', departmentId: library } })).status).toBe(403);
    expect((await h.call('GET', '/api/key-campaigns')).status).toBe(401);
    expect(await countRows(h.db, 'key_campaigns')).toEqual(before);
  });

  test('a bad key audit id on the old path is refused before any redirect (400 naming the id)', async () => {
    const res = await h.call('GET', '/api/key-campaigns/not-an-id', { token: lead });
    expect(res.status).toBe(400);
    expect(res.json.error.code).toBe('validation');
  });
});
