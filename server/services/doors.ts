/** Doors (openings): where cores go. A door's history comes from the installs table. */
import type { Knex } from 'knex';
import type { DoorHistoryEntry } from '../../shared/schemas/doors';
import { isoOrNull } from './dates';
import type { Door, DoorInput, DoorUpdate } from '../../shared/schemas/records';
import { naturalCompare } from '../../shared/words';
import { badRequest, conflict, notFound } from '../errors';
import { likeText } from './likeText';

export interface DoorFilter {
  q?: string | undefined;
  building?: string | undefined;
  fireRated?: boolean | undefined;
  keySystemId?: string | undefined;
  /** Retired doors are left out unless asked for: 'only' or 'all'. */
  retired?: 'only' | 'all' | undefined;
}

export function doorQuery(db: Knex) {
  return db('doors as d')
    .leftJoin('keys as k', 'k.id', 'd.key_id')
    .select(
      'd.id',
      'd.site',
      'd.building',
      'd.floor',
      'd.room',
      'd.label',
      'd.fire_rated as fireRated',
      'd.key_system_id as keySystemId',
      'd.key_id as keyId',
      'k.symbol as keySymbol',
      'd.notes',
      'd.retired_at as retiredAt',
      db.raw(`(select c.tag from cores c where c.door_id = d.id and c.state = 'installed' order by c.updated_at desc limit 1) as "currentCoreTag"`),
    );
}

export async function listDoors(db: Knex, f: DoorFilter): Promise<Door[]> {
  const q = doorQuery(db);
  if (f.q) {
    const like = `%${likeText(f.q)}%`;
    q.where((w) => {
      w.whereILike('d.label', like).orWhereILike('d.room', like).orWhereILike('d.building', like);
    });
  }
  if (f.building) q.where('d.building', f.building);
  if (f.fireRated !== undefined) q.where('d.fire_rated', f.fireRated);
  if (f.keySystemId) q.where('d.key_system_id', f.keySystemId);
  if (f.retired === 'only') q.whereNotNull('d.retired_at');
  else if (f.retired !== 'all') q.whereNull('d.retired_at');
  const rows = (await q) as Door[];
  // Building, then label in natural order (BL-2 before BL-10), as people read them.
  return rows.sort((a, b) => naturalCompare(a.building, b.building) || naturalCompare(a.label, b.label)).map(isoRetired);
}

const isoRetired = <T extends { retiredAt: unknown }>(d: T): T => ({ ...d, retiredAt: d.retiredAt ? new Date(d.retiredAt as string).toISOString() : null });

export async function getDoor(db: Knex, id: string): Promise<Door> {
  const door = await doorQuery(db).where('d.id', id).first();
  if (!door) throw notFound('That door');
  return isoRetired(door);
}

/** A door's key must be in the door's key system; a key given alone brings its system. */
async function checkKey(trx: Knex, input: Partial<DoorInput>, currentSystem: string | null = null): Promise<Partial<DoorInput>> {
  if (!input.keyId) return input;
  const key = await trx('keys').where({ id: input.keyId }).first('key_system_id', 'level');
  if (!key) throw badRequest('The key for this door does not exist.', [{ field: 'keyId', message: 'unknown key' }]);
  const system = input.keySystemId !== undefined ? input.keySystemId : currentSystem;
  if (system && key.key_system_id !== system) throw badRequest("The key is not in the door's key system.", [{ field: 'keyId', message: 'not in this key system' }]);
  return { ...input, keySystemId: key.key_system_id };
}

function row(input: Partial<DoorInput>) {
  const out: Record<string, unknown> = {};
  if (input.site !== undefined) out.site = input.site;
  if (input.building !== undefined) out.building = input.building;
  if (input.floor !== undefined) out.floor = input.floor;
  if (input.room !== undefined) out.room = input.room;
  if (input.label !== undefined) out.label = input.label;
  if (input.fireRated !== undefined) out.fire_rated = input.fireRated;
  if (input.keySystemId !== undefined) out.key_system_id = input.keySystemId;
  if (input.keyId !== undefined) out.key_id = input.keyId;
  if (input.notes !== undefined) out.notes = input.notes;
  return out;
}

