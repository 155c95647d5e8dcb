/**
 * Work orders: a batch of cores planned together. Creating one computes every core's
 * chart with the shared engine and refuses the whole order if any chart has an error.
 * The packet is what the technician's tablet keeps offline.
 */
import type { Knex } from 'knex';
import { hasErrors, keyOperates, pinCore, trayFor, type CorePinning } from '../../shared/keying';
import type { KeyCheckItem, Packet } from '../../shared/schemas/packet';
import { compareSymbols } from '../../shared/keyLevels';
import type { WorkOrder, WorkOrderDoor, WorkOrderInput, WorkOrderUpdate } from '../../shared/schemas/records';
import { badRequest, conflict, notFound } from '../errors';
import { chainOf, loadSystem, type LoadedSystem, type SystemKey } from './keySystems';
import type { Sealer } from './secrets';

/** Hours a packet stays on a tablet: one shift. */
export const PACKET_HOURS = 12;

export function pinningFor(system: LoadedSystem, operating: SystemKey[]): CorePinning {
  const chain = [...operating].sort((a, b) => levelRank(b.level) - levelRank(a.level));
  const top = chain.find((k) => !k.crossKeyed && k.level !== 'change') ?? chain[chain.length - 1];
  return pinCore(system.profile, { operating: chain.map((k) => k.bitting), symbols: chain.map((k) => k.symbol), control: system.control, ...(top ? { topMaster: top.bitting } : {}) });
}

function levelRank(level: string): number {
  return { change: 0, master: 1, gm: 2, ggm: 3 }[level] ?? 0;
}

export function workOrderQuery(db: Knex) {
  return db('work_orders as w')
    .join('key_systems as s', 's.id', 'w.key_system_id')
    .leftJoin('users as u', 'u.id', 'w.assignee_id')
    .select(
      'w.id',
      'w.number',
      'w.title',
      'w.purpose',
      'w.key_system_id as keySystemId',
      's.name as keySystemName',
      'w.assignee_id as assigneeId',
      'u.name as assigneeName',
      db.raw(`to_char(w.due_date, 'YYYY-MM-DD') as "dueDate"`),
      'w.status',
      'w.notes',
      'w.created_at as createdAt',
      db.raw(`(select count(*) from work_order_cores x where x.work_order_id = w.id)::int as "coreCount"`),
      db.raw(`(select count(*) from work_order_cores x join cores c on c.id = x.core_id where x.work_order_id = w.id and c.state in ('capped','installed'))::int as "doneCount"`),
      db.raw(`(select count(distinct cp.core_id) from completions cp join cores c on c.id = cp.core_id where cp.work_order_id = w.id and cp.result = 'failed' and c.state not in ('capped','installed','retired'))::int as "failedCount"`),
      db.raw(`exists(select 1 from work_order_cores x join cores c on c.id = x.core_id join doors d on d.id = c.door_id where x.work_order_id = w.id and d.fire_rated) as "hasFireRated"`),
    );
}

export const iso = <T extends { createdAt?: unknown }>(r: T): T => ({ ...r, createdAt: r.createdAt ? new Date(r.createdAt as string).toISOString() : r.createdAt });

export async function getWorkOrder(db: Knex, id: string): Promise<WorkOrder> {
  const row = await workOrderQuery(db).where('w.id', id).first();
  if (!row) throw notFound('That work order');
  return iso(row);
}

interface PlannedDoor {
  doorId: string;
  chain: SystemKey[];
  crossKeyId: string | null;
}

/**
 * Checks each door and computes its chart with the engine: the change key and its masters, and
 * a cross-keyed second change key when given. Any error refuses the lot, naming the row.
 */
