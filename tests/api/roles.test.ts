// Every role against every route (A-3: deny by default, 403 where not allowed, OWASP ASVS 5 V8),
// and a technician reaching for another technician's work order (A4, ASVS 5 8.2.2).
// See ../shared/design/reliability.md.
import { readFileSync, readdirSync } from 'node:fs';
import path from 'node:path';
import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { createApp } from '../../server/app';
import { startHarness, type Harness } from './harness';

type Role = 'technician' | 'supervisor' | 'admin';
type Who = 'none' | Role;
const ALL: Role[] = ['technician', 'supervisor', 'admin'];
const SUP: Role[] = ['supervisor', 'admin'];
const ADM: Role[] = ['admin'];

interface Entry {
  /** As registered in Express. */
  method: string;
  route: string;
  /** The path called: {ks} key system, {key} key, {door}, {core}, {wo} the demo technician's work order, {user}, {completion}. */
  path: string;
  /** 'public': no token needed; 'signed-in': any role. */
  allow: Role[] | 'public' | 'signed-in';
  /** The status an allowed caller gets with this request (bodies are empty: writes stop at validation where they can). */
  ok: number;
  body?: unknown;
  /** The request ends the caller's session: use a fresh one. */
  fresh?: boolean;
}

// One line per route mounted in server/app.ts (server/routes/*.ts). A route missing here fails the
// "every registered route is in the matrix" test below.
const matrix: Entry[] = [
  { method: 'GET', route: '/api/health', path: '/api/health', allow: 'public', ok: 200 },
  { method: 'POST', route: '/api/auth/sign-in', path: '/api/auth/sign-in', allow: 'public', ok: 400, body: {} },
  { method: 'POST', route: '/api/auth/refresh', path: '/api/auth/refresh', allow: 'public', ok: 400, body: {} },
  { method: 'POST', route: '/api/auth/set-password', path: '/api/auth/set-password', allow: 'public', ok: 400, body: {} },
  { method: 'POST', route: '/api/auth/sign-out', path: '/api/auth/sign-out', allow: 'signed-in', ok: 204, fresh: true },
  { method: 'GET', route: '/api/auth/me', path: '/api/auth/me', allow: 'signed-in', ok: 200 },
  { method: 'GET', route: '/api/dev/mailbox', path: '/api/dev/mailbox', allow: 'public', ok: 200 },
  { method: 'GET', route: '/api/users', path: '/api/users', allow: ADM, ok: 200 },
  { method: 'GET', route: '/api/technicians', path: '/api/technicians', allow: SUP, ok: 200 },
  { method: 'POST', route: '/api/users', path: '/api/users', allow: ADM, ok: 400, body: {} },
  { method: 'PATCH', route: '/api/users/:id', path: '/api/users/{user}', allow: ADM, ok: 200, body: {} },
  // bench2@ has a password: the resend is refused for that reason, not for access.
  { method: 'POST', route: '/api/users/:id/invitation', path: '/api/users/{user}/invitation', allow: ADM, ok: 409, body: {} },
  { method: 'GET', route: '/api/audit-events', path: '/api/audit-events', allow: ADM, ok: 200 },
  { method: 'GET', route: '/api/audit-events.csv', path: '/api/audit-events.csv', allow: ADM, ok: 200 },
  { method: 'GET', route: '/api/profiles', path: '/api/profiles', allow: SUP, ok: 200 },
  { method: 'POST', route: '/api/profiles', path: '/api/profiles', allow: ADM, ok: 400, body: {} },
  { method: 'PUT', route: '/api/profiles/:pid', path: '/api/profiles/sfic-7', allow: ADM, ok: 400, body: {} },
  { method: 'GET', route: '/api/key-systems', path: '/api/key-systems', allow: SUP, ok: 200 },
  { method: 'POST', route: '/api/key-systems', path: '/api/key-systems', allow: ADM, ok: 400, body: {} },
  { method: 'GET', route: '/api/key-systems/:id', path: '/api/key-systems/{ks}', allow: SUP, ok: 200 },
  { method: 'PATCH', route: '/api/key-systems/:id', path: '/api/key-systems/{ks}', allow: ADM, ok: 200, body: {} },
  { method: 'GET', route: '/api/key-systems/:id/keys', path: '/api/key-systems/{ks}/keys', allow: SUP, ok: 200 },
  { method: 'POST', route: '/api/key-systems/:id/keys', path: '/api/key-systems/{ks}/keys', allow: ADM, ok: 400, body: {} },
  { method: 'PATCH', route: '/api/key-systems/:id/keys/:keyId', path: '/api/key-systems/{ks}/keys/{key}', allow: ADM, ok: 200, body: {} },
  { method: 'GET', route: '/api/key-systems/:id/keys/:keyId/operates', path: '/api/key-systems/{ks}/keys/{key}/operates', allow: SUP, ok: 200 },
  { method: 'POST', route: '/api/key-systems/:id/keys/:keyId/replace', path: '/api/key-systems/{ks}/keys/{key}/replace', allow: ADM, ok: 400, body: {} },
  { method: 'POST', route: '/api/key-systems/:id/progression', path: '/api/key-systems/{ks}/progression', allow: ADM, ok: 400, body: {} },
  { method: 'POST', route: '/api/key-systems/:id/import', path: '/api/key-systems/{ks}/import', allow: ADM, ok: 400, body: {} },
  { method: 'GET', route: '/api/key-systems/:id/system-audit', path: '/api/key-systems/{ks}/system-audit', allow: SUP, ok: 200 },
  { method: 'POST', route: '/api/key-systems/:id/system-audit/acknowledgements', path: '/api/key-systems/{ks}/system-audit/acknowledgements', allow: ADM, ok: 400, body: {} },
  // The old paths answer 308 to the new ones (followed here, so the new route's roles decide; see systemAuditRedirect.test.ts).
  { method: 'GET', route: '/api/key-systems/:id/audit', path: '/api/key-systems/{ks}/audit', allow: SUP, ok: 200 },
  { method: 'POST', route: '/api/key-systems/:id/audit/acknowledgements', path: '/api/key-systems/{ks}/audit/acknowledgements', allow: ADM, ok: 400, body: {} },
  { method: 'GET', route: '/api/doors', path: '/api/doors', allow: SUP, ok: 200 },
  { method: 'POST', route: '/api/doors', path: '/api/doors', allow: ADM, ok: 400, body: {} },
  { method: 'POST', route: '/api/doors/import', path: '/api/doors/import', allow: ADM, ok: 400, body: {} },
  { method: 'GET', route: '/api/doors/:id', path: '/api/doors/{door}', allow: SUP, ok: 200 },
  { method: 'PATCH', route: '/api/doors/:id', path: '/api/doors/{door}', allow: ADM, ok: 200, body: {} },
  { method: 'GET', route: '/api/doors/:id/history', path: '/api/doors/{door}/history', allow: SUP, ok: 200 },
  { method: 'GET', route: '/api/cores', path: '/api/cores', allow: SUP, ok: 200 },
  { method: 'GET', route: '/api/cores/:id', path: '/api/cores/{core}', allow: SUP, ok: 200 },
  { method: 'PATCH', route: '/api/cores/:id', path: '/api/cores/{core}', allow: SUP, ok: 200, body: {} },
  { method: 'GET', route: '/api/work-orders', path: '/api/work-orders', allow: ALL, ok: 200 },
  { method: 'POST', route: '/api/work-orders', path: '/api/work-orders', allow: SUP, ok: 400, body: {} },
  { method: 'GET', route: '/api/work-orders/:id', path: '/api/work-orders/{wo}', allow: ALL, ok: 200 },
  { method: 'PATCH', route: '/api/work-orders/:id', path: '/api/work-orders/{wo}', allow: SUP, ok: 200, body: {} },
  { method: 'POST', route: '/api/work-orders/:id/doors', path: '/api/work-orders/{wo}/doors', allow: SUP, ok: 400, body: {} },
  { method: 'DELETE', route: '/api/work-orders/:id/cores/:coreId', path: `/api/work-orders/{wo}/cores/${randomUUID()}`, allow: SUP, ok: 404 },
  { method: 'GET', route: '/api/work-orders/:id/packet', path: '/api/work-orders/{wo}/packet', allow: ALL, ok: 200 },
  { method: 'GET', route: '/api/work-orders/:id/charts', path: '/api/work-orders/{wo}/charts', allow: SUP, ok: 200 },
  { method: 'POST', route: '/api/pinning-preview', path: '/api/pinning-preview', allow: SUP, ok: 400, body: {} },
  { method: 'POST', route: '/api/sync', path: '/api/sync', allow: ALL, ok: 400, body: {} },
  { method: 'GET', route: '/api/completions', path: '/api/completions', allow: SUP, ok: 200 },
  { method: 'GET', route: '/api/completions.csv', path: '/api/completions.csv', allow: SUP, ok: 200 },
  { method: 'GET', route: '/api/completions/:id', path: '/api/completions/{completion}', allow: SUP, ok: 200 },
  { method: 'GET', route: '/api/installs/mismatches', path: '/api/installs/mismatches', allow: SUP, ok: 200 },
  { method: 'POST', route: '/api/installs/:id/review', path: `/api/installs/${randomUUID()}/review`, allow: SUP, ok: 404, body: {} },
  { method: 'POST', route: '/api/devices/escrow', path: '/api/devices/escrow', allow: ALL, ok: 400, body: {} },
  { method: 'GET', route: '/api/devices', path: '/api/devices', allow: SUP, ok: 200 },
  { method: 'POST', route: '/api/devices/:id/revoke', path: `/api/devices/${randomUUID()}/revoke`, allow: ADM, ok: 404, body: {} },
  // Key control: office roles only; the authoriser's mailed link needs no sign-in.
  { method: 'GET', route: '/api/departments', path: '/api/departments', allow: SUP, ok: 200 },
  { method: 'POST', route: '/api/departments', path: '/api/departments', allow: SUP, ok: 400, body: {} },
  { method: 'GET', route: '/api/holders', path: '/api/holders', allow: SUP, ok: 200 },
  { method: 'POST', route: '/api/holders', path: '/api/holders', allow: SUP, ok: 400, body: {} },
  { method: 'POST', route: '/api/holders/import', path: '/api/holders/import', allow: SUP, ok: 400, body: {} },
  { method: 'GET', route: '/api/holders/:id', path: `/api/holders/${randomUUID()}`, allow: SUP, ok: 404 },
  { method: 'PATCH', route: '/api/holders/:id', path: `/api/holders/${randomUUID()}`, allow: SUP, ok: 404, body: {} },
  { method: 'GET', route: '/api/holders/:id/access', path: `/api/holders/${randomUUID()}/access`, allow: SUP, ok: 404 },
  { method: 'GET', route: '/api/key-systems/:id/control-keys', path: '/api/key-systems/{ks}/control-keys', allow: SUP, ok: 200 },
  { method: 'GET', route: '/api/key-issues', path: '/api/key-issues', allow: SUP, ok: 200 },
  { method: 'POST', route: '/api/key-issues', path: '/api/key-issues', allow: SUP, ok: 400, body: {} },
  { method: 'GET', route: '/api/key-issues/outstanding', path: '/api/key-issues/outstanding', allow: SUP, ok: 200 },
  { method: 'GET', route: '/api/key-issues/cut-list', path: '/api/key-issues/cut-list', allow: SUP, ok: 400 },
  { method: 'GET', route: '/api/key-issues/:id', path: `/api/key-issues/${randomUUID()}`, allow: SUP, ok: 404 },
  { method: 'POST', route: '/api/key-issues/:id/return', path: `/api/key-issues/${randomUUID()}/return`, allow: SUP, ok: 404, body: {} },
  { method: 'POST', route: '/api/key-issues/:id/transfer', path: `/api/key-issues/${randomUUID()}/transfer`, allow: SUP, ok: 400, body: {} },
  { method: 'POST', route: '/api/key-issues/:id/report', path: `/api/key-issues/${randomUUID()}/report`, allow: SUP, ok: 400, body: {} },
  { method: 'GET', route: '/api/keys/:id/exposure', path: '/api/keys/{key}/exposure', allow: SUP, ok: 200 },
  { method: 'GET', route: '/api/key-systems/:id/control-exposure', path: '/api/key-systems/{ks}/control-exposure', allow: SUP, ok: 200 },
  { method: 'GET', route: '/api/doors/:id/access', path: '/api/doors/{door}/access', allow: SUP, ok: 200 },
  { method: 'GET', route: '/api/key-reports', path: '/api/key-reports', allow: SUP, ok: 200 },
  { method: 'GET', route: '/api/key-reports/:id', path: `/api/key-reports/${randomUUID()}`, allow: SUP, ok: 404 },
  { method: 'GET', route: '/api/key-reports/:id/plan', path: `/api/key-reports/${randomUUID()}/plan`, allow: SUP, ok: 404 },
  { method: 'POST', route: '/api/key-reports/:id/work-order', path: `/api/key-reports/${randomUUID()}/work-order`, allow: SUP, ok: 404, body: {} },
  { method: 'POST', route: '/api/key-reports/:id/close', path: `/api/key-reports/${randomUUID()}/close`, allow: SUP, ok: 404, body: { note: 'Accepted by the office' } },
  { method: 'POST', route: '/api/key-requests/proposal', path: '/api/key-requests/proposal', allow: SUP, ok: 400, body: {} },
  { method: 'POST', route: '/api/key-requests', path: '/api/key-requests', allow: SUP, ok: 400, body: {} },
  { method: 'GET', route: '/api/key-requests', path: '/api/key-requests', allow: SUP, ok: 200 },
  { method: 'GET', route: '/api/key-requests/:id', path: `/api/key-requests/${randomUUID()}`, allow: SUP, ok: 404 },
  { method: 'POST', route: '/api/key-requests/:id/resend', path: `/api/key-requests/${randomUUID()}/resend`, allow: SUP, ok: 404, body: {} },
  { method: 'POST', route: '/api/key-requests/:id/decision', path: `/api/key-requests/${randomUUID()}/decision`, allow: SUP, ok: 400, body: {} },
  { method: 'POST', route: '/api/key-request-links/view', path: '/api/key-request-links/view', allow: 'public', ok: 400, body: {} },
  { method: 'POST', route: '/api/key-request-links/decide', path: '/api/key-request-links/decide', allow: 'public', ok: 400, body: {} },
  { method: 'POST', route: '/api/key-audits', path: '/api/key-audits', allow: SUP, ok: 400, body: {} },
  { method: 'GET', route: '/api/key-audits', path: '/api/key-audits', allow: SUP, ok: 200 },
  { method: 'GET', route: '/api/key-audits/:id', path: `/api/key-audits/${randomUUID()}`, allow: SUP, ok: 404 },
  { method: 'POST', route: '/api/key-audits/:id/reminders', path: `/api/key-audits/${randomUUID()}/reminders`, allow: SUP, ok: 404, body: {} },
  { method: 'POST', route: '/api/key-audits/:id/holders/:holderId/resend', path: `/api/key-audits/${randomUUID()}/holders/${randomUUID()}/resend`, allow: SUP, ok: 404, body: {} },
  { method: 'POST', route: '/api/key-audits/:id/close', path: `/api/key-audits/${randomUUID()}/close`, allow: SUP, ok: 404, body: {} },
  { method: 'GET', route: '/api/key-reissue-tasks', path: '/api/key-reissue-tasks', allow: SUP, ok: 200 },
  { method: 'POST', route: '/api/key-reissue-tasks/:id/issue', path: `/api/key-reissue-tasks/${randomUUID()}/issue`, allow: SUP, ok: 400, body: {} },
  { method: 'POST', route: '/api/key-audit-links/view', path: '/api/key-audit-links/view', allow: 'public', ok: 400, body: {} },
  { method: 'POST', route: '/api/key-audit-links/confirm', path: '/api/key-audit-links/confirm', allow: 'public', ok: 400, body: {} },
  // The key audit's paths before the rename answer 308 to the new ones (followed here; see keyAuditRedirect.test.ts).
  { method: 'POST', route: '/api/key-campaigns', path: '/api/key-campaigns', allow: SUP, ok: 400, body: {} },
  { method: 'GET', route: '/api/key-campaigns', path: '/api/key-campaigns', allow: SUP, ok: 200 },
  { method: 'GET', route: '/api/key-campaigns/:id', path: `/api/key-campaigns/${randomUUID()}`, allow: SUP, ok: 404 },
  { method: 'POST', route: '/api/key-campaign-links/view', path: '/api/key-campaign-links/view', allow: 'public', ok: 400, body: {} },
  { method: 'POST', route: '/api/key-campaign-links/confirm', path: '/api/key-campaign-links/confirm', allow: 'public', ok: 400, body: {} },
];

