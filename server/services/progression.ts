/**
 * A preview of change keys under a master, by total position progression or rotating constant;
 * nothing is saved. Every key passes the engine's hierarchy rules, and the system audit runs on
 * the keys proposed: one that would raise an audit error (for example, it would turn cores it is
 * not meant to) is held back and listed with why.
 */
import type { Knex } from 'knex';
import type { z } from 'zod';
import { auditSystem, KeyingError, progressKeys, type SystemAuditFinding } from '../../shared/keying';
import type { HeldKey, ProgressedKey, ProgressionInput } from '../../shared/schemas/records';
import { badRequest } from '../errors';
import { loadSystem, placementSystemOf, type LoadedSystem, type SystemKey } from './keySystems';
import type { Sealer } from './secrets';
import { systemAuditInputFor } from './systemAudit';

type Progression = z.output<typeof ProgressionInput>;

function progressed(system: LoadedSystem, parent: SystemKey, input: Progression): string[] {
  try {
    // Twice the limit, so keys the audit holds back can be replaced.
    return progressKeys(system.profile, {
      topMaster: parent.bitting, progress: input.progress, method: input.method, constants: input.constants,
      limit: Math.min(2 * input.limit, 10_000), placement: { system: placementSystemOf(system), parentId: parent.id },
    });
  } catch (err) {
    if (err instanceof KeyingError) throw badRequest(err.message, [{ field: err.code === 'progress-constants' ? 'constants' : 'progress', message: err.message }]);
    throw err;
  }
}

/** The audit's errors for each proposed key, by its place in the list. */
async function auditErrors(db: Knex, sealer: Sealer, systemId: string, bittings: string[]): Promise<Map<number, SystemAuditFinding[]>> {
  const { profile, audit: current } = await systemAuditInputFor(db, sealer, systemId);
  const fresh = bittings.map((bitting, i) => ({ id: `proposed:${i}`, symbol: `(new ${i + 1})`, bitting, level: 'change' as const, opens: [] as string[] }));
  const reasons = new Map<number, SystemAuditFinding[]>();
  for (const f of auditSystem(profile, { ...current, keys: [...current.keys, ...fresh] })) {
    if (f.severity !== 'error') continue;
    for (const keyId of f.keyIds ?? []) {
      if (!keyId.startsWith('proposed:')) continue;
      const i = Number(keyId.slice(9));
      reasons.set(i, [...(reasons.get(i) ?? []), f]);
    }
  }
  return reasons;
}

export async function previewProgression(db: Knex, sealer: Sealer, systemId: string, input: Progression): Promise<{ keys: ProgressedKey[]; held: HeldKey[] }> {
  const system = await loadSystem(db, sealer, systemId);
  const parent = system.keys.find((k) => k.id === input.parentId);
  if (!parent) throw badRequest('The master to progress from is not in this key system.', [{ field: 'parentId', message: 'unknown key' }]);
  if (parent.level === 'change') throw badRequest('A change key has no keys under it; choose a master to progress from.', [{ field: 'parentId', message: 'choose a master key' }]);
  const bittings = progressed(system, parent, input);
  const reasons = await auditErrors(db, sealer, systemId, bittings);
  const held: HeldKey[] = [];
  const clean: string[] = [];
  bittings.forEach((bitting, i) => {
    const found = reasons.get(i);
    if (!found) clean.push(bitting);
    else if (held.length < input.limit) held.push({ bitting, reasons: found.map((f) => ({ code: f.code, message: f.message.replaceAll(`Key (new ${i + 1})`, 'This key').replaceAll(`(new ${i + 1})`, 'this key') })) });
  });
  const prefix = (input.symbolPrefix ?? parent.symbol).toUpperCase();
  const used = new Set(system.keys.map((k) => k.symbol));
  let n = 1;
  const keys = clean.slice(0, input.limit).map((bitting) => {
    while (used.has(`${prefix}${n}`)) n++;
    const symbol = `${prefix}${n++}`;
    return { symbol, level: 'change' as const, parentId: parent.id, bitting };
  });
  return { keys, held };
}