async function planDoors(trx: Knex, system: LoadedSystem, doors: WorkOrderDoor[], taken: Set<string> = new Set()): Promise<PlannedDoor[]> {
  const doorIds = doors.map((d) => d.doorId);
  if (new Set(doorIds).size !== doorIds.length) throw badRequest('A door appears twice in the work order.', [{ field: 'doors', message: 'each door once' }]);
  const rows = await trx('doors').whereIn('id', doorIds).whereNull('retired_at').select('id', 'label');
  const labelOf = new Map(rows.map((d: { id: string; label: string }) => [d.id, d.label]));
  const problems: { field: string; message: string }[] = [];
  const planned: PlannedDoor[] = [];
  const usable = (i: number, field: string, label: string, keyId: string): SystemKey | null => {
    const key = system.keys.find((k) => k.id === keyId);
    if (!key) problems.push({ field: `doors.${i}.${field}`, message: `door ${label}: the key is not in ${system.name}` });
    else if (key.status !== 'active') problems.push({ field: `doors.${i}.${field}`, message: `door ${label}: key ${key.symbol} is ${key.status}; choose an active key` });
    else return key;
    return null;
  };
  for (const [i, d] of doors.entries()) {
    const label = labelOf.get(d.doorId);
    if (!label) {
      problems.push({ field: `doors.${i}.doorId`, message: 'no such door, or the door is retired' });
      continue;
    }
    if (taken.has(d.doorId)) {
      problems.push({ field: `doors.${i}.doorId`, message: `door ${label} is in this work order already` });
      continue;
    }
    const key = usable(i, 'keyId', label, d.keyId);
    if (!key) continue;
    const chain = chainOf(system.keys, key.id);
    let crossKeyId: string | null = null;
    if (d.crossKeyId) {
      const cross = usable(i, 'crossKeyId', label, d.crossKeyId);
      if (!cross) continue;
      if (chain.some((k) => k.id === cross.id)) {
        problems.push({ field: `doors.${i}.crossKeyId`, message: `door ${label}: ${cross.symbol} opens this door already; choose another key to cross-key` });
        continue;
      }
      chain.push({ ...cross, crossKeyed: true });
      crossKeyId = cross.id;
    }
    const pinning = pinningFor(system, chain);
    if (hasErrors(pinning)) {
      const symbols = chain.map((k) => k.symbol).join(' + ');
      for (const issue of pinning.issues.filter((x) => x.severity === 'error')) problems.push({ field: `doors.${i}.${crossKeyId ? 'crossKeyId' : 'keyId'}`, message: `door ${label} (${symbols}): ${issue.message}` });
      continue;
    }
    planned.push({ doorId: d.doorId, chain, crossKeyId });
  }
  if (problems.length) throw badRequest(`The work order cannot be planned: ${problems[0]!.message}`, problems);
  return planned;
}

/** One planned core per door, tagged from the sequence, linked to its keys and to the work order. */
async function insertCores(trx: Knex, workOrderId: string, systemId: string, planned: PlannedDoor[], from: number): Promise<string[]> {
  const tags: string[] = [];
  for (const [i, p] of planned.entries()) {
    const { nextval } = ((await trx.raw(`select nextval('core_tag_seq')::int as nextval`)).rows as { nextval: number }[])[0]!;
    const tag = `CR-${nextval}`;
    const [core] = await trx('cores').insert({ tag, key_system_id: systemId, door_id: p.doorId, planned_door_id: p.doorId, state: 'planned' }).returning('id');
    await trx('core_keys').insert(p.chain.map((k) => ({ core_id: core.id, key_id: k.id, cross_keyed: k.id === p.crossKeyId })));
    await trx('work_order_cores').insert({ work_order_id: workOrderId, core_id: core.id, position: from + i });
    tags.push(tag);
  }
  return tags;
}

export async function createWorkOrder(db: Knex, sealer: Sealer, input: WorkOrderInput, createdBy: string) {
  const system = await loadSystem(db, sealer, input.keySystemId);
  return db.transaction(async (trx) => {
    if (input.assigneeId) {
      const who = await trx('users').where({ id: input.assigneeId, active: true }).first('role');
      if (!who) throw badRequest('The assignee is not an active user.', [{ field: 'assigneeId', message: 'choose an active user' }]);
    }
    const planned = await planDoors(trx, system, input.doors);
    const [wo] = await trx('work_orders')
      .insert({
        title: input.title,
        purpose: input.purpose,
        key_system_id: system.id,
        assignee_id: input.assigneeId ?? null,
        due_date: input.dueDate ?? null,
        notes: input.notes ?? null,
        status: input.assigneeId ? 'assigned' : 'draft',
        created_by: createdBy,
      })
      .returning(['id', 'number']);
    await insertCores(trx, wo.id, system.id, planned, 0);
    return { id: wo.id as string, number: wo.number as number, cores: planned.length };
  });
}

/** Doors are added or removed only before work starts: a draft or an assigned order. */
async function lockOpen(trx: Knex, id: string) {
  const wo = await trx('work_orders').where({ id }).forUpdate().first('id', 'status', 'key_system_id');
  if (!wo) throw notFound('That work order');
  if (wo.status !== 'draft' && wo.status !== 'assigned') throw conflict(`This work order is ${wo.status}: doors are added or removed only before work starts.`, [{ field: 'status', message: wo.status }]);
  return wo as { id: string; status: string; key_system_id: string };
}

