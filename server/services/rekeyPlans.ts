/**
 * The rekey plan of a lost or stolen key report, and the one step that turns its chosen option
 * into a work order for the Bench. Every new key is an unused key of its master's progression
 * (progressKeys with the hierarchy rules) that raises no system audit error, and a choice is
 * offered only when the engine shows the lost key turns none of the cores as they would be
 * rebuilt (keyExposure over the planned pinning). The choices:
 *   new-change-key      a change key: a new change key under the same master, its cores re-pinned;
 *   re-master           a master: a new master over the same change keys (new master wafers);
 *   rekey-under-master  a master: a new master and a new change key for each key under it.
 * The report keeps the choice and each old key's new key; close-out (keyCloseout.ts) retires the
 * old keys once the work order's cores are installed.
 */
import type { Knex } from 'knex';
import { auditSystem, KeyingError, keyExposure, placementChecker, progressKeys } from '../../shared/keying';
import type { WorkOrderDoor } from '../../shared/schemas/records';
import type { PlanCore, RekeyOption, RekeyPlan, RekeyWorkOrderInput } from '../../shared/schemas/keyControlRekey';
import { naturalCompare } from '../../shared/words';
import { conflict, notFound } from '../errors';
import { exposedCores, installedCores } from './keyExposure';
import { addKeys, loadSystem, placementSystemOf, updateKey, type LoadedSystem, type SystemKey } from './keySystems';
import type { Sealer } from './secrets';
import { systemAuditInputFor, levelFor } from './systemAudit';
import { controlPlan, controlWorkOrder } from './controlRekey';
import { createWorkOrder } from './workOrders';

/** An installed core the lost key is pinned into, with what its rebuild is planned from: its door's key and its cross key. */
export type InstalledCore = Awaited<ReturnType<typeof installedCores>>[number] & { doorKeyId: string | null; crossKeyId: string | null };
/** A key the recipe adds: under an existing key (parentId) or under the new master (parentId 'new'). */
interface NewKey { ref: string; symbol: string; level: SystemKey['level']; parentId: string; bitting: string; replaces: string | null }
/** What a choice does to the key system; the work order follows from it. */
interface Recipe { add: NewKey[]; moveUnderNew: string[] }

const NEW = 'new-master';
const depthsOf = (b: string) => b.split('');
/** Chambers (1-based) where any of `keys` differs from `parent`: the ones progressed at their level. */
const progressedUnder = (parent: SystemKey, keys: SystemKey[]) => depthsOf(parent.bitting).flatMap((d, i) => (keys.some((s) => depthsOf(s.bitting)[i] !== d) ? [i + 1] : []));

/** Unused bittings under `parent` in progression order (the parent may be a proposed key, placed with `extra`). */
function progression(system: LoadedSystem, parent: { id: string; bitting: string }, progress: number[], extra: SystemKey[] = []): string[] {
  if (!progress.length) return [];
  const placed = placementSystemOf({ control: system.control, keys: [...system.keys, ...extra] });
  try {
    const taken = new Set([...system.keys, ...extra].map((k) => k.bitting));
    return progressKeys(system.profile, { topMaster: parent.bitting, progress, control: system.control, limit: 2000, placement: { system: placed, parentId: parent.id } }).filter((b) => !taken.has(b));
  } catch (err) {
    if (err instanceof KeyingError) return [];
    throw err;
  }
}

/** The indexes of `proposed` that the system audit, with all of them added, names in no error. */
async function passingAudit(db: Knex, sealer: Sealer, system: LoadedSystem, proposed: { bitting: string; level: SystemKey['level'] }[]): Promise<Set<number>> {
  const { profile, audit } = await systemAuditInputFor(db, sealer, system.id);
  const keys = proposed.map((p, i) => ({ id: `proposed:${i}`, symbol: `(new ${i + 1})`, bitting: p.bitting, level: levelFor[p.level], opens: [] as string[] }));
  const failing = new Set<number>();
  for (const f of auditSystem(profile, { ...audit, keys: [...audit.keys, ...keys] })) {
    if (f.severity !== 'error') continue;
    for (const id of f.keyIds ?? []) if (id.startsWith('proposed:')) failing.add(Number(id.slice(9)));
  }
  return new Set(proposed.flatMap((_, i) => (failing.has(i) ? [] : [i])));
}

