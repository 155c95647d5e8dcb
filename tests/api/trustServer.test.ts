// Trust cases T1, T6 and T10 of ../shared/design/reliability.md: nothing a client sends stops
// the server, the development mailbox is not served through a proxy, and faults get clear answers.
// T1 runs the real server (server/index.ts) as a process, so "the process keeps serving" is a
// real process that did not exit, not an Express handle that swallowed an error.
import { randomUUID } from 'node:crypto';
import type { AddressInfo } from 'node:net';
import type { Server } from 'node:http';
import { parse as parseCsv } from 'csv-parse/sync';
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { createApp } from '../../server/app';
import { trustProxyOf } from '../../server/config';
import { createDb } from '../../server/db';
import { completionFor, techPacket } from './factories';
import { countRows, emailFor, startHarness, type Harness } from './harness';
import { freeLoopbackPort, serverProcess, type ServerProcess } from './support/serverProcess';

let h: Harness;
beforeAll(async () => {
  h = await startHarness({}, { demo: true });
});
afterAll(async () => h?.close());

const json = (body: unknown) => ({ method: 'POST', headers: { 'Content-Type': 'application/json' }, body: JSON.stringify(body) });
const LONG_EMAIL = `${'a'.repeat(288)}@example.test`; // 301 characters: over the 254 the column holds (RFC 5321 4.5.3.1.3)

/** Sends the requests one after another and returns their statuses. */
async function statuses(base: string, path: string, bodies: unknown[]): Promise<number[]> {
  const out: number[] = [];
  for (const b of bodies) out.push((await fetch(base + path, json(b))).status);
  return out;
}

describe('T1 anonymous input that reaches the lockout, the audit writer or a side path never stops the server', () => {
  let server: ServerProcess;
  beforeAll(async () => {
    server = await serverProcess({ env: { CW_SIGN_IN_ATTEMPTS: '5' } });
    await server.start();
  });
  afterAll(async () => server?.kill());

  test('five failed sign-ins with a 300-character e-mail, then a sixth: 400s then 429, and /api/health still answers (ASVS 5 V16; Node.js docs, unhandledRejection)', async () => {
    const got = await statuses(server.base, '/api/auth/sign-in', Array.from({ length: 6 }, () => ({ email: LONG_EMAIL, password: 'wrong' })));
    expect(got).toEqual([400, 400, 400, 400, 400, 429]);
    const seventh = await fetch(`${server.base}/api/auth/sign-in`, json({ email: LONG_EMAIL, password: 'wrong' }));
    expect(seventh.status).toBe(429);
    expect(Number(seventh.headers.get('retry-after'))).toBeGreaterThan(0);
    await new Promise((r) => setTimeout(r, 300)); // a rejection nobody awaited would end the process about now
    expect(server.running, server.output()).toBe(true);
    expect((await fetch(`${server.base}/api/health`)).status).toBe(200);
    // The lockout is recorded without the unusable address (validated before any write).
    const locked = (await h.db('audit_events').where({ action: 'auth.sign-in.locked' }).whereNull('actor_email').count({ n: '*' }).first()) as { n: number };
    expect(locked.n).toBeGreaterThanOrEqual(2);
  });

  test('five failed sign-ins with a plain e-mail, then a sixth with a 300-character one: every answer is 4xx and the server keeps serving (ASVS 5 V16)', async () => {
    const email = 'nobody-t1@demo.corewright.test';
    const got = await statuses(server.base, '/api/auth/sign-in', [...Array.from({ length: 5 }, () => ({ email, password: 'wrong' })), { email: `${'b'.repeat(300)}@example.test`, password: 'wrong' }]);
    expect(got.every((s) => s >= 400 && s < 500)).toBe(true);
    expect(server.running, server.output()).toBe(true);
    expect((await fetch(`${server.base}/api/health`)).status).toBe(200);
  });

  test('a NUL byte in the e-mail of /api/auth/set-password, six times: 400s then 429, and the server keeps serving (PostgreSQL docs: text cannot hold NUL)', async () => {
    const got = await statuses(server.base, '/api/auth/set-password', Array.from({ length: 6 }, () => ({ token: 'x'.repeat(40), password: 'long enough password', email: 'a\u0000@example.test' })));
    expect(got).toEqual([400, 400, 400, 400, 400, 429]);
    await new Promise((r) => setTimeout(r, 300));
    expect(server.running, server.output()).toBe(true);
    expect((await fetch(`${server.base}/api/health`)).status).toBe(200);
  });

  test('the NUL and long-e-mail sequences sent in parallel, twice over: the server still answers (ASVS 5 V16)', async () => {
    const bodies = Array.from({ length: 12 }, (_, i) => (i % 2 ? { email: `c\u0000${i}@example.test`, password: 'x' } : { email: `${'d'.repeat(299)}${i}@example.test`, password: 'x' }));
    const got = await Promise.all(bodies.map((b) => fetch(`${server.base}/api/auth/sign-in`, json(b)).then((r) => r.status)));
    expect(got.every((s) => s === 400 || s === 429)).toBe(true);
    expect(server.running, server.output()).toBe(true);
    expect((await fetch(`${server.base}/api/health`)).status).toBe(200);
  });
});

