/**
 * Exposure, door access and holder access, all through the engine's keyExposure (equal to
 * keyOperates on each core's chart) over the cores AS INSTALLED: the core in each door now.
 * Bittings are opened here for the engine only; no answer carries one.
 */
import type { Knex } from 'knex';
import { keyExposure, type ExposureInput } from '../../shared/keying';
import type { DoorAccess, ExposedCore, ExposedHolder, Exposure, HolderAccess } from '../../shared/schemas/keyControlExposure';
import { naturalCompare } from '../../shared/words';
import { notFound } from '../errors';
import { joinHolder } from './keyHolders';
import { controlBitting, findControlKey } from './controlKeys';
import { loadSystem, type LoadedSystem } from './keySystems';
import type { Sealer } from './secrets';

interface InstalledCore {
  id: string;
  tag: string;
  doorId: string | null;
  doorLabel: string | null;
  /** The replaced control key it was built for, or null: the system's control key now. */
  controlKeyId: string | null;
  operating: string[];
}

/** The installed cores of a system (or of one door), each with the keys it is pinned for. */
export async function installedCores(db: Knex, systemId: string, doorId?: string): Promise<InstalledCore[]> {
  const q = db('cores as c').leftJoin('doors as d', 'd.id', 'c.door_id').where({ 'c.key_system_id': systemId, 'c.state': 'installed' });
  if (doorId) q.where('c.door_id', doorId);
  const cores = await q.select<Omit<InstalledCore, 'operating'>[]>('c.id', 'c.tag', 'd.id as doorId', 'd.label as doorLabel', 'c.control_key_id as controlKeyId');
  const links = await db('core_keys').whereIn('core_id', doorId ? cores.map((c) => c.id) : db('cores').where({ key_system_id: systemId, state: 'installed' }).select('id')).select<{ core_id: string; key_id: string }[]>('core_id', 'key_id');
  const byCore = new Map<string, string[]>();
  for (const l of links) {
    const list = byCore.get(l.core_id);
    if (list) list.push(l.key_id);
    else byCore.set(l.core_id, [l.key_id]);
  }
  return cores.map((c) => ({ ...c, operating: byCore.get(c.id) ?? [] }));
}

const howRank = { intended: 0, incidental: 1, control: 2 } as const;

/**
 * The pure part: which of these cores the key turns or removes, sorted for people. Each core is read with
 * the control key it was built for (the system's, or a replaced one's while its cores are still in doors).
 */
export function exposedCores(system: LoadedSystem, cores: InstalledCore[], key: { id?: string; bitting: string }): ExposedCore[] {
  const byControl = new Map<string, number[]>();
  cores.forEach((c, i) => {
    const control = (c.controlKeyId && system.replacedControls[c.controlKeyId]) || system.control;
    const list = byControl.get(control);
    if (list) list.push(i);
    else byControl.set(control, [i]);
  });
  const out: ExposedCore[] = [];
  for (const [control, indexes] of byControl) {
    const input: ExposureInput = { keys: system.keys, cores: indexes.map((i) => cores[i]!), control };
    for (const { core, how } of keyExposure(system.profile, input, key)) {
      const c = cores[indexes[core]!]!;
      out.push({ id: c.id, tag: c.tag, doorId: c.doorId, doorLabel: c.doorLabel, how });
    }
  }
  return out.sort((a, b) => howRank[a.how] - howRank[b.how] || naturalCompare(a.doorLabel ?? a.tag, b.doorLabel ?? b.tag));
}

/** Every holder of a copy of the key (or control key) out, lost or stolen. */
export async function holdersOfKey(db: Knex, keyId: string, column: 'key_id' | 'control_key_id' = 'key_id'): Promise<ExposedHolder[]> {
  return joinHolder(db('key_issues as i'), 'i.holder_id')
    .where(`i.${column}`, keyId)
    .whereIn('i.status', ['out', 'lost', 'stolen'])
    .orderBy('i.copy_number')
    .select('i.id as issueId', 'h.id as holderId', 'h.name', 'd.name as department', 'i.copy_number as copyNumber', 'i.status');
}

function exposureOf(systemId: string, keyId: string | null, keySymbol: string, cores: ExposedCore[], holders: ExposedHolder[]): Exposure {
  const count = (how: ExposedCore['how']) => cores.filter((c) => c.how === how).length;
  return {
    keySystemId: systemId,
    keyId,
    keySymbol,
    cores,
    holders,
    counts: { cores: cores.length, intended: count('intended'), incidental: count('incidental'), control: count('control'), doors: new Set(cores.flatMap((c) => (c.doorId ? [c.doorId] : []))).size, holders: holders.length },
  };
}

/** What a stored key (or a control key) exposes: every installed core it turns or removes, and every holder of a copy. */
export async function keyExposureOf(db: Knex, sealer: Sealer, keyId: string): Promise<Exposure> {
  const row = await db('keys').where({ id: keyId }).first('key_system_id');
  if (!row) return controlKeyExposureOf(db, sealer, keyId);
  const system = await loadSystem(db, sealer, row.key_system_id);
  const key = system.keys.find((k) => k.id === keyId)!;
  const cores = exposedCores(system, await installedCores(db, system.id), key);
  return exposureOf(system.id, key.id, key.symbol, cores, await holdersOfKey(db, keyId));
}

