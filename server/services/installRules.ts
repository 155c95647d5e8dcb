/**
 * Where a core may go (reliability.md T4). The planned door; or another door whose assigned key
 * operates the core as pinned (the engine's keyOperates), with the technician's stated reason,
 * kept as a mismatch for the office to review; never a door whose key does not operate it.
 * The removed core must be the one on record in that door (none when it has none), so naming a
 * tag cannot retire a core in someone else's door. An install needs a passed completion: the
 * newest completion of the core at or before the install time passed.
 */
import type { Knex } from 'knex';
import { keyOperates } from '../../shared/keying';
import type { InstallRecord } from '../../shared/schemas/sync';
import type { CorePlan } from './syncPlans';

export type InstallVerdict =
  | { ok: true; plannedDoorId: string | null; mismatch: boolean; removed: { id: string; tag: string } | null }
  | { ok: false; code: 'unprocessable' | 'validation' | 'not-found'; message: string; field?: string };

export async function checkInstall(trx: Knex.Transaction, r: InstallRecord, plan: CorePlan): Promise<InstallVerdict> {
  const core = await trx('cores').where({ id: r.coreId }).first<{ tag: string; state: string; planned_door_id: string | null; key_system_id: string }>('tag', 'state', 'planned_door_id', 'key_system_id');
  if (core.state === 'retired') return { ok: false, code: 'unprocessable', message: `Core ${core.tag} is retired.` };
  const built = await trx('completions').where({ core_id: r.coreId }).where('finished_at', '<=', r.installedAt).orderBy([{ column: 'finished_at', order: 'desc' }, { column: 'received_at', order: 'desc' }]).first<{ result: string } | undefined>('result');
  if (built?.result !== 'passed') {
    return { ok: false, code: 'unprocessable', message: `Core ${core.tag} has no passed key check on record before ${r.installedAt}; a core goes into a door only after every key check passed.` };
  }
  const door = await trx('doors as d').leftJoin('keys as k', 'k.id', 'd.key_id').where('d.id', r.doorId).first<{ label: string; key_id: string | null; key_system_id: string | null; symbol: string | null } | undefined>('d.label', 'd.key_id', 'd.key_system_id', 'k.symbol');
  if (!door) return { ok: false, code: 'not-found', message: 'That door is not on record.' };

  const mismatch = r.doorId !== core.planned_door_id;
  if (mismatch) {
    const planned = core.planned_door_id ? (await trx('doors').where({ id: core.planned_door_id }).first<{ label: string } | undefined>('label'))?.label : undefined;
    const key = door.key_id ? plan.system.keys.find((k) => k.id === door.key_id) : undefined;
    if (!key) return { ok: false, code: 'unprocessable', message: `Door ${door.label} has no key of ${plan.system.name} on record, so core ${core.tag} cannot be checked against it; install it in its planned door${planned ? ` ${planned}` : ''}.` };
    if (!keyOperates(plan.pinning, plan.profile, key.bitting).plug) {
      return { ok: false, code: 'unprocessable', message: `The key of door ${door.label} (${key.symbol}) does not operate core ${core.tag}; it is pinned for door ${planned ?? 'another door'}. Nothing was recorded or retired.` };
    }
    if (!r.mismatchReason?.trim()) {
      return { ok: false, code: 'validation', field: 'mismatchReason', message: `Core ${core.tag} was planned for door ${planned ?? 'another door'}, not ${door.label}: say why it goes into ${door.label} (mismatchReason).` };
    }
  }

  const onRecord = await trx('cores').where({ door_id: r.doorId, state: 'installed' }).whereNot({ id: r.coreId }).orderBy('tag').forUpdate().select<{ id: string; tag: string }[]>('id', 'tag');
  const named = r.removedCoreTag?.trim().toUpperCase() || null;
  if (!onRecord.length && named) {
    return { ok: false, code: 'unprocessable', field: 'removedCoreTag', message: `Door ${door.label} has no core on record, so ${named} cannot be taken out of it; leave the removed core empty. Nothing was recorded or retired.` };
  }
  const removed = named ? onRecord.find((c) => c.tag.toUpperCase() === named) : undefined;
  if (onRecord.length && !removed) {
    return { ok: false, code: 'unprocessable', field: 'removedCoreTag', message: `Door ${door.label} holds core ${onRecord.map((c) => c.tag).join(', ')} on record${named ? `, not ${named}` : ''}: name it as the removed core. Nothing was recorded or retired.` };
  }
  return { ok: true, plannedDoorId: core.planned_door_id, mismatch, removed: removed ?? null };
}