/** Unused keys under `parent` that pass the system audit, in progression order. */
async function unusedKeys(db: Knex, sealer: Sealer, system: LoadedSystem, parent: SystemKey, level: SystemKey['level']): Promise<string[]> {
  const fresh = progression(system, parent, progressedUnder(parent, system.keys.filter((k) => k.parentId === parent.id))).slice(0, 200);
  const ok = await passingAudit(db, sealer, system, fresh.map((bitting) => ({ bitting, level })));
  return fresh.filter((_, i) => ok.has(i));
}

/**
 * The keys each core would be rebuilt for: its door's key (or that key's new key), the masters above it
 * as the recipe leaves them, and its cross key. Cores without a door keep their keys as pinned.
 */
function plannedOperating(system: LoadedSystem, cores: InstalledCore[], recipe: Recipe) {
  const newId = (ref: string) => `recipe:${ref}`;
  const byOld = new Map(recipe.add.flatMap((k) => (k.replaces ? [[k.replaces, newId(k.ref)] as const] : [])));
  const moved = new Set(recipe.moveUnderNew);
  const parentOf = new Map<string, string | null>([
    ...system.keys.map((k) => [k.id, moved.has(k.id) ? newId(NEW) : k.parentId] as const),
    ...recipe.add.map((k) => [newId(k.ref), k.parentId === NEW ? newId(NEW) : k.parentId] as const),
  ]);
  const chain = (id: string): string[] => [id, ...(parentOf.get(id) ? chain(parentOf.get(id)!) : [])];
  const keys = [...system.keys, ...recipe.add.map((k) => ({ id: newId(k.ref), bitting: k.bitting }))];
  const planned = cores.map((c) => {
    if (!c.doorKeyId) return { id: c.id, operating: c.operating };
    const cross = c.crossKeyId ? [byOld.get(c.crossKeyId) ?? c.crossKeyId] : [];
    return { id: c.id, operating: [...chain(byOld.get(c.doorKeyId) ?? c.doorKeyId), ...cross] };
  });
  return { keys, planned };
}

/** Does the lost key turn any of these cores once they are rebuilt for the recipe's keys? (the engine's keyExposure) */
function stillTurns(system: LoadedSystem, cores: InstalledCore[], lost: SystemKey, recipe: Recipe): boolean {
  const { keys, planned } = plannedOperating(system, cores, recipe);
  return keyExposure(system.profile, { keys, cores: planned, control: system.control }, lost).some((e) => e.how !== 'control');
}

function freeSymbol(system: LoadedSystem, prefix: string, kind: 'number' | 'letter', skip: Set<string> = new Set()): string {
  const used = new Set([...system.keys.map((k) => k.symbol.toUpperCase()), ...skip]);
  for (let n = 1; ; n++) {
    const symbol = kind === 'number' ? `${prefix}${n}` : `${prefix}${n <= 26 ? String.fromCharCode(64 + n) : `Z${n - 26}`}`;
    if (!used.has(symbol)) return symbol;
  }
}

interface Choice { option: RekeyOption; recipe: Recipe | null; blocked: string | null }

