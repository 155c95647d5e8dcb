import { readBitting } from './bitting';
import type { KeyingIssueCode } from './codes';
import { macsBreak, sameProgression } from './rules';
import type { Profile } from './types';

/** A key of the system as placement needs it: where it hangs and what it is cut to. */
export interface PlacedKey {
  id: string;
  symbol: string;
  bitting: string;
  /** Its master's id; null for a key at the top. */
  parentId: string | null;
}

export interface PlacementSystem {
  control: string;
  keys: readonly PlacedKey[];
  /** Id of the named top master, whose parity every key keeps; when left out, the top of the key's own chain. */
  topMasterId?: string;
}

/** A key to be entered, imported, progressed or changed. */
export interface KeyPlacement {
  bitting: string;
  parentId: string | null;
  /** Set when an existing key is changed: it is left out of the comparisons. */
  id?: string;
}

export interface PlacementProblem {
  code: KeyingIssueCode;
  /** The field to fix: the cuts, or where the key hangs. */
  field: 'bitting' | 'parentId';
  /** 1-based chamber, when the problem is in one position. */
  chamber?: number;
  message: string;
}

export type PlacementCheck = (placement: KeyPlacement) => PlacementProblem[];

/**
 * The hierarchy rules for one key (keying primer, "A key under a master keeps its
 * master's constant positions"), as one function that hand entry, CSV import and
 * progression all call. Problems, in this order: an unreadable bitting (alone); a master
 * that is not in the system; the same bitting as the control key or another key of the
 * system; a break of the maximum adjacent cut; a position its master holds constant; a
 * position off the top master's parity. An empty list means the key may be placed.
 */
export function checkKeyPlacement(profile: Profile, system: PlacementSystem, placement: KeyPlacement): PlacementProblem[] {
  return placementChecker(profile, system)(placement);
}

/**
 * The same check with the system read once, for callers that check many keys (a
 * progression of thousands, an import): each check then costs O(chambers × chain).
 */
export function placementChecker(profile: Profile, system: PlacementSystem): PlacementCheck {
  const { byId, depthsOf, byBitting } = indexKeys(profile, system);
  const controlReading = readBitting(profile, system.control);
  const control = controlReading.ok ? controlReading.depths.join('') : null;
  const named = system.topMasterId === undefined ? undefined : depthsOf.get(system.topMasterId);

  return (placement) => {
    const reading = readBitting(profile, placement.bitting);
    if (!reading.ok) {
      return [{ code: reading.code, field: 'bitting', ...(reading.chamber === undefined ? {} : { chamber: reading.chamber }), message: reading.message }];
    }
    const depths = reading.depths;
    const problems: PlacementProblem[] = [];
    const parent = placement.parentId === null ? undefined : byId.get(placement.parentId);
    if (placement.parentId !== null && !parent) {
      problems.push({ code: 'placement-unknown-master', field: 'parentId', message: 'The master this key hangs under is not in the key system; choose one of its masters.' });
    }
    const chain = chainAbove(byId, parent, placement.id);

    // A second copy of a key (or the control key) is the worst case, so it comes first.
    const text = depths.join('');
    if (text === control) {
      problems.push({ code: 'placement-equals-control', field: 'bitting', message: 'The bitting is the control key’s: a key cut to it would release cores from their housings. Choose other cuts.' });
    }
    const same = (byBitting.get(text) ?? []).filter((k) => k.id !== placement.id);
    if (same.length > 0) {
      const master = same.find((k) => k.id === placement.parentId);
      const sibling = same.find((k) => placement.parentId !== null && k.parentId === placement.parentId);
      const other: PlacedKey = master ?? sibling ?? same[0]!;
      const code: KeyingIssueCode = master ? 'placement-equals-master' : sibling ? 'placement-equals-sibling' : 'placement-equals-key';
      const who = master ? `its master ${other.symbol}` : sibling ? `${other.symbol}, a key under the same master` : `key ${other.symbol}`;
      problems.push({ code, field: 'bitting', message: `The bitting is the same as ${who}: two keys of one system never share a bitting. Progress at least one more position.` });
    }


    const m = macsBreak(profile, depths);
    if (m >= 0) {
      const a = depths[m] as number;
      const b = depths[m + 1] as number;
      problems.push({
        code: 'macs-exceeded', field: 'bitting', chamber: m + 1,
        message: `Chambers ${m + 1} and ${m + 2}: cuts ${a} and ${b} differ by ${Math.abs(a - b)}, more than the maximum adjacent cut of ${profile.maxAdjacentCut}; the key cannot be cut. Change one of the two cuts.`,
      });
    }

    if (parent) {
      const parentDepths = depthsOf.get(parent.id);
      const held = constantPositions(profile, chain, depthsOf);
      for (const i of held) {
        if (parentDepths && depths[i] !== parentDepths[i]) {
          problems.push({
            code: 'placement-master-constant', field: 'bitting', chamber: i + 1,
            message: `Chamber ${i + 1}: master ${parent.symbol} holds this position constant (it was progressed at a level above), so a key under ${parent.symbol} keeps ${parent.symbol}’s cut there. Cut chamber ${i + 1} as ${parent.symbol} is cut.`,
          });
        }
      }
    }

    const topKey = named ? system.topMasterId : chain[chain.length - 1]?.id;
    const top = named ?? (topKey === undefined ? undefined : depthsOf.get(topKey));
    if (top && profile.step > 1 && topKey !== placement.id) {
      const topSymbol = byId.get(topKey as string)?.symbol ?? '';
      for (let i = 0; i < profile.chambers; i++) {
        if (!sameProgression(profile, depths[i] as number, top[i] as number)) {
          problems.push({
            code: 'placement-parity', field: 'bitting', chamber: i + 1,
            message: `Chamber ${i + 1}: the cut breaks top master ${topSymbol}’s parity (odd or even) there; under ${profile.step}-step progression every key of the system keeps it. Choose a cut ${profile.step} steps from the top master’s.`,
          });
        }
      }
    }

    return problems;
  };
}

