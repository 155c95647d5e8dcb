/**
 * Key systems and their keys. Bittings are sealed at rest (services/secrets.ts) and come
 * out only through `loadSystem` (for the engine) or an explicit, audited reveal.
 */
import { randomUUID } from 'node:crypto';
import type { Knex } from 'knex';
import type { KeyReplacement } from '../../shared/schemas/keySystems';
import type { Key, KeySystem } from '../../shared/schemas/records';
import { placementChecker, readBitting, type PlacementProblem, type PlacementSystem, type Profile } from '../../shared/keying';
import type { KeyInput, KeyLevel, KeyReplace, KeySystemCreate, KeySystemUpdate, KeyStatus, KeyUpdate } from '../../shared/schemas/records';
import { naturalCompare } from '../../shared/words';
import { badRequest, conflict, notFound } from '../errors';
import type { Sealer } from './secrets';
import { getProfile } from './profiles';

export const controlContext = (systemId: string) => `key-system-control:${systemId}`;
export const keyContext = (keyId: string) => `key:${keyId}`;
/** A replaced control key's own sealed bitting (services/controlKeys.ts). */
export const controlKeyContext = (id: string) => `control-key:${id}`;
/** The symbol a system's first control key is stamped with; later ones are CK2, CK3, ... */
export const CONTROL_SYMBOL = 'CK';

export interface SystemKey {
  id: string;
  symbol: string;
  level: KeyLevel;
  parentId: string | null;
  status: KeyStatus;
  crossKeyed: boolean;
  notes: string | null;
  bitting: string;
}

export interface LoadedSystem {
  id: string;
  name: string;
  profile: Profile;
  control: string;
  /** Bittings of control keys replaced after a loss, by id, while cores built for them are installed (`cores.control_key_id`). */
  replacedControls: Record<string, string>;
  keys: SystemKey[];
}

interface KeyRow {
  id: string;
  symbol: string;
  level: KeyLevel;
  parent_id: string | null;
  status: KeyStatus;
  cross_keyed: boolean;
  notes: string | null;
}

/** A stored key's row as the API names it, without its bitting. */
const keyOf = (k: KeyRow): Omit<SystemKey, 'bitting'> => ({ id: k.id, symbol: k.symbol, level: k.level, parentId: k.parent_id, status: k.status, crossKeyed: k.cross_keyed, notes: k.notes });

/** Checks a bitting against the profile; a 400 naming the field when it does not fit. */
export function checkBitting(profile: Profile, bitting: string, field: string): string {
  const reading = readBitting(profile, bitting);
  if (!reading.ok) throw badRequest(`${field}: ${reading.message}`, [{ field, message: reading.message }]);
  return bitting.trim();
}

/**
 * The system's top master: the first active great-grand master, else grand master, else
 * master (the audit takes the same one). Every key keeps its parity.
 */
export function topMasterOf(keys: readonly SystemKey[]): SystemKey | undefined {
  const active = keys.filter((k) => k.status !== 'retired');
  return active.find((k) => k.level === 'ggm') ?? active.find((k) => k.level === 'gm') ?? active.find((k) => k.level === 'master');
}

/** What checkKeyPlacement needs of a stored system (retired keys too: their bittings are cut). */
export function placementSystemOf(system: Pick<LoadedSystem, 'control' | 'keys'>): PlacementSystem {
  const top = topMasterOf(system.keys);
  return {
    control: system.control,
    keys: system.keys.map((k) => ({ id: k.id, symbol: k.symbol, bitting: k.bitting, parentId: k.parentId })),
    ...(top ? { topMasterId: top.id } : {}),
  };
}

/** A 400 naming the field and, in the message, the position and the rule. */
export function placementRefused(problems: PlacementProblem[], where = '', field?: string): never {
  const first = problems[0]!;
  const more = problems.length > 1 ? ` (${problems.length - 1} more problem${problems.length === 2 ? '' : 's'} with this key)` : '';
  // One detail per field (the first problem for it), so a form shows one message per field.
  const details = new Map<string, string>();
  for (const p of problems) if (!details.has(field ?? p.field)) details.set(field ?? p.field, p.message);
  throw badRequest(`${where}${first.message}${more}`, [...details].map(([f, message]) => ({ field: f, message })));
}