/** The lost master's two choices, each with its recipe when the engine finds one that shuts the key out. */
async function masterChoices(db: Knex, sealer: Sealer, system: LoadedSystem, key: SystemKey, cores: InstalledCore[]): Promise<Choice[]> {
  const parent = key.parentId ? system.keys.find((k) => k.id === key.parentId) : undefined;
  const children = system.keys.filter((k) => k.parentId === key.id && k.status === 'active').sort((a, b) => naturalCompare(a.symbol, b.symbol));
  if (!parent) {
    const blocked = `${key.symbol} is the top of the system: a new top master changes every key, so plan that rekey by hand.`;
    return [{ option: 're-master', recipe: null, blocked }, { option: 'rekey-under-master', recipe: null, blocked }];
  }
  const masters = (await unusedKeys(db, sealer, system, parent, key.level)).slice(0, 40);
  const symbol = freeSymbol(system, parent.symbol, 'letter');
  const asMaster = (bitting: string): NewKey => ({ ref: NEW, symbol, level: key.level, parentId: parent.id, bitting, replaces: key.id });
  const proposedMaster = (bitting: string): SystemKey => ({ id: NEW, symbol, level: key.level, parentId: parent.id, status: 'active', crossKeyed: false, notes: null, bitting });

  let reMaster: Recipe | null = null;
  for (const bitting of masters) {
    const check = placementChecker(system.profile, placementSystemOf({ control: system.control, keys: [...system.keys, proposedMaster(bitting)] }));
    if (children.some((c) => check({ id: c.id, bitting: c.bitting, parentId: NEW }).length)) continue;
    const recipe = { add: [asMaster(bitting)], moveUnderNew: children.map((c) => c.id) };
    if (!stillTurns(system, cores, key, recipe)) { reMaster = recipe; break; }
  }

  let rekey: Recipe | null = null;
  const grandchildren = children.some((c) => system.keys.some((k) => k.parentId === c.id && k.status === 'active'));
  for (const bitting of grandchildren ? [] : masters.slice(0, 20)) {
    const fresh = progression(system, { id: NEW, bitting }, progressedUnder(key, children), [proposedMaster(bitting)]).slice(0, children.length * 3 + 10);
    const ok = await passingAudit(db, sealer, system, [{ bitting, level: key.level }, ...fresh.map((b) => ({ bitting: b, level: 'change' as const }))]);
    if (!ok.has(0)) continue;
    const usable = fresh.filter((_, i) => ok.has(i + 1));
    if (usable.length < children.length) continue;
    const taken = new Set<string>();
    const add = [asMaster(bitting), ...children.map((c, i): NewKey => {
      const s = freeSymbol(system, symbol, 'number', taken);
      taken.add(s);
      return { ref: c.id, symbol: s, level: c.level, parentId: NEW, bitting: usable[i]!, replaces: c.id };
    })];
    const recipe = { add, moveUnderNew: [] };
    if (!stillTurns(system, cores, key, recipe)) { rekey = recipe; break; }
  }
  const none = (what: string) => `No ${what} of ${parent.symbol}'s progression passes the system audit and shuts ${key.symbol} out of its cores`;
  return [
    { option: 're-master', recipe: reMaster, blocked: reMaster ? null : `${none('new master')} while keeping the change keys under ${key.symbol} (their cuts hold ${key.symbol}'s): choose the rekey.` },
    { option: 'rekey-under-master', recipe: rekey, blocked: rekey ? null : grandchildren ? `Masters hang under ${key.symbol}: plan that rekey by hand.` : `${none('new master with new change keys')}: add keys to the progression first.` },
  ];
}

/** Each core with what its rebuild is planned from: its door's key and its cross key. */
export async function withRebuildKeys(db: Knex, pinned: Awaited<ReturnType<typeof installedCores>>): Promise<InstalledCore[]> {
  const doorKeys = new Map((await db('doors').whereIn('id', pinned.flatMap((c) => (c.doorId ? [c.doorId] : []))).select<{ id: string; key_id: string | null }[]>('id', 'key_id')).map((d) => [d.id, d.key_id]));
  const cross = new Map((await db('core_keys').whereIn('core_id', pinned.map((c) => c.id)).where({ cross_keyed: true }).select<{ core_id: string; key_id: string }[]>('core_id', 'key_id')).map((l) => [l.core_id, l.key_id]));
  return pinned.map((c) => ({ ...c, doorKeyId: (c.doorId && doorKeys.get(c.doorId)) || null, crossKeyId: cross.get(c.id) ?? null }));
}

export const planCore = (c: { id: string; tag: string; doorId: string | null; doorLabel: string | null }): PlanCore => ({ coreId: c.id, tag: c.tag, doorId: c.doorId, doorLabel: c.doorLabel });

export async function loadReport(db: Knex, reportId: string) {
  const r = await db('key_reports as r').join('key_issues as i', 'i.id', 'r.issue_id').leftJoin('keys as k', 'k.id', 'i.key_id').leftJoin('control_keys as ck', 'ck.id', 'i.control_key_id').where('r.id', reportId).first('r.id', 'r.issue_id', 'r.status', 'r.work_order_id', 'r.rekey_option', 'r.new_control_key_id', db.raw('coalesce(i.key_id, i.control_key_id) as "keyId"'), db.raw('coalesce(k.key_system_id, ck.key_system_id) as "systemId"'), db.raw('(i.control_key_id is not null) as control'));
  if (!r) throw notFound('That key report');
  return r as { id: string; issue_id: string; status: string; work_order_id: string | null; rekey_option: RekeyOption | null; new_control_key_id: string | null; keyId: string; systemId: string; control: boolean };
}

