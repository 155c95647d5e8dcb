/** The engine's chart for a door's keys before a work order is saved: issues and counts, no depths. */
import type { Knex } from 'knex';
import type { PinningPreview } from '../../shared/schemas/workOrders';
import { badRequest } from '../errors';
import { chainOf, loadSystem } from './keySystems';
import type { Sealer } from './secrets';
import { pinningFor } from './workOrders';

export interface PinningRequest {
  keySystemId: string;
  keyId: string;
  crossKeyId?: string | null | undefined;
}

export async function previewPinning(db: Knex, sealer: Sealer, input: PinningRequest): Promise<PinningPreview> {
  const system = await loadSystem(db, sealer, input.keySystemId);
  const chain = chainOf(system.keys, input.keyId);
  if (!chain.length) throw badRequest('That key is not in this key system.', [{ field: 'keyId', message: 'not in this key system' }]);
  if (input.crossKeyId) {
    const cross = system.keys.find((k) => k.id === input.crossKeyId);
    if (!cross) throw badRequest('The cross-keyed key is not in this key system.', [{ field: 'crossKeyId', message: 'not in this key system' }]);
    if (!chain.some((k) => k.id === cross.id)) chain.push({ ...cross, crossKeyed: true });
  }
  const pinning = pinningFor(system, chain);
  return { issues: pinning.issues, openingsCount: pinning.openingsCount, controlOpeningsCount: pinning.controlOpeningsCount, chain: chain.map((k) => k.symbol) };
}