let h: Harness;
const ids: Record<string, string> = {};
let historyWoId: string;
let demoBittings: string[] = [];

beforeAll(async () => {
  // Public routes are called with bad bodies many times here: keep the sign-in limiter out of the way.
  h = await startHarness({ CW_SIGN_IN_ATTEMPTS: '1000' }, { demo: true });
  const one = async (q: Promise<{ id: string } | undefined>) => (await q)!.id;
  ids.ks = await one(h.db('key_systems').first('id'));
  ids.key = await one(h.db('keys').where({ symbol: 'AA1' }).first('id'));
  ids.door = await one(h.db('doors').where({ label: 'BL-101' }).first('id'));
  ids.core = await one(h.db('cores').orderBy('tag').first('id'));
  ids.user = await one(h.db('users').where({ email: 'bench2@demo.corewright.test' }).first('id'));
  ids.completion = await one(h.db('completions').first('id'));
  const techId = await one(h.db('users').where({ email: 'tech@demo.corewright.test' }).first('id'));
  ids.wo = await one(h.db('work_orders').where({ assignee_id: techId }).orderBy('number').first('id'));
  historyWoId = await one(h.db('work_orders').where({ status: 'done' }).first('id'));
  const admin = await h.tokenFor('admin');
  const control = (await h.call('GET', `/api/key-systems/${ids.ks}?reveal=1`, { token: admin })).json.keySystem.control;
  const keys = (await h.call('GET', `/api/key-systems/${ids.ks}/keys?reveal=1`, { token: admin })).json.keys as { bitting: string }[];
  demoBittings = [control, ...keys.map((k) => k.bitting)];
});
afterAll(async () => h.close());

