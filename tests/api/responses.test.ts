// Every API answer is parsed with its route's schema from shared/schemas inside the harness
// (tests/api/responses.ts), so a server that drifts from what the client parses fails the test
// that called it. These tests show the check covers every route and bites.
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { z } from 'zod';
import { createApp } from '../../server/app';
import { Door } from '../../shared/schemas/records';
import { startHarness, type Harness } from './harness';
import { AnswerDrift, answers, checkAnswer, routeOf } from './responses';
import { mountedRouters, routesOf } from './support/routes';

let h: Harness;
let admin: string;
beforeAll(async () => {
  h = await startHarness();
  admin = await h.tokenFor('admin');
});
afterAll(async () => h?.close());

const door = { site: 'Quillon Hill (invented)', building: 'Lab', floor: '1', room: '101', label: 'LAB-101', fireRated: false };

describe('response schemas: every route has one', () => {
  test('every route registered in the Express app has exactly one response schema, and no entry is stale (common practice: contract tests)', () => {
    const mounted = mountedRouters(createApp({ db: h.db, config: h.config, smtp: h.smtp, log: () => {} }));
    const registered = routesOf(mounted[0]!.handle!.stack!, '/api');
    expect(registered.length).toBeGreaterThan(40);
    expect([...registered].sort()).toEqual(Object.keys(answers).sort());
  });

  test('a request finds its route by Express pattern, literal dots and all (control)', () => {
    expect(routeOf('GET', '/api/completions.csv?tz=0')).toBe('GET /api/completions.csv');
    expect(routeOf('GET', '/api/completions/0b6f4a4e-0000-4000-8000-000000000000')).toBe('GET /api/completions/:id');
    expect(routeOf('get', '/api/key-systems/x/keys/y/operates')).toBe('GET /api/key-systems/:id/keys/:keyId/operates');
    expect(routeOf('GET', '/api/completionsXcsv')).toBeUndefined();
    expect(routeOf('POST', '/api/health')).toBeUndefined();
  });
});

describe('response schemas: the check bites (common practice: a test that can fail)', () => {
  test('a real answer parsed with a wrong schema makes the harness throw, naming the field; the right one passes (control)', async () => {
    expect((await h.call('POST', '/api/doors', { token: admin, body: door })).status).toBe(201);
    const listed = await h.call('GET', '/api/doors', { token: admin });
    expect(listed.json.doors).toHaveLength(1);

    const drifted = { ...answers, 'GET /api/doors': { schema: z.object({ doors: z.array(Door.extend({ label: z.number() })) }) } };
    await expect(h.call('GET', '/api/doors', { token: admin, answers: drifted })).rejects.toThrow(AnswerDrift);
    await expect(h.call('GET', '/api/doors', { token: admin, answers: drifted })).rejects.toThrow(/GET \/api\/doors answered 200, and the answer does not match its schema: doors\.0\.label/);
    const { 'GET /api/doors': _left, ...without } = answers;
    await expect(h.call('GET', '/api/doors', { token: admin, answers: without })).rejects.toThrow(/GET \/api\/doors answered 200, but tests\/api\/responses.ts has no schema for this route/);
  });

  test('an error answer must have the shared error shape: an unknown code, an empty message or an extra field (a stack) throw', async () => {
    const headers = new Headers({ 'content-type': 'application/json' });
    const reply = (json: unknown) => ({ status: 400, headers, text: JSON.stringify(json), json });
    expect(() => checkAnswer('GET', '/api/doors', reply({ error: { code: 'validation', message: 'q: fix it' } }))).not.toThrow();
    expect(() => checkAnswer('GET', '/api/doors', reply({ error: { code: 'oops', message: 'q: fix it' } }))).toThrow(AnswerDrift);
    expect(() => checkAnswer('GET', '/api/doors', reply({ error: { code: 'validation', message: '' } }))).toThrow(AnswerDrift);
    expect(() => checkAnswer('GET', '/api/doors', reply({ error: { code: 'validation', message: 'x', stack: 'at Router' } }))).toThrow(AnswerDrift);
    // An unknown API path answers 404 in the shared shape: the harness accepts it.
    expect((await h.call('GET', '/api/not-a-route', { token: admin })).status).toBe(404);
  });

  test('a CSV export is checked for its type, a 204 for an empty body, and an import 422 with the import schema', async () => {
    const csv = await h.call('GET', '/api/audit-events.csv', { token: admin });
    expect(csv.headers.get('content-type')).toMatch(/^text\/csv/);
    expect(() => checkAnswer('GET', '/api/audit-events.csv', { ...csv, headers: new Headers({ 'content-type': 'application/json' }) })).toThrow(/not text\/csv/);
    expect(() => checkAnswer('POST', '/api/auth/sign-out', { status: 204, headers: new Headers(), text: '{}', json: {} })).toThrow(/answers 204 with none/);
    const form = new FormData();
    form.append('file', new Blob(['site,building,floor,room,label,fire_rated,key_system,key_symbol\nQuillon Hill (invented),,1,101,LAB-102,,,\n'], { type: 'text/csv' }), 'doors.csv');
    const imported = await h.call('POST', '/api/doors/import', { token: admin, raw: form });
    expect(imported.status).toBe(422);
    expect(imported.json.errors.length).toBeGreaterThan(0);
  });
});
