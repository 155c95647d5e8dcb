// Two API processes on one database, as behind a load balancer (issue: stateless API).
// Everything that matters is shared through PostgreSQL: the sign-in lockout
// (sign_in_failures), sessions (sign-out), sync idempotency (the client id's primary key)
// and owed mail (notifications sent under a row lock; a key audit's reminder queued once a
// day). Common practice for horizontally scaled services (The Twelve-Factor App, VI: processes are stateless and share nothing).
import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { startFakeSmtp, type FakeSmtp } from '../../server/dev/fakeSmtp';
import { completionFor, techPacket } from './factories';
import { emailFor, startHarness, type Harness } from './harness';
import { serverProcess, type ServerProcess } from './support/serverProcess';

let h: Harness;
let smtp: FakeSmtp;
let a: ServerProcess;
let b: ServerProcess;

beforeAll(async () => {
  h = await startHarness({}, { demo: true });
  smtp = await startFakeSmtp();
  // Both send owed mail every 200 ms to the same SMTP server, so they race for every row.
  const env = { CW_SIGN_IN_ATTEMPTS: '5', CW_SMTP_PORT: String(smtp.port), CW_OWED_MAIL_INTERVAL_MS: '200' };
  [a, b] = await Promise.all([serverProcess({ env, readyTimeoutMs: 60_000 }), serverProcess({ env, readyTimeoutMs: 60_000 })]);
  await Promise.all([a.start(), b.start()]);
}, 120_000);
afterAll(async () => {
  await Promise.all([a?.kill(), b?.kill()]);
  await smtp?.close();
  await h?.close();
});

async function call(server: ServerProcess, method: string, path: string, opts: { token?: string; body?: unknown } = {}) {
  const res = await fetch(server.base + path, {
    method,
    headers: { 'content-type': 'application/json', ...(opts.token ? { authorization: `Bearer ${opts.token}` } : {}) },
    body: opts.body === undefined ? undefined : JSON.stringify(opts.body),
  });
  const text = await res.text();
  return { status: res.status, json: text ? (JSON.parse(text) as Record<string, unknown>) : null };
}

