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
import { loadSystem, type LoadedSystem } from './keySystems';
import type { Sealer } from './secrets';

interface InstalledCore {
  id: string;
  tag: string;
  doorId: string | null;
  doorLabel: string | null;
  operating: string[];
}

/** The installed cores of a system (or of one door), each with the keys it is pinned for. */
export async function installedCores(db: Knex, systemId: string, doorId?: string): Promise<InstalledCore[]> {
  const q = db('cores as c').leftJoin('doors as d', 'd.id', 'c.door_id').where({ 'c.key_system_id': systemId, 'c.state': 'installed' });
  if (doorId) q.where('c.door_id', doorId);
  const cores = await q.select<Omit<InstalledCore, 'operating'>[]>('c.id', 'c.tag', 'd.id as doorId', 'd.label as doorLabel');
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

/** The pure part: which of these cores the key turns or removes, sorted for people. */
export function exposedCores(system: LoadedSystem, cores: InstalledCore[], key: { id?: string; bitting: string }): ExposedCore[] {
  const input: ExposureInput = { keys: system.keys, cores, control: system.control };
  return keyExposure(system.profile, input, key)
    .map(({ core, how }) => {
      const c = cores[core]!;
      return { id: c.id, tag: c.tag, doorId: c.doorId, doorLabel: c.doorLabel, how };
    })
    .sort((a, b) => howRank[a.how] - howRank[b.how] || naturalCompare(a.doorLabel ?? a.tag, b.doorLabel ?? b.tag));
}

export async function holdersOfKey(db: Knex, keyId: string): Promise<ExposedHolder[]> {
  return joinHolder(db('key_issues as i'), 'i.holder_id')
    .where('i.key_id', keyId)
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

/** What a stored key exposes: every installed core it turns or removes, and every holder of a copy. */
export async function keyExposureOf(db: Knex, sealer: Sealer, keyId: string): Promise<Exposure> {
  const row = await db('keys').where({ id: keyId }).first('key_system_id');
  if (!row) throw notFound('That key');
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

/** Every holder of a copy out whose key turns (or removes) the door's installed core. */
export async function doorAccess(db: Knex, sealer: Sealer, doorId: string): Promise<DoorAccess> {
  const door = await db('doors').where({ id: doorId }).first('id', 'key_system_id');
  if (!door) throw notFound('That door');
  const core = (await db('cores').where({ door_id: doorId, state: 'installed' }).first('key_system_id'));
  if (!core) return { coreId: null, coreTag: null, holders: [] };
  const system = await loadSystem(db, sealer, core.key_system_id);
  const [installed] = await installedCores(db, system.id, doorId);
  const issues = await joinHolder(db('key_issues as i'), 'i.holder_id')
    .join('keys as k', 'k.id', 'i.key_id')
    .where({ 'k.key_system_id': system.id, 'i.status': 'out' })
    .select<Omit<DoorAccess['holders'][number], 'how'>[]>('i.id as issueId', 'h.id as holderId', 'h.name', 'd.name as department', 'k.id as keyId', 'k.symbol as keySymbol', 'i.copy_number as copyNumber');
  const holders: DoorAccess['holders'] = [];
  const howOf = new Map<string, ExposedCore['how'] | null>();
  for (const issue of issues) {
    if (!howOf.has(issue.keyId)) {
      const key = system.keys.find((k) => k.id === issue.keyId)!;
      howOf.set(issue.keyId, exposedCores(system, [installed!], key)[0]?.how ?? null);
    }
    const how = howOf.get(issue.keyId);
    if (how) holders.push({ ...issue, how });
  }
  holders.sort((a, b) => howRank[a.how] - howRank[b.how] || naturalCompare(a.name, b.name) || a.copyNumber - b.copyNumber);
  return { coreId: installed!.id, coreTag: installed!.tag, holders };
}

/** Every door the holder's copies out turn or remove, key by key. */
export async function holderAccess(db: Knex, sealer: Sealer, holderId: string): Promise<HolderAccess> {
  if (!(await db('key_holders').where({ id: holderId }).first('id'))) throw notFound('That key holder');
  const issues = await db('key_issues as i').join('keys as k', 'k.id', 'i.key_id').where({ 'i.holder_id': holderId, 'i.status': 'out' }).orderBy(['k.symbol', 'i.copy_number']).select<{ issueId: string; keyId: string; keySymbol: string; systemId: string; copyNumber: number }[]>('i.id as issueId', 'k.id as keyId', 'k.symbol as keySymbol', 'k.key_system_id as systemId', 'i.copy_number as copyNumber');
  const doors: HolderAccess['doors'] = [];
  const systems = new Map<string, { system: LoadedSystem; cores: InstalledCore[] }>();
  for (const issue of issues) {
    let s = systems.get(issue.systemId);
    if (!s) {
      const system = await loadSystem(db, sealer, issue.systemId);
      systems.set(issue.systemId, (s = { system, cores: await installedCores(db, issue.systemId) }));
    }
    const key = s.system.keys.find((k) => k.id === issue.keyId)!;
    for (const c of exposedCores(s.system, s.cores, key)) {
      if (c.doorId) doors.push({ doorId: c.doorId, doorLabel: c.doorLabel!, coreId: c.id, coreTag: c.tag, issueId: issue.issueId, keyId: issue.keyId, keySymbol: issue.keySymbol, copyNumber: issue.copyNumber, how: c.how });
    }
  }
  return { doors };
}
