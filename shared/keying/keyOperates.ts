import { parseBitting } from './bitting';
import type { ChamberPinning, CorePinning, Profile } from './types';

/*
 * Works from the parts, not from the depth lists: a key lines up a shear line in a
 * chamber when some break between two stacked parts sits exactly there. That way a seam
 * inside a two-wafer build-up is accounted for like any other break.
 */

/** True when the stack has a break `height` units above its bottom. */
export function hasBreakAt(chamber: ChamberPinning, height: number): boolean {
  let h = chamber.bottom;
  if (h === height) return true;
  for (const m of chamber.masters) {
    h += m;
    if (h === height) return true;
  }
  for (const w of chamber.buildUp) {
    h += w;
    if (h === height) return true;
  }
  return false;
}

export function turnsPlug(chambers: readonly ChamberPinning[], depths: readonly number[]): boolean {
  if (chambers.length === 0 || chambers.length !== depths.length) return false;
  for (let i = 0; i < chambers.length; i++) {
    if (!hasBreakAt(chambers[i] as ChamberPinning, depths[i] as number)) return false;
  }
  return true;
}

export function releasesCore(
  chambers: readonly ChamberPinning[],
  depths: readonly number[],
  sleeveUnits: number,
): boolean {
  if (chambers.length === 0 || chambers.length !== depths.length) return false;
  for (let i = 0; i < chambers.length; i++) {
    if (!hasBreakAt(chambers[i] as ChamberPinning, (depths[i] as number) + sleeveUnits)) return false;
  }
  return true;
}

/**
 * What a key does in a pinned core: `plug` when every chamber has a break at the key's
 * depth, `control` when every chamber has a break at depth + sleeve. A pinning without
 * chambers (unreadable bittings) turns nothing. A bitting string that cannot be read
 * throws KeyingError, as parseBitting does; depths already read may be passed instead.
 */
export function keyOperates(
  pinning: CorePinning,
  profile: Profile,
  bitting: string | readonly number[],
): { plug: boolean; control: boolean } {
  const depths = typeof bitting === 'string' ? parseBitting(profile, bitting) : bitting;
  return {
    plug: turnsPlug(pinning.chambers, depths),
    control: releasesCore(pinning.chambers, depths, profile.sleeveUnits),
  };
}