export async function loadSystem(db: Knex, sealer: Sealer, systemId: string): Promise<LoadedSystem> {
  const row = await db('key_systems').where({ id: systemId }).first();
  if (!row) throw notFound('That key system');
  const profile = await getProfile(db, row.profile_id);
  const keys = await db('keys').where({ key_system_id: systemId }).orderBy([{ column: 'level' }, { column: 'symbol' }]);
  const replaced = await db('control_keys').where({ key_system_id: systemId, status: 'replaced' }).select<{ id: string; bitting_enc: string }[]>('id', 'bitting_enc');
  return {
    id: row.id,
    name: row.name,
    profile,
    control: sealer.open(row.control_enc, controlContext(row.id)),
    replacedControls: Object.fromEntries(replaced.map((r) => [r.id, sealer.open(r.bitting_enc, controlKeyContext(r.id))])),
    keys: keys.map((k) => ({ ...keyOf(k), bitting: sealer.open(k.bitting_enc, keyContext(k.id)) })),
  };
}

export async function listSystems(db: Knex, id?: string): Promise<KeySystem[]> {
  const q = db('key_systems as s');
  if (id) q.where('s.id', id);
  const rows = await q
    .select('s.id', 's.name', 's.profile_id as profileId', 's.notes', 's.created_at as createdAt', 's.updated_at as updatedAt')
    .select(db.raw('(select count(*) from keys k where k.key_system_id = s.id)::int as "keyCount"'))
    .select(db.raw('(select count(*) from cores c where c.key_system_id = s.id)::int as "coreCount"'))
    .orderBy('s.name');
  return rows.map((r) => ({ ...r, createdAt: new Date(r.createdAt).toISOString(), updatedAt: new Date(r.updatedAt).toISOString() }));
}

export async function getSystem(db: Knex, id: string): Promise<KeySystem> {
  const [row] = await listSystems(db, id);
  if (!row) throw notFound('That key system');
  return row;
}

/** The system and, when given, its top master, in one transaction; the key goes through addKeys like any key entered by hand. */
export async function createSystem(db: Knex, sealer: Sealer, input: KeySystemCreate): Promise<string> {
  const profile = await getProfile(db, input.profileId);
  const control = checkBitting(profile, input.control, 'control');
  if (input.topMaster) checkBitting(profile, input.topMaster.bitting, 'topMaster.bitting');
  if (await db('key_systems').where({ name: input.name }).first('id')) throw conflict(`A key system named "${input.name}" exists already.`, [{ field: 'name', message: 'already used' }]);
  const id = randomUUID();
  await db.transaction(async (trx) => {
    await trx('key_systems').insert({ id, name: input.name, profile_id: profile.id, control_enc: sealer.seal(control, controlContext(id)), notes: input.notes ?? null });
    // Its control key on record, so copies of it can be issued and tracked like any key's.
    await trx('control_keys').insert({ key_system_id: id, symbol: CONTROL_SYMBOL });
    if (input.topMaster) await addKeys(trx, sealer, id, [{ ...input.topMaster, parentId: null, status: 'active', crossKeyed: false }]);
  });
  return id;
}

export async function updateSystem(db: Knex, sealer: Sealer, id: string, input: KeySystemUpdate): Promise<void> {
  const current = await db('key_systems').where({ id }).first();
  if (!current) throw notFound('That key system');
  if (input.profileId && input.profileId !== current.profile_id && (await db('keys').where({ key_system_id: id }).first('id'))) {
    throw conflict('The profile of a key system with keys cannot change; its bittings were made for this one.');
  }
  const profile = await getProfile(db, input.profileId ?? current.profile_id);
  const patch: Record<string, unknown> = { updated_at: db.fn.now() };
  if (input.name !== undefined) patch.name = input.name;
  if (input.notes !== undefined) patch.notes = input.notes;
  if (input.profileId !== undefined) patch.profile_id = profile.id;
  if (input.control !== undefined) {
    // Copies of the control key are stamped with its symbol: a new bitting under the same symbol would leave them unaccounted for.
    const out = await db('key_issues as i').join('control_keys as c', 'c.id', 'i.control_key_id').where({ 'c.key_system_id': id, 'c.status': 'active', 'i.status': 'out' }).first<{ symbol: string } | undefined>('c.symbol');
    if (out) throw conflict(`Copies of control key ${out.symbol} are out: take them back first, or report one lost and make its rekey, which puts a new control key in place.`, [{ field: 'control', message: 'control key copies out' }]);
    patch.control_enc = sealer.seal(checkBitting(profile, input.control, 'control'), controlContext(id));
  }
  await db('key_systems').where({ id }).update(patch);
}

