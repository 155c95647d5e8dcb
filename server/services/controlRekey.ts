/**
 * Restoring control after a lost or stolen control key: a new control key for the system, chosen so
 * that the system audit raises no error it did not raise before (no key cut like it, no core whose
 * plug it turns, no other key lining up its shear line), it differs from every key and, where the
 * profile allows, from the top master in every chamber, and the engine shows the lost control key
 * removes and turns none of the cores rebuilt for it; every installed core built for the lost one is
 * rebuilt. One step makes the work order: the old control key is `replaced` (its bitting sealed on
 * its own record, the cores still built for it marked), the new one becomes the system's control key
 * (new work orders and packets pin with it), and a work order rebuilds each of those cores for its
 * door's key. Close-out (closeControlRekeys, in sync's land step beside keyCloseout.ts) retires the old
 * control key when no installed core is built for it and closes the report when the engine finds it removes
 * and turns no installed core.
 */
import type { Knex } from 'knex';
import { auditSystem, keyExposure, readBitting } from '../../shared/keying';
import { macsBreak } from '../../shared/keying/rules';
import type { RemainingCore } from '../../shared/schemas/keyControlExposure';
import type { RekeyPlan, RekeyWorkOrderInput } from '../../shared/schemas/keyControlRekey';
import { naturalCompare } from '../../shared/words';
import { conflict } from '../errors';
import { audit, type Actor } from './auditTrail';
import { controlBitting, findControlKey, nextControlSymbol, type StoredControlKey } from './controlKeys';
import { keepRemaining, notRebuiltYet } from './keyCloseout';
import { exposedCores, installedCores } from './keyExposure';
import { controlContext, controlKeyContext, loadSystem, topMasterOf, type LoadedSystem } from './keySystems';
import { planCore, rekeyWorkOrder, withRebuildKeys, type InstalledCore, type loadReport } from './rekeyPlans';
import type { Sealer } from './secrets';
import { systemAuditInputFor } from './systemAudit';

type Report = Awaited<ReturnType<typeof loadReport>>;

/**
 * Control bittings to try, in order: each chamber's depth turned away from the lost control key's by a step that
 * grows with the chamber, so the candidates differ from it in every chamber; those that also differ from the top
 * master in every chamber first (the usual advice), and only cuts the profile can make (MACS).
 */
export function controlCandidates(system: Pick<LoadedSystem, 'profile' | 'keys'>, lost: string, limit = 40): string[] {
  const { profile } = system;
  const old = readBitting(profile, lost);
  if (!old.ok) return [];
  const top = topMasterOf(system.keys);
  const topDepths = top ? readBitting(profile, top.bitting) : null;
  const span = profile.maxDepth - profile.minDepth + 1;
  const taken = new Set(system.keys.map((k) => k.bitting));
  const seen = new Set<string>();
  const apart: string[] = [];
  const rest: string[] = [];
  for (let shift = 1; shift < span * span && apart.length < limit; shift++) {
    const depths = old.depths.map((d, i) => profile.minDepth + ((d - profile.minDepth + shift * (i + 1)) % span));
    const text = depths.join('');
    if (seen.has(text) || taken.has(text) || depths.some((d, i) => d === old.depths[i]) || macsBreak(profile, depths) >= 0) continue;
    seen.add(text);
    (topDepths?.ok && depths.some((d, i) => d === topDepths.depths[i]) ? rest : apart).push(text);
  }
  return [...apart, ...rest].slice(0, limit);
}

const errorsOf = (profile: LoadedSystem['profile'], input: Awaited<ReturnType<typeof systemAuditInputFor>>['audit']) =>
  new Set(auditSystem(profile, input).filter((f) => f.severity === 'error').map((f) => `${f.code}|${f.message}`));

/** The first candidate that raises no new system audit error and shuts the lost control key out of every rebuilt core. */
async function newControlBitting(db: Knex, sealer: Sealer, system: LoadedSystem, lost: string, rebuilt: InstalledCore[]): Promise<{ bitting: string | null; tried: number }> {
  const { profile, audit: input } = await systemAuditInputFor(db, sealer, system.id);
  const before = errorsOf(profile, input);
  const candidates = controlCandidates(system, lost, 12);
  for (const bitting of candidates) {
    const fresh = [...errorsOf(profile, { ...input, control: bitting })].filter((e) => !before.has(e));
    if (fresh.length) continue;
    // Each core rebuilt for its own keys and the new control key: the lost one must neither remove nor turn it.
    const cores = rebuilt.map((c) => ({ id: c.id, operating: c.operating }));
    if (keyExposure(profile, { keys: system.keys, cores, control: bitting }, { bitting: lost }).length) continue;
    return { bitting, tried: candidates.length };
  }
  return { bitting: null, tried: candidates.length };
}

