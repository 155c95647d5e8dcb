import { stockTable, type StockTable } from './stock';
import type { ChamberPinning, PinningIssue, Profile } from './types';

/**
 * One chamber's stack depends only on the profile, the chamber, its operating depths and
 * the control depth; a batch of cores repeats the same few stacks again and again. pinCore
 * keeps each computed chamber (frozen: pinnings are read-only data) with the issues it
 * raised, per profile object, and checks on every call that the profile's content still
 * matches what the cache was built from (figures and stocked sizes): a profile edited in
 * place starts a fresh cache, so a chart is never computed from stale stock.
 */
export interface CachedChamber {
  chamber: ChamberPinning;
  issues: readonly PinningIssue[];
  /** controlDepthMask of the chamber. */
  controlMask: number;
}

export interface ProfileCache {
  figures: number[];
  lists: [number[], number[], number[]];
  /** Built from the content the cache was checked against. */
  stock: StockTable;
  entries: Map<number, CachedChamber>;
}

const caches = new WeakMap<Profile, ProfileCache>();
/** Far more than a real system needs (chambers × depth sets × control depths). */
const maxEntries = 50_000;

const figuresOf = (p: Profile): number[] =>
  [p.chambers, p.minDepth, p.maxDepth, p.stackUnits, p.sleeveUnits, p.minWaferUnits, p.step];

function sameList(a: readonly number[], b: readonly number[]): boolean {
  if (a.length !== b.length) return false;
  for (let i = 0; i < a.length; i++) if (a[i] !== b[i]) return false;
  return true;
}

function matches(c: ProfileCache, p: Profile): boolean {
  const f = c.figures;
  return f[0] === p.chambers && f[1] === p.minDepth && f[2] === p.maxDepth && f[3] === p.stackUnits &&
    f[4] === p.sleeveUnits && f[5] === p.minWaferUnits && f[6] === p.step &&
    sameList(c.lists[0], p.bottomPins) && sameList(c.lists[1], p.wafers) && sameList(c.lists[2], p.topPins);
}

/** The chamber cache (and stock table) for this profile as it is now. */
export function profileCache(profile: Profile): ProfileCache {
  const c = caches.get(profile);
  if (c && c.entries.size < maxEntries && matches(c, profile)) return c;
  // The stock table is built from a copy, so it describes exactly the content checked.
  const lists: [number[], number[], number[]] = [[...profile.bottomPins], [...profile.wafers], [...profile.topPins]];
  const snapshot: Profile = { ...profile, bottomPins: lists[0], wafers: lists[1], topPins: lists[2] };
  const fresh: ProfileCache = { figures: figuresOf(profile), lists, stock: stockTable(snapshot), entries: new Map() };
  caches.set(profile, fresh);
  return fresh;
}

/** Chamber (0-based), operating depths as a bit mask, control depth: one number. */
export const chamberKey = (index: number, depthMask: number, control: number): number =>
  (index * 1024 + depthMask) * 16 + control;

export function freezeChamber(ch: ChamberPinning): ChamberPinning {
  Object.freeze(ch.depths);
  Object.freeze(ch.masters);
  Object.freeze(ch.buildUp);
  return Object.freeze(ch);
}