/** Keys without their bittings, unless `reveal` (the caller audits it). */
export async function listKeys(db: Knex, sealer: Sealer, systemId: string, reveal: boolean): Promise<Key[]> {
  if (!(await db('key_systems').where({ id: systemId }).first('id'))) throw notFound('That key system');
  const rows = await db('keys').where({ key_system_id: systemId }).orderBy('symbol');
  return rows.map((k) => ({ ...keyOf(k), keySystemId: k.key_system_id, ...(reveal ? { bitting: sealer.open(k.bitting_enc, keyContext(k.id)) } : {}) }));
}

async function checkParent(trx: Knex, systemId: string, parentId: string | null | undefined, selfId?: string): Promise<void> {
  if (!parentId) return;
  if (parentId === selfId) throw badRequest('A key cannot be its own parent.', [{ field: 'parentId', message: 'choose another key' }]);
  const parent = await trx('keys').where({ id: parentId, key_system_id: systemId }).first('id', 'level');
  if (!parent) throw badRequest('The parent key is not in this key system.', [{ field: 'parentId', message: 'not in this key system' }]);
  if (parent.level === 'change') throw badRequest('A change key cannot be a parent; choose a master.', [{ field: 'parentId', message: 'choose a master key' }]);
}

/** Adds keys in one transaction: all or none. Rows refer to parents by id or, for rows in the same batch, by symbol. */
export async function addKeys(db: Knex, sealer: Sealer, systemId: string, inputs: (KeyInput & { parentSymbol?: string | null })[]): Promise<string[]> {
  const system = await loadSystem(db, sealer, systemId);
  return db.transaction(async (trx) => {
    const bySymbol = new Map(system.keys.map((k) => [k.symbol.toUpperCase(), k.id]));
    const placed = { control: system.control, keys: [...system.keys] };
    const ids: string[] = [];
    for (const [i, input] of inputs.entries()) {
      const where = inputs.length > 1 ? `row ${i + 1}: ` : '';
      const bittingField = inputs.length > 1 ? `${i}.bitting` : 'bitting';
      const bitting = checkBitting(system.profile, input.bitting, bittingField);
      const symbol = input.symbol.toUpperCase();
      if (bySymbol.has(symbol)) throw conflict(`${where}the symbol ${symbol} is used already in this key system.`, [{ field: 'symbol', message: 'already used' }]);
      const parentId = input.parentId ?? (input.parentSymbol ? bySymbol.get(input.parentSymbol.toUpperCase()) : null) ?? null;
      if (input.parentSymbol && !parentId) throw badRequest(`${where}no key ${input.parentSymbol} to hang ${symbol} under.`, [{ field: 'parentSymbol', message: 'unknown symbol' }]);
      await checkParent(trx, systemId, parentId);
      const id = randomUUID();
      // The hierarchy rules, against the system as it stands with the rows before this one.
      const problems = placementChecker(system.profile, placementSystemOf(placed))({ bitting, parentId });
      if (problems.length > 0) placementRefused(problems, where, bittingField);
      placed.keys.push({ id, symbol, level: input.level, parentId, status: input.status ?? 'active', crossKeyed: false, notes: null, bitting });
      await trx('keys').insert({
        id,
        key_system_id: systemId,
        symbol,
        level: input.level,
        parent_id: parentId,
        bitting_enc: sealer.seal(bitting, keyContext(id)),
        status: input.status ?? 'active',
        cross_keyed: input.crossKeyed ?? false,
        notes: input.notes ?? null,
      });
      bySymbol.set(symbol, id);
      ids.push(id);
    }
    await trx('key_systems').where({ id: systemId }).update({ updated_at: trx.fn.now() });
    return ids;
  });
}

/**
 * A new key in the place of a lost or worn-out one: same level and master, through addKeys (the
 * hand-entry path and its hierarchy rules). The old key is marked lost or retired and the doors
 * that took it take the new one; their cores still open to the old key until they are rekeyed.
 */
