// The system audit on the demo campus, and acknowledging a finding: who may, what input is
// refused, where it is recorded, and the finding coming back when a key it involves changes.
import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { builtInProfiles, progressKeys, type Profile } from '../../shared/keying';
import { keyContext } from '../../server/services/keySystems';
import { countRows, startHarness, type Harness } from './harness';

let h: Harness;
let admin: string;
let lead: string;
let tech: string;
let demoId: string;

interface Finding { code: string; severity: string; message: string; fingerprint: string; keys?: string[]; data?: Record<string, number>; details?: string[]; acknowledged: { note: string; by: string; at: string } | null }

beforeAll(async () => {
  h = await startHarness({}, { demo: true });
  [admin, lead, tech] = await Promise.all([h.tokenFor('admin'), h.tokenFor('supervisor'), h.tokenFor('technician')]);
  demoId = (await h.db('key_systems').where({ name: 'Quillon Hill College' }).first('id')).id;
});
afterAll(async () => h.close());

const auditOf = async (token = admin): Promise<Finding[]> => {
  const res = await h.call('GET', `/api/key-systems/${demoId}/system-audit`, { token });
  expect(res.status).toBe(200);
  return res.json.findings;
};
const ackPath = () => `/api/key-systems/${demoId}/system-audit/acknowledgements`;

describe('the demo campus audit', () => {
  test('opens with a handful of findings: one line for the change keys one position apart, not one warning per pair (keying primer)', async () => {
    const findings = await auditOf(lead);
    expect(findings.length).toBeLessThanOrEqual(6);
    expect(findings.filter((f) => f.code === 'change-keys-too-close')).toEqual([]);
    const apart = findings.filter((f) => f.code === 'change-keys-one-apart');
    expect(apart).toHaveLength(1);
    expect(apart[0]).toMatchObject({ severity: 'info' });
    // 80 change keys progressed in chambers 5-7 two steps apart: many groups, each in the details.
    expect(apart[0]!.data!.groups).toBeGreaterThan(100);
    expect(apart[0]!.details).toHaveLength(apart[0]!.data!.groups!);
    // Built-in profile, usual kit (wafers 2-19): only the control key releases any core.
    expect(findings.find((f) => f.code === 'control-openings')?.message).toMatch(/releases for the control key alone/);
    for (const f of findings) {
      expect(f.fingerprint).toMatch(/^[0-9a-f]{64}$/);
      expect(f.acknowledged).toBeNull();
    }
  });

  test('the same system audited twice gives the same fingerprints', async () => {
    expect((await auditOf()).map((f) => f.fingerprint)).toEqual((await auditOf()).map((f) => f.fingerprint));
  });
});