describe('T1 and T10 with Postgres down: a 429 keeps the server up, and every answer is a 503', () => {
  let server: ServerProcess;
  beforeAll(async () => {
    const deadPort = await freeLoopbackPort(); // nothing listens there: Postgres is "down"
    server = await serverProcess({ env: { CW_SIGN_IN_ATTEMPTS: '5', DATABASE_URL: `postgres://corewright@127.0.0.1:${deadPort}/corewright` }, ready: 'answering' });
    await server.start();
  });
  afterAll(async () => server?.kill());

  test('T1: the sixth invalid sign-in is a 429 whose audit write fails, and the process keeps serving (Node.js docs, unhandledRejection)', async () => {
    const got = await statuses(server.base, '/api/auth/sign-in', Array.from({ length: 6 }, () => ({ email: 'not an address', password: 'x' })));
    expect(got).toEqual([400, 400, 400, 400, 400, 429]);
    await new Promise((r) => setTimeout(r, 300));
    expect(server.running, server.output()).toBe(true);
    const health = await fetch(`${server.base}/api/health`);
    expect(health.status).toBe(503);
  });

  test('T10: a sign-in that needs the database: 503, code unavailable, Retry-After (RFC 9110 15.6.4)', async () => {
    const res = await fetch(`${server.base}/api/auth/sign-in`, json({ email: emailFor.technician, password: 'corewright-demo' }));
    expect(res.status).toBe(503);
    expect(Number(res.headers.get('retry-after'))).toBeGreaterThan(0);
    expect(((await res.json()) as { error: { code: string } }).error.code).toBe('unavailable');
    expect(server.running).toBe(true);
  });
});

