// Trust cases T7 (a revoked tablet stays out) and T8 (parallel refreshes keep the user signed in)
// of ../shared/design/reliability.md, against the real app and Postgres.
import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { DEMO_PASSWORD } from '../../server/seed/demo';
import { sha256 } from '../../server/services/tokens';
import { completionFor, techPacket } from './factories';
import { countRows, emailFor, startHarness, type Harness } from './harness';
import type { Packet } from '../../shared/schemas/packet';

let h: Harness;
let packet: Packet;
beforeAll(async () => {
  h = await startHarness({ CW_SIGN_IN_ATTEMPTS: '50' }, { demo: true });
  ({ packet } = await techPacket(h));
});
afterAll(async () => h?.close());

const signInRaw = (body: Record<string, unknown>) => h.call('POST', '/api/auth/sign-in', { body: { email: emailFor.technician, password: DEMO_PASSWORD, ...body } });
const refresh = (refreshToken: string) => h.call('POST', '/api/auth/refresh', { body: { refreshToken } });
const packetOf = (token: string) => h.call('GET', `/api/work-orders/${packet.workOrder.id}/packet`, { token });

/** A tablet that signed in with its device id, registered (escrow), then revoked by an administrator. */
async function revokedTablet(): Promise<{ deviceId: string; old: { accessToken: string; refreshToken: string } }> {
  const deviceId = randomUUID();
  const old = (await signInRaw({ deviceId })).json;
  expect((await h.call('POST', '/api/devices/escrow', { token: old.accessToken, body: { deviceId, label: 'Bench tablet T7' } })).status).toBe(200);
  expect((await h.call('POST', `/api/devices/${deviceId}/revoke`, { token: await h.tokenFor('admin') })).status).toBe(200);
  return { deviceId, old };
}

describe('T7 a revoked tablet signs in again, refreshes or asks for a packet: refused', () => {
  test('signing in again with the revoked device id: 403 device-revoked, no session made, audited (ASVS 5 V7)', async () => {
    const { deviceId } = await revokedTablet();
    const before = await countRows(h.db, 'sessions');
    const res = await signInRaw({ deviceId });
    expect(res.status).toBe(403);
    expect(res.json.error.code).toBe('device-revoked');
    expect(await countRows(h.db, 'sessions')).toEqual(before);
    expect(await h.db('audit_events').where({ action: 'auth.sign-in.device-revoked', target_id: deviceId }).first('id')).toBeTruthy();
  });

  test("the revoked tablet's old session: refresh and packet refused with device-revoked (ASVS 5 V7)", async () => {
    const { old } = await revokedTablet();
    const r = await refresh(old.refreshToken);
    expect(r.status).toBe(403);
    expect(r.json.error.code).toBe('device-revoked');
    const p = await packetOf(old.accessToken);
    expect(p.status).toBe(403);
    expect(p.json.error.code).toBe('device-revoked');
  });

  test('a session signed in without a device id gets no packet: 403, audited, no bitting sent (ASVS 5 V7; restricted records)', async () => {
    const res = await signInRaw({});
    expect(res.status).toBe(200);
    const p = await packetOf(res.json.accessToken);
    expect(p.status).toBe(403);
    expect(p.json.error.code).toBe('forbidden');
    expect(p.json.error.message).toMatch(/tablet/);
    expect(p.text).not.toMatch(/"pinning"/);
    expect(await h.db('audit_events').where({ action: 'access.denied', target_id: packet.workOrder.id }).first('id')).toBeTruthy();
    // control: the same user on a tablet gets the packet
    const onTablet = await signInRaw({ deviceId: randomUUID() });
    expect((await packetOf(onTablet.json.accessToken)).status).toBe(200);
  });

  test('the revoked tablet signed in without its device id: no packet, and its sync is refused (ASVS 5 V7)', async () => {
    const { deviceId } = await revokedTablet();
    const res = await signInRaw({});
    expect((await packetOf(res.json.accessToken)).status).toBe(403);
    const before = await countRows(h.db, 'completions');
    const sync = await h.call('POST', '/api/sync', { token: res.json.accessToken, body: { deviceId, records: [completionFor(packet.workOrder.id, packet.cores[0]!)] } });
    expect(sync.json.deviceRevoked).toBe(true);
    expect(await countRows(h.db, 'completions')).toEqual(before);
  });

  test('a session bound to a tablet that is revoked later is refused on every route at once, even if its session row was missed (ASVS 5 V7)', async () => {
    const deviceId = randomUUID();
    const s = (await signInRaw({ deviceId })).json;
    expect((await h.call('POST', '/api/devices/escrow', { token: s.accessToken, body: { deviceId } })).status).toBe(200);
    // Only the device row says revoked: the session is still open in its own row.
    await h.db('devices').where({ id: deviceId }).update({ revoked_at: h.db.fn.now() });
    const me = await h.call('GET', '/api/auth/me', { token: s.accessToken });
    expect(me.status).toBe(403);
    expect(me.json.error.code).toBe('device-revoked');
    expect((await refresh(s.refreshToken)).json.error.code).toBe('device-revoked');
  });
});

