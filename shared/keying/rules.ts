import type { Profile } from './types';

/**
 * First pair of neighbouring cuts that differ by more than the profile's maximum adjacent
 * cut, as the 0-based index of the left cut, or -1 when the key can be cut.
 */
export function macsBreak(profile: Profile, depths: readonly number[]): number {
  for (let i = 0; i + 1 < depths.length; i++) {
    if (Math.abs((depths[i] ?? 0) - (depths[i + 1] ?? 0)) > profile.maxAdjacentCut) return i;
  }
  return -1;
}

/** Under a step-s progression, depths a and b may share a position only when a ≡ b (mod s). */
export function sameProgression(profile: Profile, a: number, b: number): boolean {
  return profile.step <= 1 || (a - b) % profile.step === 0;
}

/** Depths a position may take under the progression, other than `fixed` itself, ascending. */
export function progressionDepths(profile: Profile, fixed: number): number[] {
  const out: number[] = [];
  for (let d = profile.minDepth; d <= profile.maxDepth; d++) {
    if (d !== fixed && sameProgression(profile, d, fixed)) out.push(d);
  }
  return out;
}
