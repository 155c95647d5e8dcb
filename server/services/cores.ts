/** Cores as the office lists them: door, state and the symbols of the keys that operate each. */
import type { Knex } from 'knex';
import type { Core, CoreUpdate } from '../../shared/schemas/records';
import { isoOrNull } from './dates';
import { notFound } from '../errors';

export interface CoreFilter {
  keySystemId?: string | undefined;
  doorId?: string | undefined;
  state?: string | undefined;
  tag?: string | undefined;
}

function coreQuery(db: Knex) {
  return db('cores as c')
    .leftJoin('doors as d', 'd.id', 'c.door_id')
    .select(
      'c.id',
      'c.tag',
      'c.key_system_id as keySystemId',
      'c.door_id as doorId',
      'd.label as doorLabel',
      'c.state',
      'c.updated_at as updatedAt',
      db.raw(`coalesce((select array_agg(k.symbol order by k.level desc) from core_keys ck join keys k on k.id = ck.key_id where ck.core_id = c.id), '{}') as "operatingSymbols"`),
    );
}

const answered = (row: Core): Core => ({ ...row, updatedAt: isoOrNull(row.updatedAt)! });

/** At most 2,000 cores, by tag. */
export async function listCores(db: Knex, f: CoreFilter): Promise<Core[]> {
  const q = coreQuery(db).orderBy('c.tag').limit(2000);
  if (f.keySystemId) q.where('c.key_system_id', f.keySystemId);
  if (f.doorId) q.where('c.door_id', f.doorId);
  if (f.state) q.where('c.state', f.state);
  if (f.tag) q.where('c.tag', f.tag.toUpperCase());
  return (await q).map(answered);
}

export async function getCore(db: Knex, id: string): Promise<Core> {
  const core = await coreQuery(db).where('c.id', id).first();
  if (!core) throw notFound('That core');
  return answered(core);
}

/** Moves a core to another door (or none) or retires it; 404 when there is no such core. */
export async function updateCore(db: Knex, id: string, input: CoreUpdate): Promise<void> {
  const patch: Record<string, unknown> = { updated_at: db.fn.now() };
  if (input.doorId !== undefined) patch.door_id = input.doorId;
  if (input.state) patch.state = input.state;
  const n = await db('cores').where({ id }).update(patch);
  if (!n) throw notFound('That core');
}