/**
 * The chambers (1-based, ascending) that a key under `parentId` must cut as that master
 * is cut: what a progression under it may not progress.
 */
export function masterConstantChambers(profile: Profile, system: PlacementSystem, parentId: string): number[] {
  const { byId, depthsOf } = indexKeys(profile, system);
  return constantPositions(profile, chainAbove(byId, byId.get(parentId), undefined), depthsOf).map((i) => i + 1);
}

interface KeyIndex {
  byId: Map<string, PlacedKey>;
  depthsOf: Map<string, number[]>;
  byBitting: Map<string, PlacedKey[]>;
}

/** First key per id wins; unreadable bittings are left out of every comparison. */
function indexKeys(profile: Profile, system: PlacementSystem): KeyIndex {
  const byId = new Map<string, PlacedKey>();
  const depthsOf = new Map<string, number[]>();
  const byBitting = new Map<string, PlacedKey[]>();
  for (const key of system.keys) {
    if (byId.has(key.id)) continue;
    byId.set(key.id, key);
    const reading = readBitting(profile, key.bitting);
    if (!reading.ok) continue;
    depthsOf.set(key.id, reading.depths);
    const text = reading.depths.join('');
    const list = byBitting.get(text);
    if (list) list.push(key);
    else byBitting.set(text, [key]);
  }
  return { byId, depthsOf, byBitting };
}

/**
 * The positions a key under `chain[0]` must keep: every position where some master on
 * the chain differs from its own master, that is, the positions progressed at the
 * levels above the key. Positions no level above has progressed stay free.
 */
function constantPositions(profile: Profile, chain: readonly PlacedKey[], depthsOf: ReadonlyMap<string, number[]>): number[] {
  const held = new Array<boolean>(profile.chambers).fill(false);
  for (let j = 0; j + 1 < chain.length; j++) {
    const lower = depthsOf.get((chain[j] as PlacedKey).id);
    const upper = depthsOf.get((chain[j + 1] as PlacedKey).id);
    if (!lower || !upper) continue;
    for (let i = 0; i < profile.chambers; i++) if (lower[i] !== upper[i]) held[i] = true;
  }
  return held.flatMap((h, i) => (h ? [i] : []));
}

/** The master and every master above it, nearest first; stops at a loop or at the key itself. */
function chainAbove(byId: ReadonlyMap<string, PlacedKey>, parent: PlacedKey | undefined, selfId: string | undefined): PlacedKey[] {
  const chain: PlacedKey[] = [];
  const seen = new Set<string>(selfId === undefined ? [] : [selfId]);
  let at = parent;
  while (at && !seen.has(at.id)) {
    seen.add(at.id);
    chain.push(at);
    at = at.parentId === null ? undefined : byId.get(at.parentId);
  }
  return chain;
}
