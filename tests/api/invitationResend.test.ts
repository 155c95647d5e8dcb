// POST /api/users/:id/invitation: a new single-use link, and the old one dead at once
// (ASVS 5 6.4.1: initial secrets single-use and short-lived). Cases A-3 and A7.
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { startHarness, type Harness } from './harness';

let h: Harness;
let admin: string;
let userId: string;
const email = 'rowan.late@demo.corewright.test';
const linkIn = (text: string) => /set-password\?token=([A-Za-z0-9_-]+)/.exec(text)![1]!;

beforeAll(async () => {
  h = await startHarness({}, { demo: true });
  admin = await h.tokenFor('admin');
  const res = await h.call('POST', '/api/users', { token: admin, body: { email, name: 'Rowan Late (demo)', role: 'technician' } });
  userId = res.json.user.id;
});
afterAll(async () => h.close());

describe('resending an invitation', () => {
  test('a new link works; the first link no longer does; the resend is audited', async () => {
    const [first] = await h.mailTo(email, 1);
    const oldToken = linkIn(first!.text);
    const res = await h.call('POST', `/api/users/${userId}/invitation`, { token: admin, body: {} });
    expect(res.status, res.text).toBe(201);
    const mails = await h.mailTo(email, 2);
    const newToken = linkIn(mails[1]!.text);
    expect(newToken).not.toBe(oldToken);
    const old = await h.call('POST', '/api/auth/set-password', { body: { token: oldToken, password: 'a long enough passphrase 1' } });
    expect(old.status).toBe(422);
    const fresh = await h.call('POST', '/api/auth/set-password', { body: { token: newToken, password: 'a long enough passphrase 1' } });
    expect(fresh.status, fresh.text).toBe(200);
    // single use: the same link a second time is dead too
    expect((await h.call('POST', '/api/auth/set-password', { body: { token: newToken, password: 'a long enough passphrase 2' } })).status).toBe(422);
    expect(await h.db('audit_events').where({ action: 'user.invitation-resent', target_id: userId }).first('id')).toBeDefined();
  });

  test('someone with a password already: 409, no mail, no new link (A7)', async () => {
    const before = await h.db('invitations').where({ user_id: userId }).count({ n: '*' }).first();
    const res = await h.call('POST', `/api/users/${userId}/invitation`, { token: admin, body: {} });
    expect(res.status).toBe(409);
    expect(res.json.error.message).toMatch(/password/);
    expect(await h.db('invitations').where({ user_id: userId }).count({ n: '*' }).first()).toEqual(before);
  });

  test('a supervisor may not resend (A-3); a bad id is a 400 naming it', async () => {
    expect((await h.call('POST', `/api/users/${userId}/invitation`, { token: await h.tokenFor('supervisor'), body: {} })).status).toBe(403);
    expect((await h.call('POST', '/api/users/nope/invitation', { token: admin, body: {} })).status).toBe(400);
  });
});