/** The plan (never the new bitting), with what the work order needs kept server-side. */
export async function controlPlan(db: Knex, sealer: Sealer, report: Report): Promise<{ plan: RekeyPlan; bitting: string | null; control: StoredControlKey; system: LoadedSystem; cores: InstalledCore[] }> {
  const control = (await findControlKey(db, report.keyId))!;
  const system = await loadSystem(db, sealer, control.keySystemId);
  const lost = await controlBitting(db, sealer, control.id);
  const all = await installedCores(db, system.id);
  const exposed = exposedCores(system, all, { bitting: lost });
  const hit = new Set(exposed.map((c) => c.id));
  const cores = await withRebuildKeys(db, all.filter((c) => hit.has(c.id)));
  const copies = await db('key_issues as i')
    .join('key_holders as h', 'h.id', 'i.holder_id')
    .where('i.control_key_id', control.id)
    .where((w) => void w.where('i.status', 'out').orWhere('i.id', report.issue_id))
    .orderBy('i.copy_number')
    .select<{ issueId: string; holderId: string; holderName: string; copyNumber: number }[]>('i.id as issueId', 'h.id as holderId', 'h.name as holderName', 'i.copy_number as copyNumber');
  const made = report.work_order_id ? await db('work_orders').where({ id: report.work_order_id }).first<{ status: string } | undefined>('status') : undefined;
  const replacedBy = report.new_control_key_id ? await findControlKey(db, report.new_control_key_id) : undefined;
  let bitting: string | null = null;
  let blocked: string | null = null;
  if (replacedBy) blocked = null;
  else if (control.status !== 'active') blocked = `Control key ${control.symbol} was replaced already: its cores are being rebuilt for the system's control key now.`;
  else if (!cores.length) blocked = `No installed core is built for control key ${control.symbol}: there is nothing to rebuild.`;
  else {
    const found = await newControlBitting(db, sealer, system, lost, cores);
    bitting = found.bitting;
    if (!bitting) blocked = `None of the ${found.tried} control keys tried passes the system audit and shuts ${control.symbol} out of every rebuilt core: choose the new control key by hand.`;
  }
  const newSymbol = replacedBy?.symbol ?? (await nextControlSymbol(db, system.id));
  const n = cores.length;
  const plan: RekeyPlan = {
    reportId: report.id,
    lostKey: { id: control.id, symbol: control.symbol, level: 'control' },
    newKeySymbol: replacedBy || bitting ? newSymbol : null,
    unusedKeysPassing: bitting ? 1 : 0,
    coresToRepin: exposed.map((c) => planCore(c)).sort((a, b) => naturalCompare(a.doorLabel ?? a.tag, b.doorLabel ?? b.tag)),
    incidentalCores: [],
    copiesToReissue: copies.map((c) => ({ ...c, keySymbol: control.symbol })),
    choices: [{
      option: 'new-control-key',
      description: `Cut a new control key ${newSymbol} for ${system.name}, rebuild every one of its ${n} installed core${n === 1 ? '' : 's'} for it (each for its door's keys, as now), and re-issue ${newSymbol} in place of the ${copies.length} cop${copies.length === 1 ? 'y' : 'ies'} of ${control.symbol} on record.`,
      coresToBuild: n,
      keysToReissue: copies.length,
      blocked,
    }],
    workOrderId: report.work_order_id && made?.status !== 'cancelled' ? report.work_order_id : null,
    chosen: report.rekey_option,
  };
  return { plan, bitting, control, system, cores };
}

/**
 * One step: the new control key in the lost one's place and a work order rebuilding every core built for the
 * lost one. After a cancelled work order, a new one rebuilds the cores still built for it, for the control key
 * already put in place.
 */
