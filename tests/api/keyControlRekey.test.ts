// Key control, the rekey plan after a lost key: for a change key a new change key from the unused
// keys of its master's progression that passes the system audit, and the cores to re-pin; for a
// master the choices with the numbers of cores to build and keys to re-issue, each offered only when
// the engine shows the lost key shut out of the rebuilt cores; one call turns the chosen option into
// a work order for the Bench (checked by brute force through keyOperates on every planned core's
// chart). Source: the primer's "Key control" (what it takes to restore control: which cores to
// re-pin, which new key, how many keys to re-issue).
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { auditSystem, keyOperates, pinCore } from '../../shared/keying';
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
    // The other copy out and the reported copy: both holders get the new key.
    expect(plan.copiesToReissue.map((c: { issueId: string }) => c.issueId)).toEqual([issues[0]!.id, issues[1]!.id]);
    expect(plan.choices).toEqual([expect.objectContaining({ option: 'new-change-key', coresToBuild: 1, keysToReissue: 2, blocked: null })]);
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

/** Brute force over the work order's planned cores: does `bitting` turn any of them (keyOperates on each pinCore chart)? */
async function turnsAnyPlanned(workOrderId: string, bitting: string): Promise<string[]> {
  const now = await loadSystem(h.db, h.sealer, system.id);
  const cores = await h.db('work_order_cores as x').join('cores as c', 'c.id', 'x.core_id').where('x.work_order_id', workOrderId).select<{ id: string; tag: string }[]>('c.id', 'c.tag');
  const turned: string[] = [];
  for (const c of cores) {
    const operating = (await h.db('core_keys').where({ core_id: c.id }).pluck('key_id')) as string[];
    const pinning = pinCore(now.profile, { operating: operating.map((id) => now.keys.find((k) => k.id === id)!.bitting), control: now.control });
    if (keyOperates(pinning, now.profile, bitting).plug) turned.push(c.tag);
  }
  return turned;
}

describe('the plan for a lost master', () => {
  test('the choices: re-master or rekey the cores under it, with the cores to build and the keys to re-issue, each saying when it cannot shut the key out', async () => {
    const { reportId } = await lostReport('AB', 1);
    const plan = (await h.call('GET', `/api/key-reports/${reportId}/plan`, { token: lead })).json.plan;
    const installed = await h.db('core_keys as ck').join('cores as c', 'c.id', 'ck.core_id').where({ 'ck.key_id': keyId.get('AB'), 'c.state': 'installed' }).count({ n: '*' }).first();
    const outUnder = await h.db('key_issues as i').join('keys as k', 'k.id', 'i.key_id').where('i.status', 'out').where((w) => {
      w.where('k.id', keyId.get('AB')!).orWhere('k.parent_id', keyId.get('AB')!);
    }).count({ n: '*' }).first();
    expect(plan.choices.map((c: { option: string }) => c.option)).toEqual(['re-master', 'rekey-under-master']);
    expect(plan.choices.map((c: { coresToBuild: number }) => c.coresToBuild)).toEqual([Number(installed!.n), Number(installed!.n)]);
    expect(plan.choices[1].keysToReissue).toBe(Number(outUnder!.n) + 1);
    // The demo's change keys keep AB's cuts in chambers 1-2 and the grand master's elsewhere, so a new
    // master alone never shuts AB out (every chamber of AB is a change key's or the grand master's cut).
    expect(plan.choices[0].blocked).toMatch(/choose the rekey/);
    expect(plan.choices[1].blocked).toBeNull();
    expect(plan.newKeySymbol).toBe('AE');
    const refused = await h.call('POST', `/api/key-reports/${reportId}/work-order`, { token: lead, body: { option: 're-master' } });
    expect(refused.status).toBe(409);
    expect(refused.json.error.message).toMatch(/choose the rekey/);
    expect((await h.call('POST', `/api/key-reports/${reportId}/work-order`, { token: lead, body: { option: 'new-change-key' } })).status).toBe(409);
    expect(await h.db('key_reports').where({ id: reportId }).first('work_order_id')).toEqual({ work_order_id: null });
  });

  test('one call rekeys under the master: a new master and a new change key for each key under it, every core rebuilt; brute force: the lost master turns none of them', async () => {
    const reportId = (await h.db('key_reports as r').join('key_issues as i', 'i.id', 'r.issue_id').where('i.key_id', keyId.get('AB')!).first('r.id')).id as string;
    const before = await loadSystem(h.db, h.sealer, system.id);
    const children = before.keys.filter((k) => k.parentId === keyId.get('AB') && k.status === 'active');
    const plan = (await h.call('GET', `/api/key-reports/${reportId}/plan`, { token: lead })).json.plan;
    const res = await h.call('POST', `/api/key-reports/${reportId}/work-order`, { token: lead, body: { option: 'rekey-under-master' } });
    expect(res.status, res.text).toBe(201);
    expect(res.json).toMatchObject({ newKeySymbol: 'AE', plan: { chosen: 'rekey-under-master', workOrderId: res.json.workOrderId } });
    const after = await loadSystem(h.db, h.sealer, system.id);
    const master = after.keys.find((k) => k.symbol === 'AE')!;
    expect(master).toMatchObject({ level: 'master', parentId: keyId.get('A'), status: 'active' });
    expect(after.keys.find((k) => k.id === keyId.get('AB'))!.status).toBe('lost');
    expect(after.keys.filter((k) => k.parentId === master.id)).toHaveLength(children.length);
    const cores = await h.db('work_order_cores').where({ work_order_id: res.json.workOrderId }).count({ n: '*' }).first();
    expect(Number(cores!.n)).toBe(plan.coresToRepin.length);
    expect(await turnsAnyPlanned(res.json.workOrderId, before.keys.find((k) => k.id === keyId.get('AB'))!.bitting)).toEqual([]);
    // Every door that took a key under AB now takes its new key under AE.
    const doors = (await h.db('doors as d').join('keys as k', 'k.id', 'd.key_id').whereIn('d.key_id', children.map((c) => c.id)).count({ n: '*' }).first())!;
    expect(Number(doors.n)).toBe(0);
    const { profile, audit } = await systemAuditInputFor(h.db, h.sealer, system.id);
    const fresh = new Set(after.keys.filter((k) => k.id === master.id || k.parentId === master.id).map((k) => k.id));
    expect(auditSystem(profile, audit).filter((f) => f.severity === 'error' && (f.keyIds ?? []).some((id) => fresh.has(id)))).toEqual([]);
  });

  test('office roles only: technician 403, anonymous 401', async () => {
    const any = (await h.db('key_reports').first('id')).id;
    expect((await h.call('GET', `/api/key-reports/${any}/plan`, { token: tech })).status).toBe(403);
    expect((await h.call('POST', `/api/key-reports/${any}/work-order`, { token: tech, body: {} })).status).toBe(403);
    expect((await h.call('GET', `/api/key-reports/${any}/plan`)).status).toBe(401);
  });
});