/** The plan, with each choice's recipe kept server-side (its bittings are never answered). */
async function computePlan(db: Knex, sealer: Sealer, reportId: string): Promise<{ plan: RekeyPlan; choices: Choice[]; system: LoadedSystem; cores: InstalledCore[] }> {
  const report = await loadReport(db, reportId);
  const system = await loadSystem(db, sealer, report.systemId);
  const key = system.keys.find((k) => k.id === report.keyId)!;
  const all = await installedCores(db, system.id);
  const exposed = exposedCores(system, all, key);
  const under = new Set([key.id]);
  // Every key under a master (change keys, and masters under a grand master) goes with it.
  for (let grew = true; grew; ) {
    grew = false;
    for (const k of system.keys) if (k.parentId && under.has(k.parentId) && !under.has(k.id)) { under.add(k.id); grew = true; }
  }
  const copies = await db('key_issues as i').join('key_holders as h', 'h.id', 'i.holder_id').join('keys as k', 'k.id', 'i.key_id').whereIn('i.key_id', key.level === 'change' ? [key.id] : [...under]).where((w) => {
      w.where('i.status', 'out').orWhere('i.id', report.issue_id);
    }).orderBy(['k.symbol', 'i.copy_number']).select<RekeyPlan['copiesToReissue']>('i.id as issueId', 'h.id as holderId', 'h.name as holderName', 'k.symbol as keySymbol', 'i.copy_number as copyNumber');
  const intended = new Set(exposed.filter((c) => c.how === 'intended').map((c) => c.id));
  const pinned = all.filter((c) => intended.has(c.id));
  const cores = await withRebuildKeys(db, pinned);
  const coresToRepin = exposed.filter((c) => c.how === 'intended').map((c) => planCore(c)).sort((a, b) => naturalCompare(a.doorLabel ?? a.tag, b.doorLabel ?? b.tag));
  const incidentalCores = exposed.filter((c) => c.how === 'incidental').map((c) => planCore(c));
  const ownCopies = copies.filter((c) => c.keySymbol === key.symbol).length;
  const parent = key.parentId ? system.keys.find((k) => k.id === key.parentId) : undefined;
  let passing = 0;
  let choices: Choice[];
  if (key.level === 'change') {
    const fresh = parent ? await unusedKeys(db, sealer, system, parent, 'change') : [];
    passing = fresh.length;
    const recipe: Recipe | null = fresh[0] && parent ? { add: [{ ref: NEW, symbol: freeSymbol(system, parent.symbol, 'number'), level: 'change', parentId: parent.id, bitting: fresh[0], replaces: key.id }], moveUnderNew: [] } : null;
    choices = [{ option: 'new-change-key', recipe, blocked: recipe ? null : 'No unused key of the progression passes the system audit: add keys to the progression first.' }];
  } else {
    choices = await masterChoices(db, sealer, system, key, cores);
  }
  const n = coresToRepin.length;
  const coreWords = (k: number) => `${k} core${k === 1 ? '' : 's'}`;
  const keyWords = (k: number) => `${k} key${k === 1 ? '' : 's'}`;
  const words: Record<Exclude<RekeyOption, 'new-control-key'>, [string, number]> = {
    'new-change-key': [`Pin the ${coreWords(n)} of ${key.symbol} for a new change key under ${parent?.symbol ?? 'its master'} and re-issue ${keyWords(ownCopies)} in place of ${key.symbol}'s copies.`, ownCopies],
    're-master': [`Give the ${coreWords(n)} under ${key.symbol} a new master (new master wafers; change keys unchanged) and re-issue only the ${keyWords(ownCopies)} of ${key.symbol}.`, ownCopies],
    'rekey-under-master': [`Rekey every core under ${key.symbol} (new master and new change keys) and re-issue every copy of ${key.symbol} and the keys under it (${keyWords(copies.length)}).`, copies.length],
  };
  const first = choices.find((c) => c.recipe)?.recipe?.add[0];
  const plan: RekeyPlan = {
    reportId,
    lostKey: { id: key.id, symbol: key.symbol, level: key.level },
    newKeySymbol: first?.symbol ?? null,
    unusedKeysPassing: passing,
    coresToRepin,
    incidentalCores,
    copiesToReissue: copies,
    choices: choices.map((c) => ({ option: c.option, description: words[c.option as keyof typeof words][0], coresToBuild: n, keysToReissue: words[c.option as keyof typeof words][1], blocked: c.blocked })),
    // A cancelled work order is as good as none: the plan offers the step again (replanCancelled).
    workOrderId: report.work_order_id && (await db('work_orders').where({ id: report.work_order_id }).first('status'))?.status !== 'cancelled' ? report.work_order_id : null,
    chosen: report.rekey_option,
  };
  return { plan, choices, system, cores };
}