export async function controlWorkOrder(db: Knex, sealer: Sealer, report: Report, input: RekeyWorkOrderInput, by: string): Promise<{ workOrderId: string; newKeyId: string; newKeySymbol: string }> {
  if (input.option && input.option !== 'new-control-key') throw conflict('A lost control key has one choice: new-control-key.', [{ field: 'option', message: 'not a choice of this plan' }]);
  if (report.work_order_id) {
    const wo = await db('work_orders').where({ id: report.work_order_id }).first<{ status: string; number: number } | undefined>('status', 'number');
    if (wo?.status !== 'cancelled') throw conflict(`This report has its work order already (#${wo?.number}).`, [{ field: 'reportId', message: 'work order exists' }]);
  }
  const { plan, bitting, control, system, cores } = await controlPlan(db, sealer, report);
  const title = (symbol: string) => `Lost control key ${control.symbol}: rebuild every core for ${symbol}`;
  if (report.new_control_key_id) {
    const fresh = (await findControlKey(db, report.new_control_key_id))!;
    if (!cores.length) throw conflict(`No installed core is built for ${control.symbol} any more: there is nothing to rebuild.`, [{ field: 'reportId', message: 'no cores' }]);
    const wo = await rekeyWorkOrder(db, sealer, system.id, cores, new Map(), `${title(fresh.symbol)} (again)`, `control key ${control.symbol}`, { ...input, newKeySymbol: undefined }, by);
    await db('key_reports').where({ id: report.id }).update({ work_order_id: wo.id });
    return { workOrderId: wo.id, newKeyId: fresh.id, newKeySymbol: fresh.symbol };
  }
  const blocked = plan.choices[0]!.blocked;
  if (blocked || !bitting) throw conflict(blocked ?? 'No new control key can be chosen.', [{ field: 'option', message: 'cannot be made' }]);
  const symbol = (input.newKeySymbol ?? plan.newKeySymbol!).toUpperCase();
  if (await db('control_keys').where({ key_system_id: system.id, symbol }).first('id')) throw conflict(`The control key symbol ${symbol} is used already in this key system.`, [{ field: 'newKeySymbol', message: 'already used' }]);
  // The cores built now were pinned for the lost control key: they say so until they are rebuilt.
  await db('cores').where({ key_system_id: system.id }).whereNull('control_key_id').whereIn('state', ['loaded', 'checked', 'capped', 'installed']).update({ control_key_id: control.id, updated_at: db.fn.now() });
  await db('control_keys').where({ id: control.id }).update({ status: 'replaced', bitting_enc: sealer.seal(await controlBitting(db, sealer, control.id), controlKeyContext(control.id)) });
  const [fresh] = await db('control_keys').insert({ key_system_id: system.id, symbol }).returning<{ id: string }[]>('id');
  await db('key_systems').where({ id: system.id }).update({ control_enc: sealer.seal(bitting, controlContext(system.id)), updated_at: db.fn.now() });
  const wo = await rekeyWorkOrder(db, sealer, system.id, cores, new Map(), title(symbol), `control key ${control.symbol}`, { ...input, newKeySymbol: undefined }, by);
  await db('key_reports').where({ id: report.id }).update({ work_order_id: wo.id, rekey_option: 'new-control-key', new_control_key_id: fresh!.id });
  return { workOrderId: wo.id, newKeyId: fresh!.id, newKeySymbol: symbol };
}

/**
 * Close-out of a lost control key's rekey, in the installs' transaction (syncLand.ts calls it beside
 * keyCloseout.ts, whose reports are those of keys): the same two steps. A replaced control key no installed
 * core is built for any more is retired (`control-key.retired`; its report `rebuilt_at`). The report closes
 * when the engine finds the lost control key removes and turns no installed core (each read with the control
 * key it was built for); until then it keeps the cores that still do (`remaining`). At retirement every holder
 * of a copy of it (out, or the reported one) gets a re-issue task naming the new control key. Nothing happens twice: a
 * retired key and a closed report are not touched again, and an event is written only when something changes.
 */