describe('T10 clear answers under faults', () => {
  /** The real app in process over a database handle that points at a port where nothing listens. */
  async function appWithoutDatabase(): Promise<{ base: string; close: () => Promise<void> }> {
    const url = `postgres://corewright@127.0.0.1:${await freeLoopbackPort()}/corewright`;
    const db = createDb(url);
    const app = createApp({ db, config: { ...h.config, databaseUrl: url }, log: () => {} });
    const server: Server = await new Promise((resolve) => {
      const s = app.listen(0, '127.0.0.1', () => resolve(s));
    });
    const base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
    return { base, close: async () => (await new Promise<void>((r) => server.close(() => r())), await db.destroy()) };
  }

  test('Postgres down: an authenticated read is 503 unavailable with Retry-After, never 500 internal (RFC 9110 15.6.4)', async () => {
    const token = await h.tokenFor('supervisor');
    const down = await appWithoutDatabase();
    try {
      for (const path of ['/api/doors', '/api/work-orders', '/api/completions']) {
        const res = await fetch(down.base + path, { headers: { Authorization: `Bearer ${token}` } });
        expect(res.status, path).toBe(503);
        expect(res.headers.get('retry-after'), path).toMatch(/^[1-9][0-9]*$/);
        const body = (await res.json()) as { error: { code: string; message: string } };
        expect(body.error.code).toBe('unavailable');
        expect(body.error.message).toMatch(/database/);
      }
    } finally {
      await down.close();
    }
  });

  test('Postgres down: /api/health answers 503 with the database down, so a load balancer takes the instance out (RFC 9110 15.6.4; common practice)', async () => {
    const down = await appWithoutDatabase();
    try {
      const res = await fetch(`${down.base}/api/health`);
      expect(res.status).toBe(503);
      expect(res.headers.get('retry-after')).toMatch(/^[1-9]/);
      expect(await res.json()).toMatchObject({ status: 'degraded', database: { state: 'down' } });
    } finally {
      await down.close();
    }
    expect((await h.call('GET', '/api/health')).status).toBe(200); // control: the same app with its database
  });

  describe('the audit row goes in the same transaction as the write (ASVS 5 V16: a committed change is never answered 500)', () => {
    // A trigger that refuses one audit action stands in for the audit insert failing after the write.
    const refuseAudit = async (action: string) => {
      await h.db.raw(`CREATE OR REPLACE FUNCTION cw_test_refuse_audit() RETURNS trigger LANGUAGE plpgsql AS $$ BEGIN IF NEW.action = '${action}' THEN RAISE EXCEPTION 'audit refused for the test'; END IF; RETURN NEW; END $$`);
      await h.db.raw('CREATE TRIGGER cw_test_refuse_audit BEFORE INSERT ON audit_events FOR EACH ROW EXECUTE FUNCTION cw_test_refuse_audit()');
    };
    const allowAudit = async () => {
      await h.db.raw('DROP TRIGGER IF EXISTS cw_test_refuse_audit ON audit_events');
      await h.db.raw('DROP FUNCTION IF EXISTS cw_test_refuse_audit()');
    };

    test.each([
      ['door.created', 'POST', '/api/doors', { site: 'Quillon Hill College', building: 'Aster Hall', label: 'AH-T10' }, 'doors'],
      ['user.invited', 'POST', '/api/users', { email: 'audit-t10@demo.corewright.test', name: 'Audit Check', role: 'technician' }, 'users'],
      ['profile.created', 'POST', '/api/profiles', { id: 'audit-t10', label: 'Audit check', chambers: 7, minDepth: 0, maxDepth: 7, stackUnits: 23, sleeveUnits: 10, minWaferUnits: 2, step: 2, maxAdjacentCut: 7, bottomPins: [0, 1, 2, 3, 4, 5, 6, 7], wafers: [2, 3, 4, 5, 6, 7, 8, 9, 10], topPins: [3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13], chamberOneAt: 'back' }, 'profiles'],
    ])('%s: when its audit row fails, the write is rolled back too', async (action, method, path, body, table) => {
      const admin = await h.tokenFor('admin');
      const before = await countRows(h.db, table, 'audit_events');
      await refuseAudit(action);
      try {
        const res = await h.call(method, path, { token: admin, body });
        expect(res.status).toBe(500);
        expect(res.json.error.code).toBe('internal');
      } finally {
        await allowAudit();
      }
      expect(await countRows(h.db, table, 'audit_events')).toEqual(before);
    });

    test('a resent invitation whose audit fails leaves the earlier link as it was', async () => {
      const admin = await h.tokenFor('admin');
      const invited = await h.call('POST', '/api/users', { token: admin, body: { email: 'resend-t10@demo.corewright.test', name: 'Resend Check', role: 'technician' } });
      expect(invited.status).toBe(201);
      const userId = invited.json.user.id as string;
      const before = await h.db('invitations').where({ user_id: userId }).select('token_hash', 'expires_at');
      await refuseAudit('user.invitation-resent');
      try {
        expect((await h.call('POST', `/api/users/${userId}/invitation`, { token: admin })).status).toBe(500);
      } finally {
        await allowAudit();
      }
      expect(await h.db('invitations').where({ user_id: userId }).select('token_hash', 'expires_at')).toEqual(before);
    });

    test('a sync batch that committed still answers 200 when its audit row fails (the replay would only get duplicates)', async () => {
      const { token, packet } = await techPacket(h);
      const record = completionFor(packet.workOrder.id, packet.cores[0]!);
      await refuseAudit('sync.batch');
      let res;
      try {
        res = await h.call('POST', '/api/sync', { token, body: { deviceId: randomUUID(), records: [record] } });
      } finally {
        await allowAudit();
      }
      expect(res.status).toBe(200);
      expect(res.json.accepted).toEqual([record.clientId]);
      expect(await h.db('completions').where({ id: record.clientId }).first('id')).toEqual({ id: record.clientId });
    });

    test('a device revoke whose audit fails leaves the tablet and its sessions as they were', async () => {
      const tech = await h.signIn(emailFor.technician);
      const deviceId = (await h.db('sessions').orderBy('created_at', 'desc').first('device_id')).device_id as string;
      expect((await h.call('POST', '/api/devices/escrow', { token: tech.accessToken, body: { deviceId } })).status).toBe(200);
      await refuseAudit('device.revoked');
      try {
        expect((await h.call('POST', `/api/devices/${deviceId}/revoke`, { token: await h.tokenFor('admin') })).status).toBe(500);
      } finally {
        await allowAudit();
      }
      expect(await h.db('devices').where({ id: deviceId }).first('revoked_at')).toEqual({ revoked_at: null });
      expect((await h.call('GET', '/api/auth/me', { token: tech.accessToken })).status).toBe(200);
    });
  });

  describe('uploads (multer) answer in our error shape', () => {
    const form = (field: string, bytes: number) => {
      const f = new FormData();
      f.append(field, new Blob(['site,building,label\n' + 'x'.repeat(bytes)], { type: 'text/csv' }), 'doors.csv');
      return f;
    };
    test('a file over the 1 MB limit: 413 payload-too-large naming the field (RFC 9110 15.5.14)', async () => {
      const res = await h.call('POST', '/api/doors/import', { token: await h.tokenFor('admin'), raw: form('file', 1024 * 1024 + 10) });
      expect(res.status).toBe(413);
      expect(res.json.error).toMatchObject({ code: 'payload-too-large', details: [{ field: 'file' }] });
      expect(res.json.error.message).toMatch(/1 MB/);
    });
    test('a file under another field name: 400 naming that field (common practice)', async () => {
      const res = await h.call('POST', '/api/key-systems/00000000-0000-4000-8000-000000000000/import', { token: await h.tokenFor('admin'), raw: form('upload', 10) });
      expect(res.status).toBe(400);
      expect(res.json.error).toMatchObject({ code: 'validation', details: [{ field: 'upload' }] });
      expect(res.json.error.message).toMatch(/"file"/);
    });
  });

  test('the CSV export neutralises every cell starting with = + - @ tab or CR, and quotes every cell holding ; or , (OWASP CSV Injection)', async () => {
    const row = await h.db('completions').whereNotNull('work_order_id').first('id', 'work_order_id');
    await h.db('work_orders').where({ id: row.work_order_id }).update({ title: 'Aster Hall;=1+2' });
    await h.db('completions').where({ id: row.id }).update({ technician_name: '-2+3', door_label: '@SUM(A1)', core_tag: '\t=1' });
    const res = await h.call('GET', `/api/completions.csv?workOrderId=${row.work_order_id}`, { token: await h.tokenFor('supervisor') });
    expect(res.status).toBe(200);
    expect(res.text).toContain('"Aster Hall;=1+2"');
    const line = res.text.split('\r\n').find((l) => l.includes(row.id))!;
    expect(line).toContain(",'-2+3,");
    expect(line).toContain(",'@SUM(A1),");
    expect(line).toContain("'\t=1");
    const cells: Record<string, string>[] = parseCsv(res.text, { columns: true });
    for (const r of cells) for (const v of Object.values(r)) expect(v, v).not.toMatch(/^[=+\-@\t\r]/);
  });
});