export async function rekeyPlan(db: Knex, sealer: Sealer, reportId: string): Promise<RekeyPlan> {
  const report = await loadReport(db, reportId);
  if (report.control) return (await controlPlan(db, sealer, report)).plan;
  return (await computePlan(db, sealer, reportId)).plan;
}

/** Adds the recipe's keys, moves what it moves, marks the lost key lost, and points each door at its new key. */
async function applyRecipe(db: Knex, sealer: Sealer, system: LoadedSystem, lost: SystemKey, recipe: Recipe, symbol: string): Promise<Map<string, string>> {
  const master = recipe.add[0]!;
  const symbols = new Map(recipe.add.map((k) => [k.ref, k.ref === NEW ? symbol : k.symbol]));
  const ids = await addKeys(db, sealer, system.id, recipe.add.map((k) => ({
    symbol: symbols.get(k.ref)!,
    level: k.level,
    parentId: k.parentId === NEW ? null : k.parentId,
    ...(k.parentId === NEW ? { parentSymbol: symbol } : {}),
    bitting: k.bitting,
    status: 'active' as const,
    crossKeyed: false,
    ...(k.replaces ? { notes: `Replaces ${system.keys.find((x) => x.id === k.replaces)!.symbol}` } : {}),
  })));
  const newOf = new Map(recipe.add.flatMap((k, i) => (k.replaces ? [[k.replaces, ids[i]!] as const] : [])));
  for (const child of recipe.moveUnderNew) await updateKey(db, sealer, system.id, child, { parentId: ids[recipe.add.indexOf(master)]! });
  await db('keys').where({ id: lost.id }).update({ status: 'lost', updated_at: db.fn.now() });
  for (const [oldId, newId] of newOf) await db('doors').where({ key_id: oldId }).update({ key_id: newId, updated_at: db.fn.now() });
  return newOf;
}

