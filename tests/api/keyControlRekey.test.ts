// Key control, the rekey plan after a lost key: for a change key a new change key from the unused
// keys of its master's progression that passes the system audit, and the cores to re-pin; for a
// master the choices with the numbers of cores to build and keys to re-issue; one call turns a
// change key's plan into a work order for the Bench. Source: the primer's "Key control" (what it
// takes to restore control: which cores to re-pin, which new key, how many keys to re-issue).
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { auditSystem } from '../../shared/keying';
import { loadSystem, type LoadedSystem } from '../../server/services/keySystems';
import { systemAuditInputFor } from '../../server/services/systemAudit';
import { startHarness, type Harness } from './harness';

let h: Harness;
let lead: string;
let tech: string;
let system: LoadedSystem;
const keyId = new Map<string, string>();
beforeAll(async () => {
  h = await startHarness({}, { demo: true });
  lead = await h.tokenFor('supervisor');
  tech = await h.tokenFor('technician');
  system = await loadSystem(h.db, h.sealer, (await h.db('key_systems').first('id')).id);
  for (const k of system.keys) keyId.set(k.symbol, k.id);
});
afterAll(async () => h.close());

async function lostReport(symbol: string, holders = 2): Promise<{ reportId: string; issues: { id: string; copyNumber: number }[] }> {
  const issues = [];
  for (let i = 0; i < holders; i++) {
    const who = (await h.call('POST', '/api/holders', { token: lead, body: { name: `Rekey ${symbol} ${i}`, department: 'Rekeying' } })).json.holder.id;
    issues.push((await h.call('POST', '/api/key-issues', { token: lead, body: { holderId: who, keyId: keyId.get(symbol), acknowledgement: { name: 'X', accepted: true } } })).json.issue);
  }
  const report = await h.call('POST', `/api/key-issues/${issues[0].id}/report`, { token: lead, body: { kind: 'stolen' } });
  expect(report.status).toBe(200);
  return { reportId: report.json.report.id, issues };
}

describe('the plan for a lost change key', () => {
  test('a new change key that passes the system audit, the cores it is pinned for to re-pin, the other copies to re-issue; no bitting', async () => {
    const { reportId, issues } = await lostReport('AB4');
    const res = await h.call('GET', `/api/key-reports/${reportId}/plan`, { token: lead });
    expect(res.status).toBe(200);
    const plan = res.json.plan;
    expect(plan.lostKey).toEqual({ id: keyId.get('AB4'), symbol: 'AB4', level: 'change' });
    expect(plan.coresToRepin.map((c: { doorLabel: string }) => c.doorLabel)).toEqual(['BL-104']);
    expect(plan.newKeySymbol).toMatch(/^AB\d+$/);
    expect(system.keys.map((k) => k.symbol)).not.toContain(plan.newKeySymbol);
    expect(plan.unusedKeysPassing).toBeGreaterThan(0);
    expect(plan.copiesToReissue.map((c: { issueId: string }) => c.issueId)).toEqual([issues[1]!.id]);
    expect(plan.choices).toEqual([expect.objectContaining({ option: 'new-change-key', coresToBuild: 1, keysToReissue: 1 })]);
    for (const b of [system.control, ...system.keys.map((k) => k.bitting)]) expect(res.text.includes(b)).toBe(false);
  });

  test('one call turns it into a work order for the Bench: the new key in the old one\'s place (old key lost), a planned core for each door; the system audit raises no error for the new key', async () => {
    const { reportId } = await lostReport('AB6', 1);
    const plan = (await h.call('GET', `/api/key-reports/${reportId}/plan`, { token: lead })).json.plan;
    const res = await h.call('POST', `/api/key-reports/${reportId}/work-order`, { token: lead, body: { dueDate: '2026-12-20' } });
    expect(res.status, res.text).toBe(201);
    expect(res.json).toMatchObject({ newKeySymbol: plan.newKeySymbol, plan: { workOrderId: res.json.workOrderId } });
    const wo = await h.call('GET', `/api/work-orders/${res.json.workOrderId}`, { token: lead });
    expect(wo.status).toBe(200);
    expect(wo.json.workOrder).toMatchObject({ purpose: 'lost-key-rekey' });
    expect(wo.text).toContain('BL-106');
    const after = await loadSystem(h.db, h.sealer, system.id);
    expect(after.keys.find((k) => k.symbol === 'AB6')!.status).toBe('lost');
    const fresh = after.keys.find((k) => k.symbol === res.json.newKeySymbol)!;
    expect(fresh.parentId).toBe(keyId.get('AB'));
    // The engine's system audit over the system as it now stands: no error names the new key.
    const { profile, audit } = await systemAuditInputFor(h.db, h.sealer, system.id);
    expect(auditSystem(profile, audit).filter((f) => f.severity === 'error' && (f.keyIds ?? []).includes(fresh.id))).toEqual([]);
    expect((await h.call('POST', `/api/key-reports/${reportId}/work-order`, { token: lead, body: {} })).status).toBe(409);
  });
});

describe('the plan for a lost master', () => {
  test('the choices: re-master or rekey the cores under it, with the cores to build and the keys to re-issue; no work order in one step', async () => {
    const { reportId } = await lostReport('AB', 1);
    const plan = (await h.call('GET', `/api/key-reports/${reportId}/plan`, { token: lead })).json.plan;
    const installed = await h.db('core_keys as ck').join('cores as c', 'c.id', 'ck.core_id').where({ 'ck.key_id': keyId.get('AB'), 'c.state': 'installed' }).count({ n: '*' }).first();
    const outUnder = await h.db('key_issues as i').join('keys as k', 'k.id', 'i.key_id').where('i.status', 'out').where((w) => w.where('k.id', keyId.get('AB')!).orWhere('k.parent_id', keyId.get('AB')!)).count({ n: '*' }).first();
    expect(plan.choices.map((c: { option: string }) => c.option)).toEqual(['re-master', 'rekey-under-master']);
    expect(plan.choices.map((c: { coresToBuild: number }) => c.coresToBuild)).toEqual([Number(installed!.n), Number(installed!.n)]);
    expect(plan.choices[1].keysToReissue).toBe(Number(outUnder!.n));
    expect((await h.call('POST', `/api/key-reports/${reportId}/work-order`, { token: lead, body: {} })).status).toBe(409);
  });
  test('office roles only: technician 403, anonymous 401', async () => {
    const any = (await h.db('key_reports').first('id')).id;
    expect((await h.call('GET', `/api/key-reports/${any}/plan`, { token: tech })).status).toBe(403);
    expect((await h.call('POST', `/api/key-reports/${any}/work-order`, { token: tech, body: {} })).status).toBe(403);
    expect((await h.call('GET', `/api/key-reports/${any}/plan`)).status).toBe(401);
  });
});
