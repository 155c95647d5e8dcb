// Accounts: invitations with a one-time set-password link, role changes, deactivation, and the
// audit trail. Cases A-2 (account disable ends every session at once), A-3, A5 and A7 of
// ../shared/design/reliability.md; OWASP ASVS 5 V6 (passwords, one-time links).
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { countRows, emailFor, startHarness, type Harness } from './harness';

let h: Harness;
let admin: string;
beforeAll(async () => {
  h = await startHarness({}, { demo: true });
  admin = await h.tokenFor('admin');
});
afterAll(async () => h.close());

const invitee = { email: 'casey.new@demo.corewright.test', name: 'Casey New (demo)', role: 'technician' };
const PASSWORD = 'brass pins under slate';
let inviteeId: string;
let link: URL;
const fieldsOf = (res: { json: { error: { details?: { field?: string }[] } } }) => (res.json.error.details ?? []).map((d) => d.field);

describe('POST /api/users: an invitation by e-mail', () => {
  test('an admin invites: 201, the account has no password yet, and the mail holds a one-time set-password link (ASVS 5 6.4.1 initial secrets)', async () => {
    const before = await countRows(h.db, 'users', 'invitations');
    const res = await h.call('POST', '/api/users', { token: admin, body: { ...invitee, email: ' Casey.New@Demo.Corewright.test ' } });
    expect(res.status).toBe(201);
    expect(res.json.user).toMatchObject({ email: invitee.email, name: invitee.name, role: 'technician', active: true, hasPassword: false });
    inviteeId = res.json.user.id;
    expect(await countRows(h.db, 'users', 'invitations')).toEqual({ users: before.users! + 1, invitations: before.invitations! + 1 });

    const [mail] = await h.mailTo(invitee.email);
    expect(mail).toBeDefined();
    expect(mail!.text).toContain('Alex Admin (demo)');
    const found = /https?:\/\/\S+\/set-password\?token=[A-Za-z0-9_-]+/.exec(mail!.text);
    expect(found).not.toBeNull();
    link = new URL(found![0]);
    expect(link.searchParams.get('token')!.length).toBeGreaterThanOrEqual(40); // 32 random bytes, base64url
    // only the token's hash is kept (ASVS 5 V7: store verifiers, not secrets)
    const stored = await h.db('invitations').where({ user_id: inviteeId }).first('token_hash');
    expect(JSON.stringify(stored)).not.toContain(link.searchParams.get('token'));
    // the account cannot sign in before a password is chosen
    expect((await h.call('POST', '/api/auth/sign-in', { body: { email: invitee.email, password: PASSWORD } })).status).toBe(401);
  });

  test('an e-mail that has an account already: 409 naming email, nothing written, no mail (RFC 9110 15.5.10)', async () => {
    const before = await countRows(h.db, 'users', 'invitations', 'audit_events');
    const mails = h.smtp.messages.length;
    const res = await h.call('POST', '/api/users', { token: admin, body: { email: emailFor.supervisor, name: 'Someone else', role: 'admin' } });
    expect(res.status).toBe(409);
    expect(fieldsOf(res)).toEqual(['email']);
    expect(await countRows(h.db, 'users', 'invitations', 'audit_events')).toEqual(before);
    await new Promise((r) => setTimeout(r, 200));
    expect(h.smtp.messages.length).toBe(mails);
  });

  test('bad input names the field (A7), an extra field such as "active" is refused (A5); nothing written', async () => {
    const before = await countRows(h.db, 'users', 'invitations');
    const bad = await h.call('POST', '/api/users', { token: admin, body: { email: 'not-an-address', name: '', role: 'owner' } });
    expect(bad.status).toBe(400);
    expect(fieldsOf(bad)).toEqual(expect.arrayContaining(['email', 'name', 'role']));
    const extra = await h.call('POST', '/api/users', { token: admin, body: { email: 'extra@demo.corewright.test', name: 'Extra Field', role: 'technician', active: false } });
    expect(extra.status).toBe(400);
    expect(extra.json.error.message).toMatch(/remove "active"/);
    expect(await countRows(h.db, 'users', 'invitations')).toEqual(before);
  });
});