describe('POST /api/key-systems/:id/system-audit/acknowledgements', () => {
  test('a supervisor and a technician get 403 and nothing is stored', async () => {
    const [finding] = await auditOf();
    const before = await countRows(h.db, 'audit_acknowledgements', 'audit_events');
    for (const token of [lead, tech]) {
      const res = await h.call('POST', ackPath(), { token, body: { fingerprint: finding!.fingerprint, note: 'Accepted by design.' } });
      expect(res.status).toBe(403);
    }
    expect(await countRows(h.db, 'audit_acknowledgements', 'audit_events')).toEqual(before);
  });

  test.each([
    { what: 'no note', body: (fp: string) => ({ fingerprint: fp }), field: 'note' },
    { what: 'a note of blanks', body: (fp: string) => ({ fingerprint: fp, note: '   ' }), field: 'note' },
    { what: 'a note over 500 characters', body: (fp: string) => ({ fingerprint: fp, note: 'x'.repeat(501) }), field: 'note' },
    { what: 'a fingerprint that is not 64 hex digits', body: () => ({ fingerprint: 'abc', note: 'Accepted.' }), field: 'fingerprint' },
    { what: 'a fingerprint of no current finding', body: () => ({ fingerprint: 'f'.repeat(64), note: 'Accepted.' }), field: 'fingerprint' },
    { what: 'an extra field', body: (fp: string) => ({ fingerprint: fp, note: 'Accepted.', acknowledgedBy: 'someone else' }), field: 'acknowledgedBy' },
  ])('$what is a 400 naming $field, and nothing is stored', async ({ body, field }) => {
    const [finding] = await auditOf();
    const before = await countRows(h.db, 'audit_acknowledgements', 'audit_events');
    const res = await h.call('POST', ackPath(), { token: admin, body: body(finding!.fingerprint) });
    expect(res.status).toBe(400);
    // A field that should not be there is named in the message ("remove ..."), the others as the detail's field.
    const named = res.json.error.details.map((d: { field?: string; message: string }) => d.field ?? d.message).join(' ');
    expect(named).toContain(field);
    expect(await countRows(h.db, 'audit_acknowledgements', 'audit_events')).toEqual(before);
  });

  test('an unknown key system is a 404', async () => {
    const res = await h.call('POST', `/api/key-systems/${randomUUID()}/system-audit/acknowledgements`, { token: admin, body: { fingerprint: 'a'.repeat(64), note: 'Accepted.' } });
    expect(res.status).toBe(404);
  });

  test('the admin acknowledges with a note: stored, audited, shown on the next audit; a key change brings the finding back', async () => {
    const apart = (await auditOf()).find((f) => f.code === 'change-keys-one-apart')!;
    const res = await h.call('POST', ackPath(), { token: admin, body: { fingerprint: apart.fingerprint, note: '  Two-step design: one position apart is accepted.  ' } });
    expect(res.status).toBe(201);
    expect(res.json.acknowledgement).toMatchObject({ note: 'Two-step design: one position apart is accepted.', by: 'Alex Admin (demo)' });

    const again = (await auditOf(lead)).find((f) => f.code === 'change-keys-one-apart')!;
    expect(again.fingerprint).toBe(apart.fingerprint);
    expect(again.acknowledged).toMatchObject({ note: 'Two-step design: one position apart is accepted.', by: 'Alex Admin (demo)' });
    const row = await h.db('audit_events').where({ action: 'audit-finding.acknowledged', target_id: demoId }).first('actor_email', 'details');
    expect(row.actor_email).toBe('admin@demo.corewright.test');
    expect(row.details).toMatchObject({ code: 'change-keys-one-apart', fingerprint: apart.fingerprint, note: 'Two-step design: one position apart is accepted.' });

    // Recut AA1 to another bitting of the same progression (unused by the seed, same master
    // and parity): the finding involves AA1, so it is new again. The acknowledgement stays on record.
    const keys = (await h.call('GET', `/api/key-systems/${demoId}/keys?reveal=1`, { token: admin })).json.keys as { id: string; symbol: string; bitting: string }[];
    const master = keys.find((k) => k.symbol === 'AA')!;
    const aa1 = keys.find((k) => k.symbol === 'AA1')!;
    const taken = new Set(keys.map((k) => k.bitting));
    const fresh = progressKeys(builtInProfiles['sfic-7'] as Profile, { topMaster: master.bitting, progress: [5, 6, 7] }).find((b) => !taken.has(b))!;
    expect((await h.call('PATCH', `/api/key-systems/${demoId}/keys/${aa1.id}`, { token: admin, body: { bitting: fresh } })).status).toBe(200);
    const back = (await auditOf()).find((f) => f.code === 'change-keys-one-apart')!;
    expect(back.fingerprint).not.toBe(apart.fingerprint);
    expect(back.acknowledged).toBeNull();
    expect(await h.db('audit_acknowledgements').where({ key_system_id: demoId, fingerprint: apart.fingerprint }).first('note')).toEqual({ note: 'Two-step design: one position apart is accepted.' });
  });

  test('an error cannot be acknowledged: it must be fixed', async () => {
    // A second symbol cut like AB1, written straight to the table (sealed like any key) so
    // that the audit has an error whatever rules key entry applies.
    const keys = (await h.call('GET', `/api/key-systems/${demoId}/keys?reveal=1`, { token: admin })).json.keys as { id: string; symbol: string; bitting: string }[];
    const ab1 = keys.find((k) => k.symbol === 'AB1')!;
    const id = randomUUID();
    await h.db('keys').insert({ id, key_system_id: demoId, symbol: 'ZZ9', level: 'change', parent_id: null, bitting_enc: h.sealer.seal(ab1.bitting, keyContext(id)) });
    const dup = (await auditOf()).find((f) => f.code === 'duplicate-bitting')!;
    expect(dup.severity).toBe('error');
    const before = await countRows(h.db, 'audit_acknowledgements');
    const res = await h.call('POST', ackPath(), { token: admin, body: { fingerprint: dup.fingerprint, note: 'Accept it.' } });
    expect(res.status).toBe(400);
    expect(res.json.error.message).toMatch(/Errors cannot be acknowledged/);
    expect(await countRows(h.db, 'audit_acknowledgements')).toEqual(before);
  });
});
