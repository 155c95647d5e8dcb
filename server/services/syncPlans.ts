/**
 * The server's own plan for each core a batch names: its chart (pinned by the engine from the
 * key system, never taken from the tablet), the keys that must turn it and the keys that must
 * not. One key system is opened once per batch.
 */
import type { Knex } from 'knex';
import { keyOperates, type CorePinning, type Profile } from '../../shared/keying';
import type { EvidencePlan } from './completionEvidence';
import { loadSystem, type LoadedSystem } from './keySystems';
import type { Sealer } from './secrets';
import { mustNotTurnKeys, pinningFor } from './workOrders';

export interface CorePlan extends EvidencePlan {
  system: LoadedSystem;
  profile: Profile;
  pinning: CorePinning;
}

export async function loadCorePlans(db: Knex, sealer: Sealer, coreIds: string[]): Promise<Map<string, CorePlan>> {
  const out = new Map<string, CorePlan>();
  if (!coreIds.length) return out;
  const cores = await db('cores').whereIn('id', coreIds).select<{ id: string; key_system_id: string }[]>('id', 'key_system_id');
  const links = await db('core_keys').whereIn('core_id', coreIds).select<{ core_id: string; key_id: string }[]>('core_id', 'key_id');
  const systems = new Map<string, LoadedSystem>();
  for (const id of new Set(cores.map((c) => c.key_system_id))) systems.set(id, await loadSystem(db, sealer, id));
  for (const c of cores) {
    const system = systems.get(c.key_system_id)!;
    const mine = new Set(links.filter((l) => l.core_id === c.id).map((l) => l.key_id));
    const chain = system.keys.filter((k) => mine.has(k.id));
    const pinning = pinningFor(system, chain);
    const outsiders = system.keys.filter((k) => !mine.has(k.id) && !keyOperates(pinning, system.profile, k.bitting).plug);
    // The packet names a must-not-turn key only when an active one exists (workOrders.keyCheckPlan).
    const hasActiveOutsider = outsiders.some((k) => k.status === 'active');
    out.set(c.id, {
      system,
      profile: system.profile,
      pinning,
      turns: chain.map((k) => k.symbol),
      mustNotTurn: hasActiveOutsider ? new Set(outsiders.map((k) => k.symbol)) : null,
      mustNotTurnCount: hasActiveOutsider ? mustNotTurnKeys(system, chain, pinning).length : 0,
    });
  }
  return out;
}