/** The control key removes every core it lines up: on a sound system, every installed core. */
export async function controlExposureOf(db: Knex, sealer: Sealer, systemId: string): Promise<Exposure> {
  const system = await loadSystem(db, sealer, systemId);
  const cores = exposedCores(system, await installedCores(db, systemId), { bitting: system.control });
  return exposureOf(systemId, null, 'control key', cores, []);
}

/**
 * A control key's exposure: every installed core built for it (on a sound system, every core of the system, removed
 * from its housing: `control`), through the engine like any key, and every holder of a copy of it.
 */
export async function controlKeyExposureOf(db: Knex, sealer: Sealer, controlKeyId: string): Promise<Exposure> {
  const control = await findControlKey(db, controlKeyId);
  if (!control) throw notFound('That key');
  const system = await loadSystem(db, sealer, control.keySystemId);
  const cores = exposedCores(system, await installedCores(db, system.id), { bitting: await controlBitting(db, sealer, controlKeyId) });
  return exposureOf(system.id, control.id, control.symbol, cores, await holdersOfKey(db, controlKeyId, 'control_key_id'));
}

/** Copies out of a system's keys and control keys, each with the bitting the engine reads it by (bittings stay here). */
async function copiesOut(db: Knex, sealer: Sealer, system: LoadedSystem, where: Record<string, string>) {
  const rows = await joinHolder(db('key_issues as i'), 'i.holder_id')
    .leftJoin('keys as k', 'k.id', 'i.key_id')
    .leftJoin('control_keys as ck', 'ck.id', 'i.control_key_id')
    .where({ 'i.status': 'out', ...where })
    .whereRaw('coalesce(k.key_system_id, ck.key_system_id) = ?', [system.id])
    .orderBy([{ column: 'keySymbol' }, { column: 'i.copy_number' }])
    .select<{ issueId: string; holderId: string; name: string; department: string; keyId: string; keySymbol: string; copyNumber: number; control: boolean }[]>('i.id as issueId', 'h.id as holderId', 'h.name', 'd.name as department', db.raw('coalesce(i.key_id, i.control_key_id) as "keyId"'), db.raw('coalesce(k.symbol, ck.symbol) as "keySymbol"'), 'i.copy_number as copyNumber', db.raw('(i.control_key_id is not null) as control'));
  const keyOf = new Map<string, { id?: string; bitting: string }>();
  for (const r of rows) {
    if (keyOf.has(r.keyId)) continue;
    keyOf.set(r.keyId, r.control ? { bitting: await controlBitting(db, sealer, r.keyId) } : system.keys.find((k) => k.id === r.keyId)!);
  }
  return rows.map(({ control: _c, ...r }) => ({ ...r, key: keyOf.get(r.keyId)! }));
}

/** Every holder of a copy out whose key turns (or removes) the door's installed core. */
export async function doorAccess(db: Knex, sealer: Sealer, doorId: string): Promise<DoorAccess> {
  const door = await db('doors').where({ id: doorId }).first('id', 'key_system_id');
  if (!door) throw notFound('That door');
  const core = (await db('cores').where({ door_id: doorId, state: 'installed' }).first('key_system_id'));
  if (!core) return { coreId: null, coreTag: null, holders: [] };
  const system = await loadSystem(db, sealer, core.key_system_id);
  const [installed] = await installedCores(db, system.id, doorId);
  const holders: DoorAccess['holders'] = [];
  const howOf = new Map<string, ExposedCore['how'] | null>();
  for (const { key, ...issue } of await copiesOut(db, sealer, system, {})) {
    if (!howOf.has(issue.keyId)) howOf.set(issue.keyId, exposedCores(system, [installed!], key)[0]?.how ?? null);
    const how = howOf.get(issue.keyId);
    if (how) holders.push({ ...issue, how });
  }
  holders.sort((a, b) => howRank[a.how] - howRank[b.how] || naturalCompare(a.name, b.name) || a.copyNumber - b.copyNumber);
  return { coreId: installed!.id, coreTag: installed!.tag, holders };
}

/** Every door the holder's copies out turn or remove, key by key. */
export async function holderAccess(db: Knex, sealer: Sealer, holderId: string): Promise<HolderAccess> {
  if (!(await db('key_holders').where({ id: holderId }).first('id'))) throw notFound('That key holder');
  const systemIds = await db('key_issues as i')
    .leftJoin('keys as k', 'k.id', 'i.key_id')
    .leftJoin('control_keys as ck', 'ck.id', 'i.control_key_id')
    .where({ 'i.holder_id': holderId, 'i.status': 'out' })
    .distinct<{ systemId: string }[]>(db.raw('coalesce(k.key_system_id, ck.key_system_id) as "systemId"'));
  const doors: HolderAccess['doors'] = [];
  for (const { systemId } of systemIds) {
    const system = await loadSystem(db, sealer, systemId);
    const cores = await installedCores(db, systemId);
    for (const { key, ...issue } of await copiesOut(db, sealer, system, { 'i.holder_id': holderId })) {
      for (const c of exposedCores(system, cores, key)) {
        if (c.doorId) doors.push({ doorId: c.doorId, doorLabel: c.doorLabel!, coreId: c.id, coreTag: c.tag, issueId: issue.issueId, keyId: issue.keyId, keySymbol: issue.keySymbol, copyNumber: issue.copyNumber, how: c.how });
      }
    }
  }
  return { doors };
}
