import type { Profile } from './types';

/**
 * The stocked sizes of one profile as bit masks (sizes 0..30; larger sizes, rare in a
 * custom profile, are looked up in the list). Built from the profile's content on every
 * pinCore call and never cached, so a profile edited in place is never read stale; the
 * cost is a few dozen operations per core.
 */
export interface StockTable {
  bottom: number;
  wafers: number;
  top: number;
  profile: Profile;
}

/** In the mask only whole sizes 0..30 (the ones maskOf sets); any other size (fractional, negative, large) is looked up in the list. */
// size >>> 0 === size: a whole number from 0 up (a fraction, a negative or NaN changes under >>> 0).
const inMask = (size: number): boolean => size >>> 0 === size && size < 31;

function maskOf(sizes: readonly number[]): number {
  let mask = 0;
  for (const s of sizes) if (inMask(s)) mask |= 1 << s;
  return mask;
}

export function stockTable(profile: Profile): StockTable {
  return { bottom: maskOf(profile.bottomPins), wafers: maskOf(profile.wafers), top: maskOf(profile.topPins), profile };
}

function has(mask: number, list: readonly number[], size: number): boolean {
  return inMask(size) ? ((mask >>> size) & 1) === 1 : list.includes(size);
}

export const hasBottom = (t: StockTable, size: number): boolean => has(t.bottom, t.profile.bottomPins, size);
export const hasWafer = (t: StockTable, size: number): boolean => has(t.wafers, t.profile.wafers, size);
export const hasTop = (t: StockTable, size: number): boolean => has(t.top, t.profile.topPins, size);

/**
 * Two stocked wafers, lower one first, that make `units` of build-up over a master stack
 * whose operating depths are `depths` (ascending). The seam between the two wafers is one
 * more break in the stack, so the pick is constrained:
 * - the seam must sit above every depth a key can reach, or some cut would turn the plug;
 * - preferably the seam releases no key of the core: it is not at the control line of an
 *   operating depth (seam − sleeve in `depths`), or that key would line up the control
 *   shear line in this chamber.
 * With a 10-unit sleeve over depths 0..9 every seam meets the control line of some depth,
 * so a two-wafer build-up always lets one more bitting release (pinCore counts them).
 * Among the allowed splits the largest lower wafer wins, so the pick is deterministic.
 * Null when no pair of stocked wafers keeps the seam out of the plug's reach.
 */
export function splitBuildUp(stock: StockTable, units: number, depths: readonly number[]): [number, number] | null {
  const { profile } = stock;
  const deepest = depths[depths.length - 1] as number;
  let fallback: [number, number] | null = null;
  // Lower wafers from the largest down: the seam (deepest + lower) must clear maxDepth.
  for (let lower = units - profile.minWaferUnits; lower >= profile.minWaferUnits; lower--) {
    if (deepest + lower <= profile.maxDepth) break;
    const upper = units - lower;
    if (!hasWafer(stock, lower) || !hasWafer(stock, upper)) continue;
    if (!depths.includes(deepest + lower - profile.sleeveUnits)) return [lower, upper];
    fallback ??= [lower, upper];
  }
  return fallback;
}
