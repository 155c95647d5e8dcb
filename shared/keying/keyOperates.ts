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

/**
 * Depths (within the profile's range) whose control line meets a break of this stack, as
 * a bit mask (bit d set when depth d releases in this chamber). Walks the same breaks
 * as hasBreakAt: the build-up's top gives the control depth, each two-wafer seam one more.
 */
export function controlDepthMask(chamber: ChamberPinning, profile: Profile): number {
  const s = profile.sleeveUnits;
  let mask = 0;
  const mark = (h: number): void => {
    const d = h - s;
    if (d >= profile.minDepth && d <= profile.maxDepth) mask |= 1 << d;
  };
  let h = chamber.bottom;
  mark(h);
  for (const m of chamber.masters) mark((h += m));
  for (const w of chamber.buildUp) mark((h += w));
  return mask;
}

export function bitCount(mask: number): number {
  let v = mask - ((mask >>> 1) & 0x55555555);
  v = (v & 0x33333333) + ((v >>> 2) & 0x33333333);
  return (((v + (v >>> 4)) & 0x0f0f0f0f) * 0x01010101) >>> 24;
}

/**
 * The seam of a two-wafer build-up: its height above the stack's bottom and the depth
 * whose control line it meets (null when no key can reach it). Null without a seam.
 */
export function buildUpSeam(chamber: ChamberPinning, profile: Profile): { height: number; releasesDepth: number | null } | null {
  if (chamber.buildUp.length < 2) return null;
  let h = chamber.bottom;
  for (const m of chamber.masters) h += m;
  h += chamber.buildUp[0] as number;
  const d = h - profile.sleeveUnits;
  return { height: h, releasesDepth: d >= profile.minDepth && d <= profile.maxDepth ? d : null };
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
