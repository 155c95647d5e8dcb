/**
 * Which cores and doors a key operates, through the engine's keyOperates over every core of the
 * system that is planned, being built or installed. A core the key is pinned for is intended;
 * any other core it turns is incidental (an openings-count key). No bitting leaves this module.
 */
import type { Knex } from 'knex';
import { keyOperates } from '../../shared/keying';
import { naturalCompare } from '../../shared/words';
import type { KeyOperatesRow } from '../../shared/schemas/records';
import { notFound } from '../errors';
import { loadSystem } from './keySystems';
import type { Sealer } from './secrets';
import { pinningFor } from './workOrders';

export async function coresOperatedBy(db: Knex, sealer: Sealer, systemId: string, keyId: string): Promise<KeyOperatesRow[]> {
  const system = await loadSystem(db, sealer, systemId);
  const key = system.keys.find((k) => k.id === keyId);
  if (!key) throw notFound('That key');
  const cores: { id: string; tag: string; state: string; doorId: string | null; doorLabel: string | null }[] = await db('cores as c')
    .leftJoin('doors as d', 'd.id', 'c.door_id')
    .where('c.key_system_id', systemId)
    .whereNot('c.state', 'retired')
    .select('c.id', 'c.tag', 'c.state', 'd.id as doorId', 'd.label as doorLabel');
  const links: { core_id: string; key_id: string; cross_keyed: boolean }[] = await db('core_keys as ck').join('cores as c', 'c.id', 'ck.core_id').where('c.key_system_id', systemId).whereNot('c.state', 'retired').select('ck.core_id', 'ck.key_id', 'ck.cross_keyed');
  const byId = new Map(system.keys.map((k) => [k.id, k]));
  const chains = new Map<string, typeof system.keys>();
  for (const l of links) {
    const k = byId.get(l.key_id);
    if (k) chains.set(l.core_id, [...(chains.get(l.core_id) ?? []), l.cross_keyed ? { ...k, crossKeyed: true } : k]);
  }
  const out: KeyOperatesRow[] = [];
  for (const c of cores) {
    const chain = chains.get(c.id) ?? [];
    const intended = chain.some((k) => k.id === keyId);
    if (!chain.length) continue;
    if (intended || keyOperates(pinningFor(system, chain), system.profile, key.bitting).plug) {
      out.push({ coreId: c.id, tag: c.tag, state: c.state as KeyOperatesRow['state'], doorId: c.doorId, doorLabel: c.doorLabel, intended });
    }
  }
  return out.sort((a, b) => Number(b.intended) - Number(a.intended) || naturalCompare(a.doorLabel ?? a.tag, b.doorLabel ?? b.tag));
}