/** One step: the chosen option's keys in place of the old ones, and a work order for the cores the lost key is pinned into. */
export async function planToWorkOrder(db: Knex, sealer: Sealer, reportId: string, input: RekeyWorkOrderInput, by: string): Promise<{ workOrderId: string; newKeyId: string; newKeySymbol: string }> {
  const report = await db('key_reports').where({ id: reportId }).forUpdate().first('status', 'work_order_id', 'new_keys');
  if (!report) throw notFound('That key report');
  if (report.status !== 'open') throw conflict('This report is closed.', [{ field: 'reportId', message: 'closed' }]);
  const loaded = await loadReport(db, reportId);
  if (loaded.control) return controlWorkOrder(db, sealer, loaded, input, by);
  if (report.work_order_id) {
    const wo = await db('work_orders').where({ id: report.work_order_id }).first('status', 'number');
    if (wo?.status !== 'cancelled') throw conflict(`This report has its work order already (#${wo?.number}).`, [{ field: 'reportId', message: 'work order exists' }]);
    return replanCancelled(db, sealer, reportId, report.new_keys as { oldKeyId: string; newKeyId: string }[], input, by);
  }
  const { plan, choices, system, cores } = await computePlan(db, sealer, reportId);
  const lost = system.keys.find((k) => k.id === plan.lostKey.id)!;
  // Another copy of the same key reported earlier may have its rekey under way already: this report closes with it.
  const underWay = await db('key_reports as r').join('work_orders as w', 'w.id', 'r.work_order_id').where('r.status', 'open').whereNot('w.status', 'cancelled').whereRaw('r.new_keys @> ?::jsonb', [JSON.stringify([{ oldKeyId: lost.id }])]).first<{ number: number } | undefined>('w.number');
  if (underWay) throw conflict(`Key ${lost.symbol} is being rekeyed already by work order #${underWay.number}; this report closes when its cores are installed.`, [{ field: 'reportId', message: 'rekey under way' }]);
  const choice = input.option ? choices.find((c) => c.option === input.option) : choices[0];
  if (!choice) throw conflict(`${plan.lostKey.symbol} is a ${plan.lostKey.level === 'change' ? 'change key' : 'master'}: the choices are ${choices.map((c) => c.option).join(' or ')}.`, [{ field: 'option', message: 'not a choice of this plan' }]);
  if (!choice.recipe) throw conflict(choice.blocked!, [{ field: 'option', message: 'cannot be made' }]);
  if (!plan.coresToRepin.length) throw conflict(`No installed core is pinned for ${plan.lostKey.symbol}: there is nothing to re-pin.`, [{ field: 'reportId', message: 'no cores' }]);
  const symbol = (input.newKeySymbol ?? choice.recipe.add[0]!.symbol).toUpperCase();
  const newOf = await applyRecipe(db, sealer, system, lost, choice.recipe, symbol);
  const newMaster = newOf.get(lost.id)!;
  const wo = await rekeyWorkOrder(db, sealer, system.id, cores, newOf, `Lost key ${plan.lostKey.symbol}: ${choice.option === 're-master' ? 're-master' : 'rekey'} to ${symbol}`, plan.lostKey.symbol, input, by);
  const newKeys = [...newOf].map(([oldKeyId, newKeyId]) => ({ oldKeyId, newKeyId }));
  await db('key_reports').where({ id: reportId }).update({ work_order_id: wo.id, rekey_option: choice.option, new_keys: JSON.stringify(newKeys) });
  return { workOrderId: wo.id, newKeyId: newMaster, newKeySymbol: symbol };
}

/** The work order of a rekey: each core rebuilt for its door's key (or that key's new key), keeping a cross key it had. */
export async function rekeyWorkOrder(db: Knex, sealer: Sealer, systemId: string, cores: InstalledCore[], newOf: Map<string, string>, title: string, lostSymbol: string, input: RekeyWorkOrderInput, by: string) {
  const doors: WorkOrderDoor[] = cores.flatMap((c) => {
    if (!c.doorId || !c.doorKeyId) return [];
    const crossKeyId = c.crossKeyId ? (newOf.get(c.crossKeyId) ?? c.crossKeyId) : null;
    return [{ doorId: c.doorId, keyId: newOf.get(c.doorKeyId) ?? c.doorKeyId, ...(crossKeyId ? { crossKeyId } : {}) }];
  });
  return createWorkOrder(db, sealer, { title, purpose: 'lost-key-rekey', keySystemId: systemId, assigneeId: input.assigneeId ?? null, dueDate: input.dueDate ?? null, notes: `Key report: ${lostSymbol} reported lost or stolen. Return the removed cores to the shop.`, doors }, by);
}

/**
 * Its work order was cancelled: the new keys stay (they are in place, the doors take them), and a new
 * work order rebuilds the cores still pinned for the old keys.
 */
async function replanCancelled(db: Knex, sealer: Sealer, reportId: string, replaced: { oldKeyId: string; newKeyId: string }[], input: RekeyWorkOrderInput, by: string) {
  const { plan, system, cores } = await computePlan(db, sealer, reportId);
  const newOf = new Map(replaced.map((k) => [k.oldKeyId, k.newKeyId]));
  const fresh = system.keys.find((k) => k.id === newOf.get(plan.lostKey.id))!;
  if (!cores.length) throw conflict(`No installed core is pinned for ${plan.lostKey.symbol} any more: there is nothing to rebuild.`, [{ field: 'reportId', message: 'no cores' }]);
  const wo = await rekeyWorkOrder(db, sealer, system.id, cores, newOf, `Lost key ${plan.lostKey.symbol}: rekey to ${fresh.symbol} (again)`, plan.lostKey.symbol, input, by);
  await db('key_reports').where({ id: reportId }).update({ work_order_id: wo.id });
  return { workOrderId: wo.id, newKeyId: fresh.id, newKeySymbol: fresh.symbol };
}