describe('T6 the development mailbox is not served through a proxy', () => {
  const mailbox = (headers: Record<string, string> = {}) => h.call('GET', '/api/dev/mailbox', { headers });

  test('a caller on this machine gets the mailbox (control)', async () => {
    expect((await mailbox()).status).toBe(200);
  });

  test('a request a loopback proxy relays for an outside address (X-Forwarded-For) gets 404 (ASVS 5 V13)', async () => {
    for (const xff of ['203.0.113.7', '127.0.0.1, 203.0.113.7', '::1, 198.51.100.2', '10.0.0.5']) {
      const res = await mailbox({ 'X-Forwarded-For': xff });
      expect(res.status, xff).toBe(404);
      expect(res.json.error.code).toBe('not-found');
      expect(res.text).not.toContain('messages');
    }
  });

  test('a production app has no mailbox at all, even for loopback (ASVS 5 V13)', async () => {
    const app = createApp({ db: h.db, config: { ...h.config, env: 'production' }, smtp: h.smtp, log: () => {} });
    const server: Server = await new Promise((resolve) => {
      const s = app.listen(0, '127.0.0.1', () => resolve(s));
    });
    try {
      const res = await fetch(`http://127.0.0.1:${(server.address() as AddressInfo).port}/api/dev/mailbox`);
      expect(res.status).toBe(404);
    } finally {
      await new Promise<void>((r) => server.close(() => r()));
    }
  });

  test('trust proxy is explicit: CW_TRUST_PROXY reads as false, a hop count or named addresses, loopback by default; "true" is refused (Express docs, trust proxy)', () => {
    expect(trustProxyOf(undefined)).toBe('loopback');
    expect(trustProxyOf('false')).toBe(false);
    expect(trustProxyOf('1')).toBe(1);
    expect(trustProxyOf('10.0.0.0/8, loopback')).toBe('10.0.0.0/8, loopback');
    expect(() => trustProxyOf('true')).toThrow(/any client/);
  });
});

describe('T10 only failed sign-ins count toward the lockout', () => {
  test('eight parallel correct sign-ins for one account (the limit is 5) all succeed (OWASP Authentication Cheat Sheet: lock out on failures)', async () => {
    const got = await Promise.all(Array.from({ length: 8 }, () => h.call('POST', '/api/auth/sign-in', { body: { email: emailFor.supervisor, password: 'corewright-demo' } }).then((r) => r.status)));
    expect(got).toEqual(Array(8).fill(200));
  });
});