describe('T8 parallel refreshes with one refresh token', () => {
  test('ten parallel refreshes: all answer 200 with the same new pair, and the user stays signed in (RFC 9700 4.14.2)', async () => {
    const s = await h.signIn(emailFor.supervisor);
    const replies = await Promise.all(Array.from({ length: 10 }, () => refresh(s.refreshToken)));
    expect(replies.map((r) => r.status)).toEqual(Array(10).fill(200));
    const pairs = new Set(replies.map((r) => `${r.json.accessToken} ${r.json.refreshToken}`));
    expect(pairs.size).toBe(1);
    const [next] = replies;
    expect(next!.json.refreshToken).not.toBe(s.refreshToken);
    expect((await h.call('GET', '/api/auth/me', { token: next!.json.accessToken })).status).toBe(200);
    const again = await refresh(next!.json.refreshToken);
    expect(again.status).toBe(200);
    expect((await h.call('GET', '/api/auth/me', { token: again.json.accessToken })).status).toBe(200);
  });

  test('a retried request inside the grace window gets the same pair again; nothing usable is stored at rest (RFC 9700 4.14.2; ASVS 5 11.3)', async () => {
    const s = await h.signIn(emailFor.technician);
    const a = await refresh(s.refreshToken);
    const b = await refresh(s.refreshToken);
    expect(b.status).toBe(200);
    expect(b.json).toEqual(a.json);
    const sid = s.refreshToken.split('.')[0]!;
    const raw = (await h.db.raw('select s::text as row from sessions s where id = ?', [sid])).rows[0].row as string;
    const [, nextSecret] = a.json.refreshToken.split('.');
    for (const secret of [nextSecret, s.refreshToken.split('.')[1], a.json.accessToken.split('.')[2]]) expect(raw).not.toContain(secret);
    expect(raw).toContain(sha256(nextSecret));
  });

  test('a wrong secret for a known session is refused but does not end the session (RFC 9700 4.14.2)', async () => {
    const s = await h.signIn(emailFor.supervisor);
    const [sid] = s.refreshToken.split('.');
    const guess = await refresh(`${sid}.${'A'.repeat(43)}`);
    expect(guess.status).toBe(401);
    expect((await h.call('GET', '/api/auth/me', { token: s.accessToken })).status).toBe(200);
    expect((await refresh(s.refreshToken)).status).toBe(200);
  });

  test('the rotated secret after the grace window is reuse and ends the session (RFC 9700 4.14.2)', async () => {
    const s = await h.signIn(emailFor.supervisor);
    const next = await refresh(s.refreshToken);
    await h.db('sessions').where({ id: s.refreshToken.split('.')[0] }).update({ previous_until: new Date(Date.now() - 1000) });
    const reuse = await refresh(s.refreshToken);
    expect(reuse.status).toBe(401);
    expect((await refresh(next.json.refreshToken)).status).toBe(401);
    expect((await h.call('GET', '/api/auth/me', { token: next.json.accessToken })).status).toBe(401);
    expect(await h.db('audit_events').where({ action: 'auth.refresh.reused' }).first('id')).toBeTruthy();
  });

  test('a secret two rotations old, even inside the window, is reuse and ends the session (RFC 9700 4.14.2)', async () => {
    const s = await h.signIn(emailFor.supervisor);
    const one = await refresh(s.refreshToken);
    const two = await refresh(one.json.refreshToken);
    expect(two.status).toBe(200);
    expect((await refresh(s.refreshToken)).status).toBe(401);
    expect((await h.call('GET', '/api/auth/me', { token: two.json.accessToken })).status).toBe(401);
  });
});