describe('POST /api/auth/set-password: the link from the invitation', () => {
  test('a password under 12 characters: 400 naming password; the link still works afterwards (ASVS 5 6.2.1)', async () => {
    const res = await h.call('POST', '/api/auth/set-password', { body: { token: link.searchParams.get('token'), password: 'short-pass' } });
    expect(res.status).toBe(400);
    expect(fieldsOf(res)).toEqual(['password']);
    expect(res.json.error.details[0].message).toMatch(/at least 12 characters/);
    expect((await h.db('invitations').where({ user_id: inviteeId }).first('used_at')).used_at).toBeNull();
  });

  test('the token and a 12+ character password: 200, and the new user signs in with it (ASVS 5 6.2.1)', async () => {
    const res = await h.call('POST', '/api/auth/set-password', { body: { token: link.searchParams.get('token'), password: PASSWORD } });
    expect(res.status).toBe(200);
    expect(res.json).toEqual({ email: invitee.email });
    const signed = await h.signIn(invitee.email, PASSWORD);
    expect(signed.user).toMatchObject({ id: inviteeId, role: 'technician' });
    const me = await h.call('GET', '/api/auth/me', { token: signed.accessToken });
    expect(me.json.user.email).toBe(invitee.email);
  });

  test('the link works once: a second use is a 422 with a clear message, and the password stays (ASVS 5 V6, one-time links)', async () => {
    const res = await h.call('POST', '/api/auth/set-password', { body: { token: link.searchParams.get('token'), password: 'another long passphrase' } });
    expect(res.status).toBe(422);
    expect(res.json.error.code).toBe('unprocessable');
    expect(res.json.error.message).toMatch(/expired or was used already/);
    expect((await h.call('POST', '/api/auth/sign-in', { body: { email: invitee.email, password: 'another long passphrase' } })).status).toBe(401);
    expect((await h.signIn(invitee.email, PASSWORD)).user.id).toBe(inviteeId);
  });

  test('a made-up token is a 422 with the same message (no hint whether it ever existed; ASVS 5 V6)', async () => {
    const res = await h.call('POST', '/api/auth/set-password', { body: { token: 'x'.repeat(43), password: PASSWORD } });
    expect(res.status).toBe(422);
    expect(res.json.error.message).toMatch(/expired or was used already/);
  });
});

describe('PATCH /api/users/:id: role and active', () => {
  test('a role change applies at once to the open session (the role is read from the database; ASVS 5 V8 8.3.1 server-side checks)', async () => {
    const session = await h.signIn(invitee.email, PASSWORD);
    expect((await h.call('GET', '/api/doors', { token: session.accessToken })).status).toBe(403);
    const res = await h.call('PATCH', `/api/users/${inviteeId}`, { token: admin, body: { role: 'supervisor' } });
    expect(res.status).toBe(200);
    expect(res.json.user).toMatchObject({ id: inviteeId, role: 'supervisor', active: true });
    expect((await h.call('GET', '/api/doors', { token: session.accessToken })).status).toBe(200);
    expect(await h.db('audit_events').where({ action: 'user.role-changed', target_id: inviteeId }).count({ n: '*' }).first()).toEqual({ n: 1 });
  });

  test('deactivating ends every session of that user at once: their token is 401, refresh and sign-in fail (A-2, ASVS 5 7.4.2)', async () => {
    const a = await h.signIn(invitee.email, PASSWORD);
    const b = await h.signIn(invitee.email, PASSWORD);
    expect((await h.call('GET', '/api/auth/me', { token: a.accessToken })).status).toBe(200);
    const res = await h.call('PATCH', `/api/users/${inviteeId}`, { token: admin, body: { active: false } });
    expect(res.status).toBe(200);
    expect(res.json.user.active).toBe(false);
    for (const s of [a, b]) {
      expect((await h.call('GET', '/api/auth/me', { token: s.accessToken })).status).toBe(401);
      expect((await h.call('POST', '/api/auth/refresh', { body: { refreshToken: s.refreshToken } })).status).toBe(401);
    }
    expect((await h.call('POST', '/api/auth/sign-in', { body: { email: invitee.email, password: PASSWORD } })).status).toBe(401);
    const open = await h.db('sessions').where({ user_id: inviteeId }).whereNull('revoked_at').count({ n: '*' }).first();
    expect(open).toEqual({ n: 0 });
  });

  test('an admin cannot deactivate themself or drop their own admin role: 400, nothing changed (common practice: no lock-out by oneself)', async () => {
    const me = (await h.call('GET', '/api/auth/me', { token: admin })).json.user;
    for (const body of [{ active: false }, { role: 'supervisor' }]) {
      const res = await h.call('PATCH', `/api/users/${me.id}`, { token: admin, body });
      expect(res.status).toBe(400);
      expect(res.json.error.message).toMatch(/cannot deactivate yourself or remove your own admin role/);
    }
    expect(await h.db('users').where({ id: me.id }).first('role', 'active')).toEqual({ role: 'admin', active: true });
    expect((await h.call('GET', '/api/users', { token: admin })).status).toBe(200);
  });

  test('an extra field (A5) is a 400; an unknown user a 404', async () => {
    const extra = await h.call('PATCH', `/api/users/${inviteeId}`, { token: admin, body: { email: 'taken-over@demo.corewright.test' } });
    expect(extra.status).toBe(400);
    expect(extra.json.error.message).toMatch(/remove "email"/);
    expect((await h.db('users').where({ id: inviteeId }).first('email')).email).toBe(invitee.email);
    expect((await h.call('PATCH', '/api/users/00000000-0000-4000-8000-000000000000', { token: admin, body: { name: 'Nobody' } })).status).toBe(404);
  });
});

