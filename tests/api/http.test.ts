// Health, error shape, limits, roles and headers. Cases A7, A8 (and part of A3) of ../shared/design/reliability.md.
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { countRows, startHarness, type Harness } from './harness';

let h: Harness;
beforeAll(async () => {
  h = await startHarness();
});
afterAll(async () => h.close());

describe('GET /api/health', () => {
  test('200 with the database state, without signing in', async () => {
    const res = await h.call('GET', '/api/health');
    expect(res.status).toBe(200);
    expect(res.json).toMatchObject({ status: 'ok', database: { state: 'up', migrations: 'current' } });
    expect(typeof res.json.database.latencyMs).toBe('number');
  });
});

describe('bad input (A7)', () => {
  test('malformed JSON: 400 malformed-json, nothing written', async () => {
    const before = await countRows(h.db, 'sessions', 'audit_events');
    const res = await h.call('POST', '/api/auth/sign-in', { raw: '{"email": "tech@demo.corewright.test", "password": ', contentType: 'application/json' });
    expect(res.status).toBe(400);
    expect(res.json.error.code).toBe('malformed-json');
    expect(res.text).not.toMatch(/at .*\.js|node_modules|SyntaxError/);
    expect(await countRows(h.db, 'sessions', 'audit_events')).toEqual(before);
  });

  test('an oversized body: 413, nothing written', async () => {
    const before = await countRows(h.db, 'sessions', 'audit_events');
    const res = await h.call('POST', '/api/auth/sign-in', { body: { email: 'tech@demo.corewright.test', password: 'x'.repeat(300_000) } });
    expect(res.status).toBe(413);
    expect(res.json.error).toMatchObject({ code: 'payload-too-large' });
    expect(res.json.error.message).toMatch(/100 KB/);
    expect(await countRows(h.db, 'sessions', 'audit_events')).toEqual(before);
  });

  test('a wrong type names the field', async () => {
    const res = await h.call('POST', '/api/auth/sign-in', { body: { email: 42, password: ['x'] } });
    expect(res.status).toBe(400);
    expect(res.json.error.details.map((d: { field: string }) => d.field).sort()).toEqual(['email', 'password']);
  });

  test('an unknown API route is a JSON 404 once signed in', async () => {
    const res = await h.call('GET', '/api/no-such-thing', { token: await h.tokenFor('admin') });
    expect(res.status).toBe(404);
    expect(res.json.error.code).toBe('not-found');
  });
});

describe('roles (deny by default)', () => {
  test('a technician is denied an admin route with 403; the admin gets it', async () => {
    const denied = await h.call('GET', '/api/users', { token: await h.tokenFor('technician') });
    expect(denied.status).toBe(403);
    expect(denied.json.error).toMatchObject({ code: 'forbidden' });
    expect(denied.json.error.message).toMatch(/admin role/);
    const supervisor = await h.call('GET', '/api/users', { token: await h.tokenFor('supervisor') });
    expect(supervisor.status).toBe(403);
    const ok = await h.call('GET', '/api/users', { token: await h.tokenFor('admin') });
    expect(ok.status).toBe(200);
    expect(ok.json.users).toHaveLength(3);
    expect(JSON.stringify(ok.json)).not.toMatch(/password|scrypt/);
  });
});

describe('security headers (A8, helmet 8)', () => {
  test('HSTS of a year or more, CSP with frame-ancestors none, nosniff, no-store on the API', async () => {
    const res = await h.call('GET', '/api/health');
    const hsts = res.headers.get('strict-transport-security') ?? '';
    expect(Number(/max-age=(\d+)/.exec(hsts)?.[1])).toBeGreaterThanOrEqual(31536000);
    expect(res.headers.get('content-security-policy')).toMatch(/frame-ancestors 'none'/);
    expect(res.headers.get('x-content-type-options')).toBe('nosniff');
    expect(res.headers.get('cache-control')).toBe('no-store');
    expect(res.headers.get('x-powered-by')).toBeNull();
  });
});