export async function addDoors(db: Knex, sealer: Sealer, id: string, doors: WorkOrderDoor[]): Promise<string[]> {
  const head = await db('work_orders').where({ id }).first('key_system_id');
  if (!head) throw notFound('That work order');
  const system = await loadSystem(db, sealer, head.key_system_id);
  return db.transaction(async (trx) => {
    await lockOpen(trx, id);
    const current = await trx('work_order_cores as x').join('cores as c', 'c.id', 'x.core_id').where('x.work_order_id', id).whereNot('c.state', 'retired').select('c.door_id', 'x.position');
    const planned = await planDoors(trx, system, doors, new Set(current.map((c: { door_id: string }) => c.door_id)));
    const from = Math.max(-1, ...current.map((c: { position: number }) => c.position)) + 1;
    return insertCores(trx, id, system.id, planned, from);
  });
}

/** Takes a door out before work starts: its planned core (never built) is deleted with its links. */
export async function removeCore(db: Knex, id: string, coreId: string): Promise<{ tag: string; doorLabel: string | null }> {
  return db.transaction(async (trx) => {
    await lockOpen(trx, id);
    const core = await trx('work_order_cores as x').join('cores as c', 'c.id', 'x.core_id').leftJoin('doors as d', 'd.id', 'c.door_id').where({ 'x.work_order_id': id, 'x.core_id': coreId }).first('c.id', 'c.tag', 'c.state', 'd.label');
    if (!core) throw notFound('That core in this work order');
    if (core.state !== 'planned' || (await trx('completions').where({ core_id: coreId }).first('id'))) {
      throw conflict(`Core ${core.tag} has work recorded: it stays in the work order.`, [{ field: 'coreId', message: 'work recorded' }]);
    }
    const left = await trx('work_order_cores').where({ work_order_id: id }).whereNot({ core_id: coreId }).count({ n: '*' }).first();
    if (Number((left as { n: number }).n) === 0) throw conflict('A work order keeps at least one door: cancel it instead.', [{ field: 'coreId', message: 'last door' }]);
    await trx('cores').where({ id: coreId }).delete();
    return { tag: core.tag as string, doorLabel: (core.label as string | null) ?? null };
  });
}

export async function updateWorkOrder(db: Knex, id: string, input: WorkOrderUpdate): Promise<{ assignedTo: string | null; released: string[] }> {
  return db.transaction(async (trx) => {
    const current = await trx('work_orders').where({ id }).forUpdate().first();
    if (!current) throw notFound('That work order');
    if (current.status === 'done' || current.status === 'cancelled') throw badRequest(`This work order is ${current.status}; it cannot change.`);
    const patch: Record<string, unknown> = { updated_at: trx.fn.now() };
    let assignedTo: string | null = null;
    if (input.assigneeId !== undefined && input.assigneeId !== current.assignee_id) {
      if (input.assigneeId && !(await trx('users').where({ id: input.assigneeId, active: true }).first('id'))) {
        throw badRequest('The assignee is not an active user.', [{ field: 'assigneeId', message: 'choose an active user' }]);
      }
      patch.assignee_id = input.assigneeId;
      assignedTo = input.assigneeId;
      if (current.status === 'draft' && input.assigneeId) patch.status = 'assigned';
    }
    for (const [k, col] of [['title', 'title'], ['purpose', 'purpose'], ['dueDate', 'due_date'], ['notes', 'notes'], ['status', 'status']] as const) {
      if (input[k] !== undefined) patch[col] = input[k];
    }
    let released: string[] = [];
    if (input.status === 'cancelled') {
      // Cores not built yet are released: retired, so their doors are free for another work order.
      const rows = await trx('cores as c').join('work_order_cores as x', 'x.core_id', 'c.id').where({ 'x.work_order_id': id, 'c.state': 'planned' }).select('c.id', 'c.tag');
      await trx('cores').whereIn('id', rows.map((r: { id: string }) => r.id)).update({ state: 'retired', updated_at: trx.fn.now() });
      released = rows.map((r: { tag: string }) => r.tag);
    }
    await trx('work_orders').where({ id }).update(patch);
    return { assignedTo, released };
  });
}

interface CoreRow {
  id: string;
  tag: string;
  state: string;
  door_id: string | null;
}

function keyCheckPlan(system: LoadedSystem, chain: SystemKey[], pinning: CorePinning): KeyCheckItem[] {
  const ordered = [...chain].sort((a, b) => levelRank(a.level) - levelRank(b.level));
  const plan: KeyCheckItem[] = ordered.map((k) => ({
    role: k.crossKeyed ? 'cross' : k.level === 'change' ? 'change' : 'master',
    symbol: k.symbol,
    level: k.level,
    expect: 'turns',
  }));
  plan.push({ role: 'control', symbol: 'CONTROL', level: null, expect: 'releases' });
  return [...plan, ...mustNotTurnKeys(system, chain, pinning)];
}