const fill = (p: string) => p.replace(/\{(\w+)\}/g, (_m, name: string) => ids[name] ?? `{${name}}`);
const cases = matrix.flatMap((e) => (['none', ...ALL] as Who[]).map((who) => [`${e.method} ${e.route}`, who, e] as const));

describe('A-3: the role matrix (deny by default; ASVS 5 V8)', () => {
  test.each(cases)('%s as %s (A-3)', async (_name, who, e) => {
    let token: string | undefined;
    if (who !== 'none') token = e.fresh ? (await h.signIn({ technician: 'tech', supervisor: 'lead', admin: 'admin' }[who] + '@demo.corewright.test')).accessToken : await h.tokenFor(who);
    const res = await h.call(e.method, fill(e.path), { token, ...(e.body !== undefined ? { body: e.body } : {}) });
    const allowed = e.allow === 'public' || (who !== 'none' && (e.allow === 'signed-in' || e.allow.includes(who)));
    if (allowed) {
      // 2xx, or a 4xx that is not about access
      expect(res.status, res.text).toBe(e.ok);
      expect([401, 403]).not.toContain(res.status);
    } else if (who === 'none') {
      expect(res.status).toBe(401);
      expect(res.json.error.code).toBe('unauthenticated');
    } else {
      expect(res.status).toBe(403);
      expect(res.json.error.code).toBe('forbidden');
      for (const b of demoBittings) expect(res.text).not.toContain(b);
    }
  });

  test('an unknown API route: 401 without a token (deny by default, A-3), a JSON 404 with one (RFC 9110 15.5.5)', async () => {
    expect((await h.call('GET', '/api/not-a-route')).status).toBe(401);
    expect((await h.call('DELETE', '/api/doors')).status).toBe(401);
    const signed = await h.call('GET', '/api/not-a-route', { token: await h.tokenFor('admin') });
    expect(signed.status).toBe(404);
    expect(signed.json.error.code).toBe('not-found');
  });
});

