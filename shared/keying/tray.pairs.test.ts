import { describe, expect, test } from 'vitest';
import { builtInProfiles } from './profiles';
import { trayFor } from './tray';
import type { ChamberPinning, CorePinning, Profile } from './types';

/*
 * The tray's list of two-wafer build-ups from hand-built pinnings, checked by counting by
 * hand (common practice: a pick list is the sum of what each core takes). A custom kit
 * makes two-wafer build-ups; the seam of each meets the control line of one depth or none.
 */
const base = builtInProfiles['sfic-6'] as Profile;
const profile: Profile = { ...base, id: 'kit', chambers: 2 };
const s = profile.sleeveUnits;

const chamber = (n: number, bottom: number, buildUp: number[]): ChamberPinning => ({
  chamber: n, depths: [bottom], bottom, masters: [], buildUp, top: 1, total: bottom + buildUp.reduce((a, b) => a + b, 0) + 1,
});
const core = (...chambers: ChamberPinning[]): CorePinning => ({ chambers, openingsCount: 1, controlOpeningsCount: 1, issues: [] });

describe('two-wafer build-ups on the tray', () => {
  test('listed by chamber, then by total, then by the lower wafer, whatever order the cores come in', () => {
    const cores = [
      core(chamber(1, 3, [8, 4]), chamber(2, 1, [6, 6])),
      core(chamber(1, 3, [7, 5]), chamber(2, 1, [9, 2])),
      core(chamber(1, 2, [6, 3]), chamber(2, 0, [12])),
      core(chamber(1, 3, [8, 4]), chamber(2, 1, [6, 6])),
    ];
    const want = [
      { chamber: 1, total: 9, wafers: [6, 3], count: 1 },
      { chamber: 1, total: 12, wafers: [7, 5], count: 1 },
      { chamber: 1, total: 12, wafers: [8, 4], count: 2 },
      { chamber: 2, total: 11, wafers: [9, 2], count: 1 },
      { chamber: 2, total: 12, wafers: [6, 6], count: 2 },
    ];
    for (const order of [[0, 1, 2, 3], [3, 2, 1, 0], [2, 0, 3, 1], [1, 3, 0, 2]]) {
      const tray = trayFor(profile, order.map((i) => cores[i]!));
      expect(tray.twoWaferBuildUps.map(({ chamber: c, total, wafers, count }) => ({ chamber: c, total, wafers, count }))).toEqual(want);
    }
  });

  test('a one-wafer build-up, or none, is not a pair', () => {
    const tray = trayFor(profile, [core(chamber(1, 3, [12]), chamber(2, 1, []))]);
    expect(tray.twoWaferBuildUps).toEqual([]);
    expect(tray.totals.buildUp).toEqual([{ size: 12, count: 1 }]);
  });

  test('each seam’s control depth once, ascending, over the cores counted; none when no key reaches it', () => {
    // Seam height = bottom + lower wafer; its control depth = height - sleeve.
    const tray = trayFor(profile, [
      core(chamber(1, 5, [s - 1, 3]), chamber(2, 0, [s + 20, 1])),
      core(chamber(1, 1, [s - 1, 7]), chamber(2, 0, [s + 20, 1])),
      core(chamber(1, 5, [s - 1, 3]), chamber(2, 0, [s + 20, 1])),
      core(chamber(1, 2, [s - 1, 6]), chamber(2, 0, [s + 20, 1])),
    ]);
    const [a, b, c, d] = tray.twoWaferBuildUps;
    expect(a).toMatchObject({ chamber: 1, wafers: [s - 1, 3], count: 2, seamReleases: [4] });
    expect(b).toMatchObject({ chamber: 1, wafers: [s - 1, 6], count: 1, seamReleases: [1] });
    expect(c).toMatchObject({ chamber: 1, wafers: [s - 1, 7], count: 1, seamReleases: [0] });
    expect(d).toMatchObject({ chamber: 2, wafers: [s + 20, 1], count: 4, seamReleases: [] });
  });

  test('one pair whose seam meets different depths in different cores lists them all, ascending', () => {
    // Same wafers [s, 2] over bottoms 6, 1 and 3: seams at depths 6, 1 and 3.
    const tray = trayFor(profile, [6, 1, 3, 6].map((bottom) => core(chamber(1, bottom, [s, 2]), chamber(2, 0, []))));
    expect(tray.twoWaferBuildUps).toEqual([{ chamber: 1, total: s + 2, wafers: [s, 2], count: 4, seamReleases: [1, 3, 6] }]);
  });

  test('a pinning with the wrong number of chambers is skipped, not counted', () => {
    const tray = trayFor(profile, [core(chamber(1, 3, [8, 4])), core(chamber(1, 3, [8, 4]), chamber(2, 1, [6, 6]))]);
    expect(tray.skipped).toEqual([0]);
    expect(tray.cores).toBe(1);
    expect(tray.twoWaferBuildUps.map((p) => p.count)).toEqual([1, 1]);
  });
});
