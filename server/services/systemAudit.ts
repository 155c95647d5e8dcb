/** Builds the engine's audit input from what is stored: keys, their intended cores, the control key. */
import type { Knex } from 'knex';
import type { SystemAuditInput, KeyLevel as EngineLevel, Profile } from '../../shared/keying';
import type { KeyLevel } from '../../shared/schemas/records';
import { compareSymbols } from '../../shared/keyLevels';
import { loadSystem } from './keySystems';
import type { Sealer } from './secrets';

export const levelFor: Record<KeyLevel, EngineLevel> = { ggm: 'great-grand-master', gm: 'grand-master', master: 'master', change: 'change' };

export async function systemAuditInputFor(db: Knex, sealer: Sealer, systemId: string): Promise<{ profile: Profile; audit: SystemAuditInput }> {
  const system = await loadSystem(db, sealer, systemId);
  const cores = await db('cores as c').leftJoin('doors as d', 'd.id', 'c.door_id').where('c.key_system_id', systemId).whereNot('c.state', 'retired').select('c.id', 'c.tag', 'd.label');
  const links = await db('core_keys as ck').join('cores as c', 'c.id', 'ck.core_id').where('c.key_system_id', systemId).whereNot('c.state', 'retired').select('ck.core_id', 'ck.key_id');
  const opens = new Map<string, string[]>();
  const operating = new Map<string, string[]>();
  for (const l of links as { core_id: string; key_id: string }[]) {
    opens.set(l.key_id, [...(opens.get(l.key_id) ?? []), l.core_id]);
    operating.set(l.core_id, [...(operating.get(l.core_id) ?? []), l.key_id]);
  }
  // Keys and cores in natural order (AA2 before AA10): the findings list them in the order given.
  const active = system.keys.filter((k) => k.status !== 'retired').sort((a, b) => compareSymbols(a.symbol, b.symbol));
  const top = active.find((k) => k.level === 'ggm') ?? active.find((k) => k.level === 'gm') ?? active.find((k) => k.level === 'master');
  return {
    profile: system.profile,
    audit: {
      control: system.control,
      ...(top ? { topMaster: top.id } : {}),
      keys: active.map((k) => ({ id: k.id, symbol: k.symbol, bitting: k.bitting, level: levelFor[k.level], opens: opens.get(k.id) ?? [] })),
      cores: (cores as { id: string; tag: string; label: string | null }[]).sort((a, b) => compareSymbols(a.tag, b.tag)).map((c) => ({ id: c.id, label: c.label ? `${c.tag} (${c.label})` : c.tag, operating: operating.get(c.id) ?? [] })),
    },
  };
}
