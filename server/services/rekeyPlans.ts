/**
 * The rekey plan of a lost or stolen key report, and the one step that turns a change key's plan
 * into a work order for the Bench (a new key in its place through replaceKey, then createWorkOrder
 * for the doors of the cores it is pinned for). The new key is the first unused key of its
 * master's progression (progressKeys with the hierarchy rules) that raises no system audit error.
 */
import type { Knex } from 'knex';
import { auditSystem, KeyingError, progressKeys } from '../../shared/keying';
import type { PlanCore, RekeyPlan, RekeyWorkOrderInput } from '../../shared/schemas/keyControlRekey';
import { naturalCompare } from '../../shared/words';
import { conflict, notFound } from '../errors';
import { exposedCores, installedCores } from './keyExposure';
import { loadSystem, placementSystemOf, replaceKey, type LoadedSystem, type SystemKey } from './keySystems';
import type { Sealer } from './secrets';
import { systemAuditInputFor } from './systemAudit';
import { createWorkOrder } from './workOrders';

/** Unused change keys under `parent` that pass the system audit, in progression order. */
async function unusedKeys(db: Knex, sealer: Sealer, system: LoadedSystem, parent: SystemKey): Promise<string[]> {
  const siblings = system.keys.filter((k) => k.parentId === parent.id);
  const depthsOf = (b: string) => b.split('');
  const progress = depthsOf(parent.bitting).flatMap((d, i) => (siblings.some((s) => depthsOf(s.bitting)[i] !== d) ? [i + 1] : []));
  if (!progress.length) return [];
  let bittings: string[];
  try {
    bittings = progressKeys(system.profile, { topMaster: parent.bitting, progress, control: system.control, limit: 2000, placement: { system: placementSystemOf(system), parentId: parent.id } });
  } catch (err) {
    if (err instanceof KeyingError) return [];
    throw err;
  }
  const taken = new Set(system.keys.map((k) => k.bitting));
  const fresh = bittings.filter((b) => !taken.has(b)).slice(0, 200);
  const { profile, audit } = await systemAuditInputFor(db, sealer, system.id);
  const proposed = fresh.map((bitting, i) => ({ id: `proposed:${i}`, symbol: `(new ${i + 1})`, bitting, level: 'change' as const, opens: [] as string[] }));
  const failing = new Set<number>();
  for (const f of auditSystem(profile, { ...audit, keys: [...audit.keys, ...proposed] })) {
    if (f.severity !== 'error') continue;
    for (const id of f.keyIds ?? []) if (id.startsWith('proposed:')) failing.add(Number(id.slice(9)));
  }
  return fresh.filter((_, i) => !failing.has(i));
}

const planCore = (c: { id: string; tag: string; doorId: string | null; doorLabel: string | null }): PlanCore => ({ coreId: c.id, tag: c.tag, doorId: c.doorId, doorLabel: c.doorLabel });

async function loadReport(db: Knex, reportId: string) {
  const r = await db('key_reports as r').join('key_issues as i', 'i.id', 'r.issue_id').join('keys as k', 'k.id', 'i.key_id').where('r.id', reportId).first('r.id', 'r.status', 'r.work_order_id', 'k.id as keyId', 'k.key_system_id as systemId');
  if (!r) throw notFound('That key report');
  return r as { id: string; status: string; work_order_id: string | null; keyId: string; systemId: string };
}

function nextSymbol(system: LoadedSystem, parent: SystemKey): string {
  const used = new Set(system.keys.map((k) => k.symbol.toUpperCase()));
  let n = 1;
  while (used.has(`${parent.symbol}${n}`)) n++;
  return `${parent.symbol}${n}`;
}