export async function replaceKey(db: Knex, sealer: Sealer, systemId: string, keyId: string, input: KeyReplace): Promise<KeyReplacement> {
  const system = await loadSystem(db, sealer, systemId);
  const old = system.keys.find((k) => k.id === keyId);
  if (!old) throw notFound('That key');
  if (old.status !== 'active') throw conflict(`Key ${old.symbol} is ${old.status} already; replace an active key.`, [{ field: 'keyId', message: old.status }]);
  if (system.keys.some((k) => k.parentId === keyId && k.status === 'active')) {
    throw conflict(`Keys hang under ${old.symbol}: their bittings come from it. Replace or move them first.`, [{ field: 'keyId', message: 'has keys under it' }]);
  }
  return db.transaction(async (trx) => {
    const [id] = await addKeys(trx, sealer, systemId, [{ symbol: input.symbol, level: old.level, parentId: old.parentId, bitting: input.bitting, status: 'active', crossKeyed: false, notes: `Replaces ${old.symbol}` }]);
    await trx('keys').where({ id: keyId }).update({ status: input.oldStatus, updated_at: trx.fn.now() });
    const doors = await trx('doors').where({ key_id: keyId }).update({ key_id: id, updated_at: trx.fn.now() }).returning<{ label: string }[]>('label');
    const cores = (await trx('core_keys as ck').join('cores as c', 'c.id', 'ck.core_id').where('ck.key_id', keyId).whereNot('c.state', 'retired').pluck('c.tag')) as string[];
    return { id: id!, symbol: input.symbol.toUpperCase(), doors: doors.map((d) => d.label).sort(naturalCompare), coresToRekey: cores.sort(naturalCompare) };
  });
}

export async function updateKey(db: Knex, sealer: Sealer, systemId: string, keyId: string, input: KeyUpdate): Promise<void> {
  const system = await loadSystem(db, sealer, systemId);
  const key = system.keys.find((k) => k.id === keyId);
  if (!key) throw notFound('That key');
  await db.transaction(async (trx) => {
    const patch: Record<string, unknown> = { updated_at: trx.fn.now() };
    if (input.symbol !== undefined) {
      const symbol = input.symbol.toUpperCase();
      if (system.keys.some((k) => k.id !== keyId && k.symbol.toUpperCase() === symbol)) throw conflict(`The symbol ${symbol} is used already.`, [{ field: 'symbol', message: 'already used' }]);
      patch.symbol = symbol;
    }
    if (input.status !== undefined) patch.status = input.status;
    if (input.notes !== undefined) patch.notes = input.notes;
    if (input.parentId !== undefined) {
      await checkParent(trx, systemId, input.parentId, keyId);
      patch.parent_id = input.parentId;
    }
    if (input.bitting !== undefined || input.parentId !== undefined) {
      const bitting = input.bitting === undefined ? key.bitting : checkBitting(system.profile, input.bitting, 'bitting');
      const parentId = input.parentId === undefined ? key.parentId : input.parentId;
      const changed = { ...key, bitting, parentId };
      const after = { control: system.control, keys: system.keys.map((k) => (k.id === keyId ? changed : k)) };
      const check = placementChecker(system.profile, placementSystemOf(after));
      const problems = check({ id: keyId, bitting, parentId });
      if (problems.length > 0) placementRefused(problems, '', input.bitting === undefined ? 'parentId' : 'bitting');
      // Its own keys must still keep its cuts where it holds them constant.
      for (const child of after.keys.filter((k) => k.parentId === keyId)) {
        const childProblems = check({ id: child.id, bitting: child.bitting, parentId: keyId });
        if (childProblems.length > 0) placementRefused(childProblems, `Key ${child.symbol} hangs under this key and would break the hierarchy: `, input.bitting === undefined ? 'parentId' : 'bitting');
      }
    }
    if (input.bitting !== undefined) {
      const bitting = checkBitting(system.profile, input.bitting, 'bitting');
      if (await trx('core_keys as ck').join('cores as c', 'c.id', 'ck.core_id').where('ck.key_id', keyId).whereNot('c.state', 'retired').first('c.id')) {
        throw conflict('Cores are pinned for this key: retire them or plan a rekey before changing its bitting.');
      }
      patch.bitting_enc = sealer.seal(bitting, keyContext(keyId));
    }
    await trx('keys').where({ id: keyId }).update(patch);
  });
}

/** The key and every master above it: what a core for this change key must accept. */
export function chainOf(keys: SystemKey[], keyId: string): SystemKey[] {
  const byId = new Map(keys.map((k) => [k.id, k]));
  const chain: SystemKey[] = [];
  let at = byId.get(keyId);
  while (at && !chain.includes(at)) {
    chain.push(at);
    at = at.parentId ? byId.get(at.parentId) : undefined;
  }
  return chain;
}