describe('two API processes on one database', () => {
  test('the sign-in lockout counts failures from both: the sixth failure is refused by either process (OWASP Authentication Cheat Sheet)', async () => {
    const email = 'nobody-two-processes@demo.corewright.test';
    const wrong = { email, password: 'not the password' };
    const statuses: number[] = [];
    // Alternate, so neither process alone has seen five failures.
    for (const server of [a, b, a, b, a]) statuses.push((await call(server, 'POST', '/api/auth/sign-in', { body: wrong })).status);
    expect(statuses).toEqual([401, 401, 401, 401, 401]);
    const sixth = await call(b, 'POST', '/api/auth/sign-in', { body: wrong });
    expect(sixth.status, 'process b saw only two failures itself').toBe(429);
    expect((await call(a, 'POST', '/api/auth/sign-in', { body: wrong })).status).toBe(429);
    // Control: another account from the same address is not locked.
    expect((await call(b, 'POST', '/api/auth/sign-in', { body: { email: emailFor.supervisor, password: 'corewright-demo' } })).status).toBe(200);
  });

  test('sign-out on one process ends the session on the other at once', async () => {
    const signedIn = await call(a, 'POST', '/api/auth/sign-in', { body: { email: emailFor.supervisor, password: 'corewright-demo' } });
    expect(signedIn.status).toBe(200);
    const token = signedIn.json!.accessToken as string;
    expect((await call(b, 'GET', '/api/auth/me', { token })).status).toBe(200);
    expect((await call(b, 'POST', '/api/auth/sign-out', { token })).status).toBe(204);
    expect((await call(a, 'GET', '/api/auth/me', { token })).status).toBe(401);
  });

  test('one sync batch sent to both at once lands once: one accepts, the other answers duplicates', async () => {
    const { token, packet } = await techPacket(h);
    const records = packet.cores.slice(0, 3).map((core) => completionFor(packet.workOrder.id, core));
    const body = { deviceId: randomUUID(), records };
    const [ra, rb] = await Promise.all([call(a, 'POST', '/api/sync', { token, body }), call(b, 'POST', '/api/sync', { token, body })]);
    expect([ra.status, rb.status]).toEqual([200, 200]);
    const ids = records.map((r) => r.clientId).sort();
    const accepted = [...(ra.json!.accepted as string[]), ...(rb.json!.accepted as string[])].sort();
    const duplicates = [...(ra.json!.duplicates as string[]), ...(rb.json!.duplicates as string[])].sort();
    expect(accepted).toEqual(ids);
    expect(duplicates).toEqual(ids);
    expect(Number((await h.db('completions').whereIn('id', ids).count({ n: '*' }).first())!.n)).toBe(3);
  });

  test('owed mail goes out once although both processes send it every 200 ms', async () => {
    const { token, packet } = await techPacket(h);
    const failed = packet.cores.slice(3, 6).map((core) => completionFor(packet.workOrder.id, core, { result: 'failed' }));
    const res = await call(a, 'POST', '/api/sync', { token, body: { deviceId: randomUUID(), records: failed } });
    expect(res.status).toBe(200);
    expect(res.json!.accepted).toHaveLength(3);
    const ids = failed.map((r) => r.clientId);
    const owed = await h.db('notifications').whereIn('ref_id', ids).select('id');
    expect(owed).toHaveLength(3);
    const deadline = Date.now() + 15_000;
    while (Date.now() < deadline && (await h.db('notifications').whereIn('ref_id', ids).whereNull('sent_at').first('id'))) await new Promise((r) => setTimeout(r, 100));
    await new Promise((r) => setTimeout(r, 1_000)); // room for a second, wrong, send to arrive
    const tags = packet.cores.slice(3, 6).map((c) => c.tag);
    const mails = smtp.messages.filter((m) => tags.some((t) => m.subject.includes(`core ${t} `)));
    const perTag = tags.map((t) => mails.filter((m) => m.subject.includes(`core ${t} `)).length);
    const recipients = new Set(mails.map((m) => m.to.join(','))).size;
    expect(recipients).toBeGreaterThan(0);
    expect(perTag, mails.map((m) => m.subject).join('\n')).toEqual(tags.map(() => recipients));
  });

  test('a key audit\'s daily reminder goes out once to each holder not answered, although both processes queue and send every 200 ms', async () => {
    const signedIn = await call(b, 'POST', '/api/auth/sign-in', { body: { email: emailFor.supervisor, password: 'corewright-demo' } });
    const token = signedIn.json!.accessToken as string;
    const library = (await h.db('departments').where({ name: 'Library Services' }).first('id')).id as string;
    const started = await call(a, 'POST', '/api/key-audits', { token, body: { title: 'Two processes', departmentId: library } });
    expect(started.status).toBe(201);
    const audit = started.json!.keyAudit as { id: string; number: number; people: { email: string }[] };
    const asked = audit.people.map((p) => p.email);
    expect(asked.length).toBeGreaterThan(1);
    // As if the first mail went yesterday: both processes now race to queue and send the reminders.
    const dayOld = () => h.db('key_campaign_holders').where({ campaign_id: audit.id }).update({ mailed_at: h.db.raw(`now() - interval '25 hours'`) });
    await dayOld();
    const deadline = Date.now() + 15_000;
    const handled = async () => Number((await h.db('key_audit_reminders as r').join('key_campaign_holders as ch', 'ch.id', 'r.campaign_holder_id').where('ch.campaign_id', audit.id).whereNotNull('r.done_at').count({ n: '*' }).first())!.n);
    while (Date.now() < deadline && (await handled()) < asked.length) await new Promise((r) => setTimeout(r, 100));
    // Pushed back again the same day: the day's reminder is already on record, so neither process sends another.
    await dayOld();
    await new Promise((r) => setTimeout(r, 1_000));
    const reminders = smtp.messages.filter((m) => m.subject === `Reminder: Key audit #${audit.number}: please confirm the keys you hold`);
    expect(asked.map((e) => reminders.filter((m) => m.to.includes(e)).length), reminders.map((m) => m.to.join(',')).join('\n')).toEqual(asked.map(() => 1));
  });
});