/**
 * Keys of the system that must not turn this core, each with why it was chosen: a change
 * key under the same master (the neighbour's door), and, where the system has one, a key
 * of another master (another area), its master key first. The engine's keyOperates decides
 * that the key really must not turn; symbols in natural order so the choice is stable.
 */
export function mustNotTurnKeys(system: LoadedSystem, chain: SystemKey[], pinning: CorePinning): KeyCheckItem[] {
  const inChain = new Set(chain.map((k) => k.id));
  const byId = new Map(system.keys.map((k) => [k.id, k]));
  const change = chain.find((k) => k.level === 'change' && !k.crossKeyed) ?? chain.find((k) => k.level === 'change');
  const ownMaster = chain.find((k) => k.level === 'master') ?? (change?.parentId ? byId.get(change.parentId) : undefined);
  const free = system.keys
    .filter((k) => !inChain.has(k.id) && k.status === 'active' && !keyOperates(pinning, system.profile, k.bitting).plug)
    .sort((a, b) => compareSymbols(a.symbol, b.symbol));
  const masterOf = (k: SystemKey): SystemKey | undefined => (k.level === 'master' ? k : k.parentId ? byId.get(k.parentId) : undefined);
  const out: KeyCheckItem[] = [];
  const sibling = free.find((k) => k.level === 'change' && change && k.parentId === change.parentId);
  const own = ownMaster?.symbol ?? null;
  if (sibling) out.push({ role: 'must-not-turn', symbol: sibling.symbol, level: sibling.level, expect: 'none', why: { relation: 'sibling', ownMaster: own, otherMaster: null } });
  const isOtherArea = (k: SystemKey) => {
    const m = masterOf(k);
    return !!m && m.level === 'master' && m.id !== ownMaster?.id;
  };
  const other = free.find((k) => k.level === 'master' && isOtherArea(k)) ?? free.find((k) => k.level === 'change' && isOtherArea(k));
  if (other) out.push({ role: 'must-not-turn', symbol: other.symbol, level: other.level, expect: 'none', why: { relation: 'other-master', ownMaster: own, otherMaster: masterOf(other)?.symbol ?? null } });
  // A system with neither (one master, one door): still one key that must not turn, when there is any.
  if (!out.length && free[0]) out.push({ role: 'must-not-turn', symbol: free[0].symbol, level: free[0].level, expect: 'none' });
  return out;
}

export async function buildPacket(db: Knex, sealer: Sealer, workOrderId: string): Promise<Packet> {
  const wo = await getWorkOrder(db, workOrderId);
  const system = await loadSystem(db, sealer, wo.keySystemId);
  const cores: CoreRow[] = await db('work_order_cores as x').join('cores as c', 'c.id', 'x.core_id').where('x.work_order_id', workOrderId).orderBy('x.position').select('c.id', 'c.tag', 'c.state', 'c.door_id');
  const links = await db('core_keys').whereIn('core_id', cores.map((c) => c.id)).select('core_id', 'key_id', 'cross_keyed');
  const doorIds = cores.map((c) => c.door_id).filter((d): d is string => !!d);
  const doors = await db('doors as d')
    .whereIn('d.id', doorIds)
    .select('d.id', 'd.label', 'd.site', 'd.building', 'd.floor', 'd.room', 'd.fire_rated as fireRated', db.raw(`(select c.tag from cores c where c.door_id = d.id and c.state = 'installed' limit 1) as "currentCoreTag"`));
  const doorById = new Map(doors.map((d: { id: string }) => [d.id, d]));
  const keyById = new Map(system.keys.map((k) => [k.id, k]));
  const packetCores = cores.map((c) => {
    const chain = links
      .filter((l: { core_id: string }) => l.core_id === c.id)
      .map((l: { key_id: string; cross_keyed: boolean }) => {
        const key = keyById.get(l.key_id)!;
        return l.cross_keyed ? { ...key, crossKeyed: true } : key;
      });
    const pinning = pinningFor(system, chain);
    return { id: c.id, tag: c.tag, state: c.state, door: c.door_id ? (doorById.get(c.door_id) ?? null) : null, pinning, keyCheck: keyCheckPlan(system, chain, pinning) };
  });
  const fetchedAt = new Date();
  return {
    v: 1,
    workOrder: { id: wo.id, number: wo.number, title: wo.title, purpose: wo.purpose, status: wo.status, dueDate: wo.dueDate, notes: wo.notes, hasFireRated: wo.hasFireRated },
    keySystem: { id: system.id, name: system.name },
    profile: system.profile,
    cores: packetCores as Packet['cores'],
    tray: trayFor(system.profile, packetCores.map((c) => c.pinning)),
    fetchedAt: fetchedAt.toISOString(),
    expiresAt: new Date(fetchedAt.getTime() + PACKET_HOURS * 3600_000).toISOString(),
  };
}