export async function closeControlRekeys(trx: Knex.Transaction, sealer: Sealer, coreIds: string[], actor: Actor): Promise<string[]> {
  if (!coreIds.length) return [];
  const systems = trx('cores').whereIn('id', coreIds).distinct('key_system_id');
  const retired = await trx('control_keys as k')
    .where('k.status', 'replaced')
    .whereIn('k.key_system_id', systems)
    .whereNotExists(trx('cores as c').whereRaw('c.control_key_id = k.id').where('c.state', 'installed'))
    .forUpdate()
    .select<{ id: string; symbol: string }[]>('k.id', 'k.symbol');
  for (const k of retired) {
    await trx('control_keys').where({ id: k.id }).update({ status: 'retired', retired_at: trx.fn.now() });
    await audit(trx, actor, 'control-key.retired', { type: 'control-key', id: k.id }, { symbol: k.symbol });
  }
  const reports = await trx('key_reports as r')
    .join('key_issues as i', 'i.id', 'r.issue_id')
    .join('control_keys as k', 'k.id', 'i.control_key_id')
    .join('work_orders as w', 'w.id', 'r.work_order_id')
    .where('r.status', 'open')
    .whereNot('w.status', 'cancelled')
    .whereIn('k.key_system_id', systems)
    .orderBy('r.id')
    .forUpdate('r')
    .select<{ id: string; issueId: string; controlKeyId: string; newControlKeyId: string; symbol: string; status: string; systemId: string; workOrderId: string; remaining: RemainingCore[] | null; rebuiltAt: Date | null }[]>('r.id', 'r.issue_id as issueId', 'k.id as controlKeyId', 'r.new_control_key_id as newControlKeyId', 'k.symbol', 'k.status', 'k.key_system_id as systemId', 'r.work_order_id as workOrderId', 'r.remaining', 'r.rebuilt_at as rebuiltAt');
  const closed: string[] = [];
  for (const r of reports) {
    if (r.status === 'retired' && !r.rebuiltAt) {
      // Every holder of a copy (out, or the reported one) gets a re-issue task for the new control key.
      const copies = await trx('key_issues').where({ control_key_id: r.controlKeyId }).where((w) => void w.where('status', 'out').orWhere('id', r.issueId)).select<{ id: string; holder_id: string }[]>('id', 'holder_id');
      if (copies.length) await trx('key_reissue_tasks').insert(copies.map((c) => ({ report_id: r.id, holder_id: c.holder_id, old_issue_id: c.id, new_control_key_id: r.newControlKeyId }))).onConflict(['report_id', 'old_issue_id']).ignore();
      await trx('key_reports').where({ id: r.id }).update({ rebuilt_at: trx.fn.now() });
      await audit(trx, actor, 'key-report.rebuilt', { type: 'key-report', id: r.id }, { workOrder: r.workOrderId, retired: 1, reissue: copies.length });
    }
    const remaining = await stillRemoves(trx, sealer, r);
    if (!remaining.length) {
      await trx('key_reports').where({ id: r.id }).update({ status: 'closed', closed_at: trx.fn.now(), remaining: JSON.stringify([]) });
      const reissue = Number((await trx('key_reissue_tasks').where({ report_id: r.id }).count({ n: '*' }).first())?.n ?? 0);
      await audit(trx, actor, 'key-report.closed', { type: 'key-report', id: r.id }, { workOrder: r.workOrderId, retired: 1, reissue });
      closed.push(r.id);
    } else if (r.status === 'retired') {
      await keepRemaining(trx, actor, r, remaining);
    }
  }
  return closed;
}

/** Every installed core the lost control key still removes or turns, through the engine (each core read with the control key it was built for). */
async function stillRemoves(trx: Knex, sealer: Sealer, r: { systemId: string; controlKeyId: string; symbol: string }): Promise<RemainingCore[]> {
  const system = await loadSystem(trx, sealer, r.systemId);
  return exposedCores(system, await installedCores(trx, r.systemId), { bitting: await controlBitting(trx, sealer, r.controlKeyId) }).map((c) => ({ coreId: c.id, tag: c.tag, doorId: c.doorId, doorLabel: c.doorLabel, keySymbol: r.symbol, how: c.how }));
}

/**
 * A lost control key's report closed by hand once its rekey is installed, accepting the cores it still removes or
 * turns, with the supervisor's note (as keyCloseout.ts's closeReportAccepting for a key). False when the report is
 * not a control key's: the caller hands it to keyCloseout.ts.
 */
export async function closeControlReportAccepting(trx: Knex.Transaction, sealer: Sealer, reportId: string, note: string, actor: Actor): Promise<boolean> {
  const r = await trx('key_reports as r')
    .join('key_issues as i', 'i.id', 'r.issue_id')
    .join('control_keys as k', 'k.id', 'i.control_key_id')
    .where('r.id', reportId)
    .forUpdate('r')
    .first<{ status: string; workOrderId: string | null; rebuiltAt: Date | null; controlKeyId: string; symbol: string; systemId: string } | undefined>('r.status', 'r.work_order_id as workOrderId', 'r.rebuilt_at as rebuiltAt', 'k.id as controlKeyId', 'k.symbol', 'k.key_system_id as systemId');
  if (!r) return false;
  if (r.status !== 'open') throw conflict('This report is closed already.', [{ field: 'reportId', message: 'closed' }]);
  if (!r.rebuiltAt) throw notRebuiltYet(r.workOrderId, `control key ${r.symbol} removes no core`);
  const remaining = await stillRemoves(trx, sealer, r);
  await trx('key_reports').where({ id: reportId }).update({ status: 'closed', closed_at: trx.fn.now(), remaining: JSON.stringify(remaining), close_note: note, closed_by: actor.id });
  await audit(trx, actor, 'key-report.closed', { type: 'key-report', id: reportId }, { workOrder: r.workOrderId, retired: 1, note, accepted: remaining.length });
  return true;
}
