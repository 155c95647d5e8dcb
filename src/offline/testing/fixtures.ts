/** Invented records for the offline tests. MARKERS are strings that must never appear in plain text on disk. */
import type { Packet } from '@shared/schemas/packet';
import type { CompletionRecord } from '@shared/schemas/sync';
import type { BenchProgress } from '../bench';

export const MARKERS = ['BITTING-739146', 'Chamber-Stack-58213', 'bitting 2-4-6-8-0-3'];
export const PASSPHRASE = 'brass tray shear line';
export const TEST_ITERATIONS = 1_000;
export const who = { userId: '7b6c1a52-8c1e-4f6e-9a7d-3f1f3c2b9d10', deviceId: '0f5b1b9e-2f43-4c47-9d5f-64b1a3d2c0aa' };

const uuid = () => globalThis.crypto.randomUUID();

export function packet(overrides: { workOrderId?: string; expiresAt?: string; title?: string } = {}): Packet {
  const id = overrides.workOrderId ?? uuid();
  const coreId = uuid();
  return {
    v: 1,
    workOrder: { id, number: 1042, title: overrides.title ?? 'East wing rekey', purpose: 'lost-key-rekey', status: 'assigned', dueDate: null, notes: MARKERS[0]!, hasFireRated: false },
    keySystem: { id: uuid(), name: 'Test system' },
    profile: { chambers: 6 } as Packet['profile'],
    cores: [
      {
        id: coreId,
        tag: 'C-101',
        state: 'planned',
        door: null,
        pinning: { chambers: [{ chamber: 1, note: MARKERS[1] }], bitting: MARKERS[2] } as unknown as Packet['cores'][number]['pinning'],
        keyCheck: [],
      },
    ],
    tray: { perChamber: [] } as unknown as Packet['tray'],
    fetchedAt: new Date().toISOString(),
    expiresAt: overrides.expiresAt ?? new Date(Date.now() + 8 * 3600_000).toISOString(),
  };
}

export function completion(overrides: Partial<CompletionRecord> = {}): CompletionRecord {
  const at = new Date().toISOString();
  return {
    clientId: uuid(),
    kind: 'completion',
    coreId: uuid(),
    workOrderId: uuid(),
    startedAt: at,
    finishedAt: at,
    result: 'passed',
    attempts: [{ n: 1, startedAt: at, finishedAt: at, result: 'passed', steps: [{ kind: 'bottom', chamber: 1, size: 7, at }], keyChecks: [] }],
    notes: MARKERS[0],
    ...overrides,
  };
}

export function progress(coreId: string, workOrderId: string): BenchProgress {
  return { coreId, workOrderId, updatedAt: new Date().toISOString(), step: 3, note: MARKERS[1] };
}
