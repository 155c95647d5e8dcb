import { readBitting } from '../bitting';
import { pinCore } from '../pinCore';
import type { CorePinning, Profile } from '../types';
import type { AuditInput, KeyLevel } from './types';

/**
 * Everything the audit checks read, worked out once: bittings read, references resolved
 * to indexes, every core pinned. Both the indexed audit and the all-pairs baseline start
 * from here, so they can differ only in how they find who turns what.
 */
export interface AuditContext {
  profile: Profile;
  system: AuditInput;
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
  /** Valid keys by their bitting as a base-10 number (chamber 1 the highest digit), ascending. */
  keysByCode: Map<number, number[]>;
}

/** A bitting as one number, chamber 1 the highest digit; depths are single digits. */
export function bittingCode(depths: readonly number[]): number {
  let code = 0;
  for (const d of depths) code = code * 10 + d;
  return code;
}

const levelRank: Record<KeyLevel, number> = { 'great-grand-master': 0, 'grand-master': 1, master: 2, change: 3 };

export function levelOf(key: { level?: KeyLevel; opens: string[] }): KeyLevel {
  return key.level ?? (key.opens.length <= 1 ? 'change' : 'master');
}

/** Null when the control bitting cannot be read: nothing else can be pinned then. */
export function buildContext(profile: Profile, system: AuditInput): AuditContext | null {
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
    const found = new Set<number>();
    for (const id of core.operating) {
      const k = keyIndex.get(id);
      if (k === undefined) pushTo(unknownKeys, c, id);
      else if (depths[k]) found.add(k);
    }
    return [...found].sort((a, b) => a - b);
  });

  const unknownCores = new Map<number, string[]>();
  const openerSets = system.cores.map(() => new Set<number>());
  system.keys.forEach((key, k) => {
    for (const id of key.opens) {
      const c = coreIndex.get(id);
      if (c === undefined) pushTo(unknownCores, k, id);
      else if (depths[k]) (openerSets[c] as Set<number>).add(k);
    }
  });
  const openers = openerSets.map((s) => [...s].sort((a, b) => a - b));

  const bittingOf = (k: number): string => (system.keys[k]?.bitting ?? '').trim();
  const symbolOf = (k: number): string => system.keys[k]?.symbol ?? '';
  // Symbols go in so pinCore's messages name "Key AA1", never a position in this list.
  const pinnings = coreKeys.map((keys) =>
    pinCore(profile, { operating: keys.map(bittingOf), control: system.control, symbols: keys.map(symbolOf) }),
  );
  const keysByCode = new Map<number, number[]>();
  for (const k of validKeys) {
    const code = bittingCode(depths[k] as number[]);
    const list = keysByCode.get(code);
    if (list) list.push(k);
    else keysByCode.set(code, [k]);
  }

  const topMaster = pickTopMaster(system, depths);
  const isChange = system.keys.map((k, i) => i !== topMaster && levelOf(k) === 'change');
  return {
    profile, system, depths, validKeys, control: controlReading.depths,
    coreKeys, openers, unknownCores, unknownKeys, pinnings, topMaster, isChange, keysByCode,
  };
}

function pickTopMaster(system: AuditInput, depths: (number[] | null)[]): number {
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

function pushTo(map: Map<number, string[]>, at: number, id: string): void {
  const list = map.get(at);
  if (list) list.push(id);
  else map.set(at, [id]);
}