export async function createDoors(db: Knex, inputs: DoorInput[]): Promise<string[]> {
  return db.transaction(async (trx) => {
    const labels = inputs.map((d) => d.label.toLowerCase());
    const dupInBatch = labels.find((l, i) => labels.indexOf(l) !== i);
    if (dupInBatch) throw conflict(`The label "${dupInBatch}" appears twice.`);
    const taken = await trx('doors').whereRaw('lower(label) = any(?)', [labels]).pluck('label');
    if (taken.length) throw conflict(`A door labelled "${taken[0]}" exists already.`, [{ field: 'label', message: 'already used' }]);
    const checked: Partial<DoorInput>[] = [];
    for (const d of inputs) checked.push(await checkKey(trx, d));
    const rows = await trx('doors').insert(checked.map(row)).returning('id');
    return rows.map((r: { id: string }) => r.id);
  });
}

/** What a retire did besides the door: the core that was in it, retired with it (the door is gone, so is its core). */
export interface DoorChange {
  retiredCoreTag: string | null;
}

export async function updateDoor(db: Knex, id: string, input: DoorUpdate): Promise<DoorChange> {
  return db.transaction(async (trx) => {
    const current = await trx('doors').where({ id }).forUpdate().first('id', 'key_system_id', 'retired_at');
    if (!current) throw notFound('That door');
    const { retired, ...fields } = input;
    let retiredCoreTag: string | null = null;
    if (retired === true && !current.retired_at) {
      // A core still to be built for this door belongs to an open work order: take the door out of it first.
      const planned = await trx('cores as c')
        .join('work_order_cores as x', 'x.core_id', 'c.id')
        .join('work_orders as w', 'w.id', 'x.work_order_id')
        .where('c.door_id', id)
        .whereIn('c.state', ['planned', 'loaded', 'checked', 'capped'])
        .whereNotIn('w.status', ['done', 'cancelled'])
        .first('c.tag', 'w.number');
      if (planned) throw conflict(`Core ${planned.tag} is planned for this door in work order #${planned.number}: remove the door from that work order or cancel it first.`, [{ field: 'retired', message: 'open work order' }]);
      const installed = await trx('cores').where({ door_id: id, state: 'installed' }).first('id', 'tag');
      if (installed) {
        await trx('cores').where({ id: installed.id }).update({ state: 'retired', updated_at: trx.fn.now() });
        retiredCoreTag = installed.tag;
      }
      await trx('doors').where({ id }).update({ retired_at: trx.fn.now() });
    } else if (retired === false) {
      await trx('doors').where({ id }).update({ retired_at: null });
    }
    if (fields.label && (await trx('doors').whereRaw('lower(label) = ?', [fields.label.toLowerCase()]).whereNot({ id }).first('id'))) {
      throw conflict(`A door labelled "${fields.label}" exists already.`, [{ field: 'label', message: 'already used' }]);
    }
    const checked = await checkKey(trx, fields, current.key_system_id);
    await trx('doors').where({ id }).update({ ...row(checked), updated_at: trx.fn.now() });
    return { retiredCoreTag };
  });
}

/** Every core the door has had: from installs, newest first, with who built and installed it. */
export async function doorHistory(db: Knex, id: string): Promise<DoorHistoryEntry[]> {
  await getDoor(db, id);
  const rows = await db('installs as i')
    .join('cores as c', 'c.id', 'i.core_id')
    .join('users as u', 'u.id', 'i.installed_by')
    .where('i.door_id', id)
    .orderBy('i.installed_at', 'desc')
    .select(
      'i.id',
      'c.id as coreId',
      'c.tag as coreTag',
      'c.state as coreState',
      'i.installed_at as installedAt',
      'u.name as installedBy',
      'i.removed_core_tag as removedCoreTag',
      'i.notes',
      'i.door_mismatch as doorMismatch',
      'i.mismatch_reason as mismatchReason',
      'i.reviewed_at as mismatchReviewedAt',
      db.raw(`(select pd.label from doors pd where pd.id = i.planned_door_id) as "plannedDoorLabel"`),
      db.raw(`(select u2.name from completions cp join users u2 on u2.id = cp.technician_id where cp.core_id = c.id and cp.result = 'passed' order by cp.finished_at desc limit 1) as "builtBy"`),
      db.raw(`(select cp.finished_at from completions cp where cp.core_id = c.id and cp.result = 'passed' order by cp.finished_at desc limit 1) as "builtAt"`),
    );
  return rows.map((r) => ({ ...r, installedAt: isoOrNull(r.installedAt)!, mismatchReviewedAt: isoOrNull(r.mismatchReviewedAt), builtAt: isoOrNull(r.builtAt) }));
}
