import { describe, expect, test } from 'vitest';
import { buildUpSeam, controlDepthMask, hasBreakAt, keyOperates, releasesCore, turnsPlug } from './keyOperates';
import { builtInProfiles } from './profiles';
import type { ChamberPinning, CorePinning, Profile } from './types';

/*
 * Hand-built stacks at the edges of the profile's depth range. The reference is the keying
 * primer's physics (common practice): a key lines up a shear line where a break between two
 * stacked parts sits at its height; the control line is the sleeve's height above that;
 * nothing below the shallowest or past the deepest cut can be reached by any key.
 */
const sfic6 = builtInProfiles['sfic-6'] as Profile;
/** Depths 2..7 only (a profile that does not cut its shallowest and deepest depths). */
const narrow: Profile = { ...sfic6, id: 'narrow', minDepth: 2, maxDepth: 7 };

const stack = (bottom: number, masters: number[], buildUp: number[]): ChamberPinning => ({
  chamber: 1, depths: [], bottom, masters, buildUp, top: 1, total: bottom + masters.reduce((a, b) => a + b, 0) + buildUp.reduce((a, b) => a + b, 0) + 1,
});

describe('controlDepthMask: only depths a key can have', () => {
  test('breaks whose control depth is below the shallowest cut or past the deepest set no bit', () => {
    const s = narrow.sleeveUnits;
    // Breaks at control depths 1 (too shallow), 2, 7 and 8 (too deep).
    const chamber = stack(s + 1, [1], [5, 1]);
    expect(controlDepthMask(chamber, narrow)).toBe((1 << 2) | (1 << 7));
  });

  test('a break below the sleeve (a negative depth) never sets a bit', () => {
    // bottom 0 with sleeve 10: depth -10, and 1 << -10 would be bit 22 if it were taken.
    const chamber = stack(0, [], [sfic6.sleeveUnits + 3]);
    expect(controlDepthMask(chamber, sfic6)).toBe(1 << 3);
  });
});

describe('buildUpSeam', () => {
  test('one build-up wafer or none: no seam', () => {
    expect(buildUpSeam(stack(2, [3], [12]), sfic6)).toBeNull();
    expect(buildUpSeam(stack(2, [3], []), sfic6)).toBeNull();
  });

  test('two wafers: the seam sits on the lower one, above the masters, at a control depth when a key can reach it', () => {
    const s = sfic6.sleeveUnits;
    // bottom 2 + masters 3 and 1 = 6; lower wafer 10 puts the seam at 16 = depth 6's control line.
    expect(buildUpSeam(stack(2, [3, 1], [s, 3]), sfic6)).toEqual({ height: 6 + s, releasesDepth: 6 });
  });

  test('a seam past the deepest cut or below the shallowest releases no depth', () => {
    const s = narrow.sleeveUnits;
    expect(buildUpSeam(stack(2, [], [s + 6, 2]), narrow)).toEqual({ height: s + 8, releasesDepth: null });
    expect(buildUpSeam(stack(2, [], [s + 5, 2]), narrow)).toEqual({ height: s + 7, releasesDepth: 7 });
    expect(buildUpSeam(stack(0, [], [s + 1, 9]), narrow)).toEqual({ height: s + 1, releasesDepth: null });
    expect(buildUpSeam(stack(0, [], [s + 2, 9]), narrow)).toEqual({ height: s + 2, releasesDepth: 2 });
  });
});

describe('a key with the wrong number of cuts, or a core without chambers, turns and releases nothing', () => {
  const s = sfic6.sleeveUnits;
  // Two chambers with breaks at 0, 2 and s: depths 0 and 2 turn the plug, only depth 0 releases.
  const chambers = [stack(0, [2], [s - 2]), stack(0, [2], [s - 2])];
  const pinning: CorePinning = { chambers, openingsCount: 4, controlOpeningsCount: 1, issues: [] };

  test('the cuts that match every chamber turn the plug and, a sleeve higher, release the core', () => {
    expect(hasBreakAt(chambers[0]!, 2)).toBe(true);
    expect(turnsPlug(chambers, [0, 2])).toBe(true);
    expect(releasesCore(chambers, [0, 0], s)).toBe(true);
    expect(keyOperates(pinning, { ...sfic6, chambers: 2 }, [2, 0])).toEqual({ plug: true, control: false });
    expect(keyOperates(pinning, { ...sfic6, chambers: 2 }, [0, 0])).toEqual({ plug: true, control: true });
    expect(keyOperates(pinning, { ...sfic6, chambers: 2 }, [1, 0])).toEqual({ plug: false, control: false });
  });

  test('one cut too few or too many: nothing, even where every cut given would match', () => {
    expect(turnsPlug(chambers, [0])).toBe(false);
    expect(turnsPlug(chambers, [0, 2, 0])).toBe(false);
    expect(releasesCore(chambers, [0], s)).toBe(false);
    expect(releasesCore(chambers, [0, 0, 0], s)).toBe(false);
  });

  test('no chambers (an unreadable bitting): nothing, for no cuts at all either', () => {
    expect(turnsPlug([], [])).toBe(false);
    expect(releasesCore([], [], s)).toBe(false);
  });
});
