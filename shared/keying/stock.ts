import type { Profile } from './types';

export function isStocked(sizes: readonly number[], size: number): boolean {
  return sizes.includes(size);
}

// Profiles are edited as whole objects, so a sorted copy per stocked list stays valid.
const sortedCache = new WeakMap<readonly number[], number[]>();

let lastSizes: readonly number[] | null = null;
let lastSorted: number[] = [];

function largestFirst(sizes: readonly number[]): number[] {
  // Batches pin many cores with one profile: the last list answers most calls.
  if (sizes === lastSizes) return lastSorted;
  let sorted = sortedCache.get(sizes);
  if (!sorted) {
    sorted = [...new Set(sizes)].sort((a, b) => b - a);
    sortedCache.set(sizes, sorted);
  }
  lastSizes = sizes;
  lastSorted = sorted;
  return sorted;
}

/**
 * Two stocked wafers, lower one first, that make `units` of build-up over a master stack
 * whose operating depths are `depths` (ascending). The seam between the two wafers is one
 * more break in the stack, so the pick is constrained:
 * - the seam must sit above every depth a key can reach, or some cut would turn the plug;
 * - preferably the seam is not at the control line for an operating depth (seam − sleeve
 *   in `depths`), or that key would line up the control shear line in this chamber.
 * Among the allowed splits the largest lower wafer wins, so the pick is deterministic.
 * Null when no pair of stocked wafers keeps the seam out of the plug's reach.
 */
export function splitBuildUp(profile: Profile, units: number, depths: readonly number[]): [number, number] | null {
  const deepest = depths[depths.length - 1] as number;
  let fallback: [number, number] | null = null;
  for (const lower of largestFirst(profile.wafers)) {
    const upper = units - lower;
    if (lower < profile.minWaferUnits || upper < profile.minWaferUnits) continue;
    if (deepest + lower <= profile.maxDepth || !isStocked(profile.wafers, upper)) continue;
    if (!depths.includes(deepest + lower - profile.sleeveUnits)) return [lower, upper];
    fallback ??= [lower, upper];
  }
  return fallback;
}