describe('A-3: the matrix covers every route', () => {
  interface Layer {
    route?: { path: string; methods: Record<string, boolean> };
    handle?: { stack?: Layer[] };
    match?: (path: string) => unknown;
  }
  function routesOf(stack: Layer[], prefix: string, out: string[] = []): string[] {
    for (const layer of stack) {
      if (layer.route) {
        for (const [m, on] of Object.entries(layer.route.methods)) if (on && m !== '_all') out.push(`${m.toUpperCase()} ${prefix}${layer.route.path}`);
      } else if (layer.handle?.stack) {
        routesOf(layer.handle.stack, prefix, out);
      }
    }
    return out;
  }
  const listed = matrix.map((e) => `${e.method} ${e.route}`);

  test('every route registered in the Express app has exactly one matrix entry, and no entry is stale (A-3)', () => {
    const app = createApp({ db: h.db, config: h.config, smtp: h.smtp, log: () => {} }) as unknown as { router: { stack: Layer[] } };
    const mounted = app.router.stack.filter((l) => l.handle?.stack);
    expect(mounted).toHaveLength(1); // the /api router (no static folder in tests)
    expect(mounted[0]!.match!('/api')).toBeTruthy();
    expect(mounted[0]!.match!('/elsewhere')).toBeFalsy();
    const registered = routesOf(mounted[0]!.handle!.stack!, '/api');
    expect(registered.length).toBeGreaterThan(40);
    expect(new Set(listed).size).toBe(listed.length);
    expect([...registered].sort()).toEqual([...listed].sort());
  });

  test('the router files register as many routes as the matrix lists (a second count, by reading server/routes/*.ts; A-3)', () => {
    const dir = path.resolve(import.meta.dirname, '../../server/routes');
    const found: string[] = [];
    for (const file of readdirSync(dir).filter((f) => f.endsWith('.ts'))) {
      const text = readFileSync(path.join(dir, file), 'utf8');
      for (const m of text.matchAll(/\b(?:r|router)\.(get|post|put|patch|delete|all)\(\s*'([^']+)'/g)) found.push(`${m[1]!.toUpperCase()} /api${m[2]}`);
    }
    expect(found.sort()).toEqual([...listed].sort());
  });
});

describe("A4: a technician asks for another technician's work order (ASVS 5 8.2.2)", () => {
  const deniedFor = async (type: string) => Number(((await h.db('audit_events').where({ action: 'access.denied', actor_email: 'tech@demo.corewright.test', target_type: type, target_id: historyWoId }).count({ n: '*' }).first()) as { n: number }).n);
  function assertNoBitting(res: { text: string; json: unknown }) {
    for (const b of demoBittings) expect(res.text).not.toContain(b);
    expect(res.text).not.toMatch(/"(bitting|pinning|chambers|control)"/);
  }

  test('GET /api/work-orders/:id of the finished Birchwood Library order (assigned to bench2@): 403, audited, no bitting (A4)', async () => {
    const before = await deniedFor('work-order');
    const res = await h.call('GET', `/api/work-orders/${historyWoId}`, { token: await h.tokenFor('technician') });
    expect(res.status).toBe(403);
    expect(res.json.error.code).toBe('forbidden');
    assertNoBitting(res);
    expect(await deniedFor('work-order')).toBe(before + 1);
  });

  test('GET /api/work-orders/:id/packet of that order: 403, audited, no bitting; the assignee gets the packet (A4; control case)', async () => {
    const before = await deniedFor('work-order-packet');
    const res = await h.call('GET', `/api/work-orders/${historyWoId}/packet`, { token: await h.tokenFor('technician') });
    expect(res.status).toBe(403);
    assertNoBitting(res);
    expect(await deniedFor('work-order-packet')).toBe(before + 1);
    expect(await h.db('audit_events').where({ action: 'packet.downloaded', target_id: historyWoId }).first('id')).toBeUndefined();

    const bench2 = await h.signIn('bench2@demo.corewright.test');
    const own = await h.call('GET', `/api/work-orders/${historyWoId}/packet`, { token: bench2.accessToken });
    expect(own.status).toBe(200);
    expect(own.json.packet.cores).toHaveLength(14);
  });

  test('a core of that order is not reachable by id either: 403 (A4; cores are for supervisors)', async () => {
    const core = (await h.db('work_order_cores').where({ work_order_id: historyWoId }).first('core_id')).core_id;
    const res = await h.call('GET', `/api/cores/${core}`, { token: await h.tokenFor('technician') });
    expect(res.status).toBe(403);
    assertNoBitting(res);
  });

  test("a completion synced for a core of another technician's order is refused per record, audited, and not stored (A4; S5 per-record answers)", async () => {
    const core = (await h.db('work_order_cores').where({ work_order_id: historyWoId }).first('core_id')).core_id;
    const clientId = randomUUID();
    const at = '2020-04-01T10:00:00.000Z';
    const record = { clientId, kind: 'completion', coreId: core, workOrderId: historyWoId, startedAt: at, finishedAt: at, result: 'passed', attempts: [{ n: 1, startedAt: at, finishedAt: at, result: 'passed', steps: [], keyChecks: [] }] };
    const res = await h.call('POST', '/api/sync', { token: await h.tokenFor('technician'), body: { deviceId: randomUUID(), records: [record] } });
    expect(res.status).toBe(200);
    expect(res.json.accepted).toEqual([]);
    expect(res.json.rejected).toEqual([expect.objectContaining({ clientId, index: 0, error: expect.objectContaining({ code: 'forbidden' }) })]);
    expect(await h.db('completions').where({ id: clientId }).first('id')).toBeUndefined();
    expect(await h.db('audit_events').where({ action: 'access.denied', target_type: 'sync-record', target_id: clientId }).count({ n: '*' }).first()).toEqual({ n: 1 });
  });
});
