// The system audit moved from /api/key-systems/:id/audit to /system-audit (so "audit" names only the audit
// trail, /api/audit-events). The old paths answer 308 Permanent Redirect (RFC 9110 15.4.9: the method and body
// are kept), so an older client's GET and POST still work, and the new route decides who may.
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { countRows, startHarness, type Harness } from './harness';

let h: Harness;
let admin: string;
let lead: string;
let tech: string;
let demoId: string;

beforeAll(async () => {
  h = await startHarness({}, { demo: true });
  [admin, lead, tech] = await Promise.all([h.tokenFor('admin'), h.tokenFor('supervisor'), h.tokenFor('technician')]);
  demoId = (await h.db('key_systems').where({ name: 'Quillon Hill College' }).first('id')).id;
});
afterAll(async () => h.close());

describe('the old system audit paths (RFC 9110 15.4.9, 308 Permanent Redirect)', () => {
  test('GET /api/key-systems/:id/audit answers 308 to /system-audit, the query kept', async () => {
    expect(await h.unfollowed('GET', `/api/key-systems/${demoId}/audit`, lead)).toEqual({ status: 308, location: `/api/key-systems/${demoId}/system-audit` });
    expect(await h.unfollowed('GET', `/api/key-systems/${demoId}/audit?x=1`, lead)).toEqual({ status: 308, location: `/api/key-systems/${demoId}/system-audit?x=1` });
  });

  test('followed, the old GET gives the same report as the new path (control: the new path itself)', async () => {
    const old = await h.call('GET', `/api/key-systems/${demoId}/audit`, { token: lead });
    const now = await h.call('GET', `/api/key-systems/${demoId}/system-audit`, { token: lead });
    expect(old.status).toBe(200);
    expect(now.status).toBe(200);
    expect(old.json.findings.map((f: { fingerprint: string }) => f.fingerprint)).toEqual(now.json.findings.map((f: { fingerprint: string }) => f.fingerprint));
    expect(old.json.findings.length).toBeGreaterThan(0);
  });

  test('POST .../audit/acknowledgements answers 308 and, followed, keeps its body: the acknowledgement is stored once', async () => {
    expect(await h.unfollowed('POST', `/api/key-systems/${demoId}/audit/acknowledgements`, admin, {})).toEqual({ status: 308, location: `/api/key-systems/${demoId}/system-audit/acknowledgements` });
    const finding = (await h.call('GET', `/api/key-systems/${demoId}/system-audit`, { token: admin })).json.findings.find((f: { code: string }) => f.code === 'change-keys-one-apart');
    const before = await countRows(h.db, 'audit_acknowledgements');
    const res = await h.call('POST', `/api/key-systems/${demoId}/audit/acknowledgements`, { token: admin, body: { fingerprint: finding.fingerprint, note: 'Accepted through the old path.' } });
    expect(res.status).toBe(201);
    expect(res.json.acknowledgement.note).toBe('Accepted through the old path.');
    expect(await countRows(h.db, 'audit_acknowledgements')).toEqual({ audit_acknowledgements: before.audit_acknowledgements! + 1 });
  });

  test('the redirect grants nothing: followed, the new route still refuses a technician (403) and a supervisor acknowledging (403); no token is 401', async () => {
    expect((await h.call('GET', `/api/key-systems/${demoId}/audit`, { token: tech })).status).toBe(403);
    const before = await countRows(h.db, 'audit_acknowledgements');
    expect((await h.call('POST', `/api/key-systems/${demoId}/audit/acknowledgements`, { token: lead, body: { fingerprint: 'a'.repeat(64), note: 'Accepted.' } })).status).toBe(403);
    expect(await countRows(h.db, 'audit_acknowledgements')).toEqual(before);
    expect((await h.call('GET', `/api/key-systems/${demoId}/audit`)).status).toBe(401);
  });

  test('a bad key system id on the old path is refused before any redirect (400 naming the id)', async () => {
    const res = await h.call('GET', '/api/key-systems/not-an-id/audit', { token: lead });
    expect(res.status).toBe(400);
    expect(res.json.error.code).toBe('validation');
  });
});
