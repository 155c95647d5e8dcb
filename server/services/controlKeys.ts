/**
 * Control keys as keys of key control: each system's control key has a record (`control_keys`) so
 * its copies are issued, returned, passed on and reported like any key's. The active one's bitting
 * is the system's (`key_systems.control_enc`); a control key replaced after it was lost keeps its
 * own sealed bitting while cores built for it are still installed (`cores.control_key_id`), and is
 * retired once none is. Bittings are opened here for the engine and the cut list only.
 */
import type { Knex } from 'knex';
import type { ControlKey } from '../../shared/schemas/keyControl';
import { naturalCompare } from '../../shared/words';
import { notFound } from '../errors';
import { CONTROL_SYMBOL, controlContext, controlKeyContext } from './keySystems';
import type { Sealer } from './secrets';

export interface StoredControlKey {
  id: string;
  keySystemId: string;
  symbol: string;
  status: ControlKey['status'];
}

export async function findControlKey(db: Knex, id: string): Promise<StoredControlKey | undefined> {
  return db('control_keys').where({ id }).first<StoredControlKey | undefined>('id', 'key_system_id as keySystemId', 'symbol', 'status');
}

/** The bitting of a control key: the system's own for the active one, its sealed copy once replaced. */
export async function controlBitting(db: Knex, sealer: Sealer, id: string): Promise<string> {
  const row = await db('control_keys as c').join('key_systems as s', 's.id', 'c.key_system_id').where('c.id', id).first<{ status: string; bitting_enc: string | null; control_enc: string; systemId: string } | undefined>('c.status', 'c.bitting_enc', 's.control_enc', 's.id as systemId');
  if (!row) throw notFound('That control key');
  return row.status === 'active' || !row.bitting_enc ? sealer.open(row.control_enc, controlContext(row.systemId)) : sealer.open(row.bitting_enc, controlKeyContext(id));
}

export async function listControlKeys(db: Knex, systemId: string): Promise<ControlKey[]> {
  if (!(await db('key_systems').where({ id: systemId }).first('id'))) throw notFound('That key system');
  const rows = await db('control_keys as c')
    .where('c.key_system_id', systemId)
    .select<ControlKey[]>('c.id', 'c.key_system_id as keySystemId', 'c.symbol', 'c.status', db.raw(`(select count(*) from key_issues i where i.control_key_id = c.id and i.status = 'out')::int as "copiesOut"`));
  return rows.sort((a, b) => Number(b.status === 'active') - Number(a.status === 'active') || naturalCompare(a.symbol, b.symbol));
}

/** The next free control key symbol of the system: CK2, CK3, ... */
export async function nextControlSymbol(db: Knex, systemId: string): Promise<string> {
  const used = new Set((await db('control_keys').where({ key_system_id: systemId }).pluck('symbol')) as string[]);
  for (let n = 2; ; n++) if (!used.has(`${CONTROL_SYMBOL}${n}`)) return `${CONTROL_SYMBOL}${n}`;
}