/** The plan, with the chosen bitting kept server-side (never answered). */
async function computePlan(db: Knex, sealer: Sealer, reportId: string): Promise<{ plan: RekeyPlan; bitting: string | null; system: LoadedSystem }> {
  const report = await loadReport(db, reportId);
  const system = await loadSystem(db, sealer, report.systemId);
  const key = system.keys.find((k) => k.id === report.keyId)!;
  const cores = await installedCores(db, system.id);
  const exposed = exposedCores(system, cores, key);
  const under = new Set([key.id]);
  // Every key under a master (change keys, and masters under a grand master) goes with it.
  for (let grew = true; grew; ) {
    grew = false;
    for (const k of system.keys) if (k.parentId && under.has(k.parentId) && !under.has(k.id)) { under.add(k.id); grew = true; }
  }
  const copies = (await db('key_issues as i').join('key_holders as h', 'h.id', 'i.holder_id').join('keys as k', 'k.id', 'i.key_id').whereIn('i.key_id', key.level === 'change' ? [key.id] : [...under]).where('i.status', 'out').orderBy(['k.symbol', 'i.copy_number']).select('i.id as issueId', 'h.id as holderId', 'h.name as holderName', 'k.symbol as keySymbol', 'i.copy_number as copyNumber')) as RekeyPlan['copiesToReissue'];
  const coresToRepin = exposed.filter((c) => c.how === 'intended').map((c) => planCore(c)).sort((a, b) => naturalCompare(a.doorLabel ?? a.tag, b.doorLabel ?? b.tag));
  const incidentalCores = exposed.filter((c) => c.how === 'incidental').map((c) => planCore(c));
  const parent = key.parentId ? system.keys.find((k) => k.id === key.parentId) : undefined;
  const passing = key.level === 'change' && parent ? await unusedKeys(db, sealer, system, parent) : [];
  const ownCopies = copies.filter((c) => c.keySymbol === key.symbol).length;
  const choices: RekeyPlan['choices'] = key.level === 'change'
    ? [{ option: 'new-change-key', description: `Pin the ${coresToRepin.length} core(s) of ${key.symbol} for a new change key under ${parent?.symbol ?? 'its master'} and re-issue its ${ownCopies} copy(ies) out.`, coresToBuild: coresToRepin.length, keysToReissue: ownCopies }]
    : [
        { option: 're-master', description: `Give the ${coresToRepin.length} core(s) under ${key.symbol} a new ${key.level === 'master' ? 'master' : 'master key'} (new master wafers; change keys unchanged) and re-issue only the ${ownCopies} copy(ies) of ${key.symbol}.`, coresToBuild: coresToRepin.length, keysToReissue: ownCopies },
        { option: 'rekey-under-master', description: `Rekey every core under ${key.symbol} (new master and new change keys) and re-issue every copy out of ${key.symbol} and the keys under it (${copies.length}).`, coresToBuild: coresToRepin.length, keysToReissue: copies.length },
      ];
  const plan: RekeyPlan = {
    reportId,
    lostKey: { id: key.id, symbol: key.symbol, level: key.level },
    newKeySymbol: passing.length && parent ? nextSymbol(system, parent) : null,
    unusedKeysPassing: passing.length,
    coresToRepin,
    incidentalCores,
    copiesToReissue: copies,
    choices,
    workOrderId: report.work_order_id,
  };
  return { plan, bitting: passing[0] ?? null, system };
}

export async function rekeyPlan(db: Knex, sealer: Sealer, reportId: string): Promise<RekeyPlan> {
  return (await computePlan(db, sealer, reportId)).plan;
}

/** One step: the new change key in the lost one's place, and a work order for its cores. */
export async function planToWorkOrder(db: Knex, sealer: Sealer, reportId: string, input: RekeyWorkOrderInput, by: string): Promise<{ workOrderId: string; newKeyId: string; newKeySymbol: string }> {
  const report = await db('key_reports').where({ id: reportId }).forUpdate().first('status', 'work_order_id');
  if (!report) throw notFound('That key report');
  if (report.status !== 'open') throw conflict('This report is closed.', [{ field: 'reportId', message: 'closed' }]);
  if (report.work_order_id) throw conflict('This report has its work order already.', [{ field: 'reportId', message: 'work order exists' }]);
  const { plan, bitting, system } = await computePlan(db, sealer, reportId);
  if (plan.lostKey.level !== 'change') throw conflict(`${plan.lostKey.symbol} is a master: choose re-master or rekey with the shop and plan the work order by hand (the plan gives the numbers).`, [{ field: 'reportId', message: 'master key' }]);
  if (!bitting || !plan.newKeySymbol) throw conflict('No unused key of the progression passes the system audit: add keys to the progression first.', [{ field: 'reportId', message: 'no unused key' }]);
  if (!plan.coresToRepin.length) throw conflict(`No installed core is pinned for ${plan.lostKey.symbol}: there is nothing to re-pin.`, [{ field: 'reportId', message: 'no cores' }]);
  const symbol = (input.newKeySymbol ?? plan.newKeySymbol).toUpperCase();
  const replaced = await replaceKey(db, sealer, system.id, plan.lostKey.id, { symbol, bitting, oldStatus: 'lost' });
  const doors = plan.coresToRepin.flatMap((c) => (c.doorId ? [{ doorId: c.doorId, keyId: replaced.id }] : []));
  const wo = await createWorkOrder(db, sealer, { title: `Lost key ${plan.lostKey.symbol}: rekey to ${symbol}`, purpose: 'lost-key-rekey', keySystemId: system.id, assigneeId: input.assigneeId ?? null, dueDate: input.dueDate ?? null, notes: `Key report: ${plan.lostKey.symbol} reported lost or stolen. Return the removed cores to the shop.`, doors }, by);
  await db('key_reports').where({ id: reportId }).update({ work_order_id: wo.id });
  return { workOrderId: wo.id, newKeyId: replaced.id, newKeySymbol: symbol };
}
