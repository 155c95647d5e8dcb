import { readBitting } from '../bitting';
import { pinCore } from '../pinCore';
import { BittingTable } from './bittingTable';
import type { CorePinning, Profile } from '../types';
import type { SystemAuditInput, KeyLevel } from './types';

/**
 * Everything the audit checks read, worked out once: bittings read, references resolved
 * to indexes, every core pinned. Both the indexed audit and the all-pairs baseline start
 * from here, so they can differ only in how they find who turns what.
 */
export interface SystemAuditContext {
  profile: Profile;
  system: SystemAuditInput;
  /** Depths per key (system order); null when the bitting cannot be read. */
  depths: (number[] | null)[];
  /** Indexes of keys with readable bittings, ascending. */
  validKeys: number[];
  control: number[];
  /** Per core: valid key indexes from the core's own list, ascending, distinct. */
  coreKeys: number[][];
  /** Per core: key indexes whose `opens` names the core, ascending, distinct. */
  openers: number[][];
  /** Unknown references, by the index of the key or core that made them. */
  unknownCores: Map<number, string[]>;
  unknownKeys: Map<number, string[]>;
  pinnings: CorePinning[];
  /** Index of the top master, -1 when there is none with a readable bitting. */
  topMaster: number;
  isChange: boolean[];
  /** Valid keys by bitting (and each key's bitting as a number). */
  byBitting: BittingTable;
}

const levelRank: Record<KeyLevel, number> = { 'great-grand-master': 0, 'grand-master': 1, master: 2, change: 3 };

export function levelOf(key: { level?: KeyLevel; opens: string[] }): KeyLevel {
  return key.level ?? (key.opens.length <= 1 ? 'change' : 'master');
}

/** Null when the control bitting cannot be read: nothing else can be pinned then. */
export function buildContext(profile: Profile, system: SystemAuditInput): SystemAuditContext | null {
  const controlReading = readBitting(profile, system.control);
  if (!controlReading.ok) return null;

  const depths = system.keys.map((k) => {
    const r = readBitting(profile, k.bitting);
    return r.ok ? r.depths : null;
  });
  const validKeys: number[] = [];
  depths.forEach((d, i) => { if (d) validKeys.push(i); });

  const keyIndex = new Map<string, number>();
  system.keys.forEach((k, i) => { if (!keyIndex.has(k.id)) keyIndex.set(k.id, i); });
  const coreIndex = new Map<string, number>();
  system.cores.forEach((c, i) => { if (!coreIndex.has(c.id)) coreIndex.set(c.id, i); });

  const unknownKeys = new Map<number, string[]>();
  const coreKeys = system.cores.map((core, c) => {
    const found: number[] = [];
    for (const id of core.operating) {
      const k = keyIndex.get(id);
      if (k === undefined) pushTo(unknownKeys, c, id);
      else if (depths[k]) found.push(k);
    }
    return ascendingDistinct(found);
  });

  const unknownCores = new Map<number, string[]>();
  // Keys are visited in ascending order, so each core's list comes out ascending.
  const openers: number[][] = system.cores.map(() => []);
  system.keys.forEach((key, k) => {
    for (const id of key.opens) {
      const c = coreIndex.get(id);
      if (c === undefined) pushTo(unknownCores, k, id);
      else if (depths[k]) {
        const list = openers[c] as number[];
        if (list[list.length - 1] !== k) list.push(k);
      }
    }
  });

  const bittingOf = (k: number): string => (system.keys[k]?.bitting ?? '').trim();
  const symbolOf = (k: number): string => system.keys[k]?.symbol ?? '';
  // Symbols go in so pinCore's messages name "Key AA1", never a position in this list.
  const pinnings = coreKeys.map((keys) =>
    pinCore(profile, { operating: keys.map(bittingOf), control: system.control, symbols: keys.map(symbolOf) }),
  );
  const byBitting = new BittingTable(depths, profile.chambers);

  const topMaster = pickTopMaster(system, depths);
  const isChange = system.keys.map((k, i) => i !== topMaster && levelOf(k) === 'change');
  return {
    profile, system, depths, validKeys, control: controlReading.depths,
    coreKeys, openers, unknownCores, unknownKeys, pinnings, topMaster, isChange, byBitting,
  };
}

function pickTopMaster(system: SystemAuditInput, depths: (number[] | null)[]): number {
  if (system.topMaster !== undefined) {
    const i = system.keys.findIndex((k) => k.id === system.topMaster);
    return i >= 0 && depths[i] ? i : -1;
  }
  let best = -1;
  system.keys.forEach((k, i) => {
    if (!depths[i]) return;
    const b = best < 0 ? undefined : system.keys[best];
    if (!b) { best = i; return; }
    const rank = levelRank[levelOf(k)] - levelRank[levelOf(b)];
    if (rank < 0 || (rank === 0 && k.opens.length > b.opens.length)) best = i;
  });
  return best;
}

function ascendingDistinct(list: number[]): number[] {
  if (list.length < 2) return list;
  list.sort((a, b) => a - b);
  let n = 1;
  for (let i = 1; i < list.length; i++) if (list[i] !== list[n - 1]) list[n++] = list[i] as number;
  list.length = n;
  return list;
}

function pushTo(map: Map<number, string[]>, at: number, id: string): void {
  const list = map.get(at);
  if (list) list.push(id);
  else map.set(at, [id]);
}