describe('who may manage accounts (A-3, ASVS 5 V8)', () => {
  test.each(['supervisor', 'technician'] as const)('a %s gets 403 on every /api/users route and on the audit trail; nothing written', async (role) => {
    const token = await h.tokenFor(role);
    const before = await countRows(h.db, 'users', 'invitations');
    const target = (await h.db('users').where({ email: emailFor.technician }).first('id')).id;
    expect((await h.call('GET', '/api/users', { token })).status).toBe(403);
    expect((await h.call('POST', '/api/users', { token, body: { email: `by-${role}@demo.corewright.test`, name: 'Not allowed', role: 'admin' } })).status).toBe(403);
    expect((await h.call('PATCH', `/api/users/${target}`, { token, body: { role: 'admin' } })).status).toBe(403);
    expect((await h.call('GET', '/api/audit-events', { token })).status).toBe(403);
    expect(await countRows(h.db, 'users', 'invitations')).toEqual(before);
    expect((await h.db('users').where({ id: target }).first('role')).role).toBe('technician');
  });

  test('an admin lists every account, without password hashes (ASVS 5 V6: verifiers stay on the server)', async () => {
    const res = await h.call('GET', '/api/users', { token: admin });
    expect(res.status).toBe(200);
    expect(res.json.users.map((u: { email: string }) => u.email)).toEqual(expect.arrayContaining([emailFor.admin, emailFor.supervisor, emailFor.technician, invitee.email]));
    expect(res.text).not.toMatch(/password_hash|scrypt|\$/);
  });
});

describe('GET /api/audit-events', () => {
  test('action= filters by prefix: every "user." event of this file, newest first (ASVS 5 16.2.1 security logging)', async () => {
    const res = await h.call('GET', '/api/audit-events?action=user.', { token: admin });
    expect(res.status).toBe(200);
    const actions = res.json.rows.map((r: { action: string }) => r.action);
    expect(actions.every((a: string) => a.startsWith('user.'))).toBe(true);
    expect(actions).toEqual(expect.arrayContaining(['user.invited', 'user.password-set', 'user.role-changed', 'user.deactivated']));
    expect(res.json.total).toBe(actions.length);
    const ids = res.json.rows.map((r: { id: number }) => Number(r.id));
    expect(ids).toEqual([...ids].sort((x, y) => y - x));
  });

  test('a prefix covers its longer actions: auth.sign-in finds sign-ins and failed sign-ins (ASVS 5 16.3.1 auth events logged)', async () => {
    const rows = (await h.call('GET', '/api/audit-events?action=auth.sign-in&pageSize=200', { token: admin })).json.rows as { action: string; actorEmail: string }[];
    const actions = new Set(rows.map((r) => r.action));
    expect(actions.has('auth.sign-in')).toBe(true);
    expect(actions.has('auth.sign-in.failed')).toBe(true);
    expect([...actions].every((a) => a.startsWith('auth.sign-in'))).toBe(true);
  });

  test('% and _ in the prefix are plain characters, not wildcards (common practice: escape LIKE patterns)', async () => {
    expect((await h.call('GET', '/api/audit-events?action=%25', { token: admin })).json.total).toBe(0);
    expect((await h.call('GET', '/api/audit-events?action=user_', { token: admin })).json.total).toBe(0);
  });

  test('paging and a bad filter (A7; common practice for offset paging)', async () => {
    const p = await h.call('GET', '/api/audit-events?pageSize=2&page=1', { token: admin });
    expect(p.json.rows).toHaveLength(2);
    expect(p.json.total).toBeGreaterThan(2);
    const bad = await h.call('GET', '/api/audit-events?pageSize=1000', { token: admin });
    expect(bad.status).toBe(400);
    expect(fieldsOf(bad)).toEqual(['pageSize']);
  });
});
