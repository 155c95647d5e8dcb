import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import { hasErrors } from './errors';
import { keyOperates } from './keyOperates';
import { pinCore } from './pinCore';
import { builtInProfiles } from './profiles';
import { splitBuildUp, stockTable } from './stock';
import { allBittings, keyedCore, runs, smallKit, text } from './testing/arbitraries';
import type { Profile } from './types';

/*
 * The control shear line: which bittings release a core. The outside reference is brute
 * force over every bitting of small profiles (few chambers, few depths, a sparse wafer kit
 * so two-wafer seams are common) and the keying primer's rule that a seam is one more break.
 */
const range = (a: number, b: number): number[] => Array.from({ length: Math.max(0, b - a + 1) }, (_, i) => a + i);
const sfic6 = builtInProfiles['sfic-6'] as Profile;
const kit6 = smallKit(sfic6);

/** 3-4 chambers, depths 0..2 or 0..3, and a random wafer kit: build-ups often need two. */
const seamProfile: fc.Arbitrary<Profile> = fc
  .record({
    chambers: fc.integer({ min: 3, max: 4 }),
    maxDepth: fc.integer({ min: 2, max: 3 }),
    sleeveExtra: fc.integer({ min: 0, max: 2 }),
    stackExtra: fc.integer({ min: 0, max: 2 }),
    step: fc.constantFrom(1, 2),
    kit: fc.uniqueArray(fc.integer({ min: 1, max: 12 }), { minLength: 3, maxLength: 8 }),
  })
  .map(({ chambers, maxDepth, sleeveExtra, stackExtra, step, kit }): Profile => {
    const sleeveUnits = maxDepth + 1 + sleeveExtra;
    const stackUnits = maxDepth + sleeveUnits + 1 + stackExtra;
    return {
      id: 'seams', label: 'Seam test profile', chambers, minDepth: 0, maxDepth, stackUnits, sleeveUnits,
      minWaferUnits: step, step, maxAdjacentCut: maxDepth,
      bottomPins: range(0, maxDepth), wafers: kit.filter((w) => w >= step), topPins: range(1, stackUnits),
      chamberOneAt: 'back',
    };
  })
  .filter((p) => p.wafers.length > 0);

/** Independent of the engine's break walk: heights of every joint between stacked parts. */
function jointHeights(ch: { bottom: number; masters: number[]; buildUp: number[] }): Set<number> {
  const out = new Set<number>();
  let h = 0;
  for (const part of [ch.bottom, ...ch.masters, ...ch.buildUp]) out.add((h += part));
  return out;
}

describe('controlOpeningsCount against brute force', () => {
  test('equals the number of bittings keyOperates says release the core, and the joint-by-joint count', () => {
    fc.assert(fc.property(keyedCore(seamProfile), (core) => {
      const pinning = pinCore(core.profile, { operating: core.operating.map(text), control: text(core.control) });
      fc.pre(pinning.chambers.length > 0);
      const joints = pinning.chambers.map(jointHeights);
      let releasing = 0;
      let byJoints = 0;
      for (const bitting of allBittings(core.profile)) {
        if (keyOperates(pinning, core.profile, bitting).control) releasing++;
        if (bitting.every((d, i) => joints[i]!.has(d + core.profile.sleeveUnits))) byJoints++;
      }
      expect(pinning.controlOpeningsCount).toBe(releasing);
      expect(pinning.controlOpeningsCount).toBe(byJoints);
      // The warning is there exactly when more than one bitting releases.
      expect(pinning.issues.some((i) => i.code === 'control-opens-more')).toBe(releasing > 1);
    }), { numRuns: runs(300) });
  }, 60_000);

  test('a chart without two-wafer build-ups releases for the control key alone (primer: one break at c + S)', () => {
    fc.assert(fc.property(keyedCore(seamProfile), (core) => {
      const pinning = pinCore(core.profile, { operating: core.operating.map(text), control: text(core.control) });
      fc.pre(!hasErrors(pinning) && pinning.chambers.every((c) => c.buildUp.length <= 1));
      expect(pinning.controlOpeningsCount).toBe(1);
    }), { numRuns: runs(200) });
  }, 60_000);
});

describe('two-wafer splits (fast-check against every pair of stocked wafers)', () => {
  const cases = seamProfile.chain((profile) => fc.record({
    profile: fc.constant(profile),
    depths: fc.uniqueArray(fc.integer({ min: profile.minDepth, max: profile.maxDepth }), { minLength: 1, maxLength: 3 }).map((d) => d.sort((a, b) => a - b)),
    units: fc.integer({ min: 2, max: 2 * profile.sleeveUnits }),
  }));

  test('a split is two stocked wafers making the build-up, seam above every reachable depth, preferring a seam that releases no operating depth', () => {
    fc.assert(fc.property(cases, ({ profile, depths, units }) => {
      const deepest = depths[depths.length - 1]!;
      const all: [number, number][] = [];
      for (const lower of profile.wafers) {
        const upper = units - lower;
        if (lower >= profile.minWaferUnits && upper >= profile.minWaferUnits && profile.wafers.includes(upper) && deepest + lower > profile.maxDepth) all.push([lower, upper]);
      }
      const releasesNone = all.filter(([lower]) => !depths.includes(deepest + lower - profile.sleeveUnits));
      const best = (list: [number, number][]) => list.reduce<[number, number] | null>((b, p) => (!b || p[0] > b[0] ? p : b), null);
      expect(splitBuildUp(stockTable(profile), units, depths)).toEqual(best(releasesNone.length ? releasesNone : all));
    }), { numRuns: runs(500) });
  });
});

describe('the keying primer’s example (common practice: a kit of wafers 2..10)', () => {
  // Control 266666, top master 044444, masters 024444 and 064444, change keys 022244 and
  // 028844 under the first and 066666 under the second. Chamber 1 needs a 12-unit build-up
  // over depth 0: 10 + 2, whose seam at 10 is the control line of depth 0. 066666 has 0 there
  // and the control key's 6 everywhere else, so it releases all three cores.
  const control = '266666';
  const cores = [['022244', '024444', '044444'], ['028844', '024444', '044444'], ['066666', '064444', '044444']];

  test('every core releases for 066666 as well as the control key, and pinCore says so', () => {
    for (const operating of cores) {
      const pinning = pinCore(kit6, { operating, control, topMaster: '044444' });
      expect(pinning.chambers[0]?.buildUp).toEqual([10, 2]);
      expect(keyOperates(pinning, kit6, '066666').control).toBe(true);
      expect(pinning.controlOpeningsCount).toBeGreaterThan(1);
      const warning = pinning.issues.find((i) => i.code === 'control-opens-more');
      expect(warning?.message).toMatch(/chamber 1 \(build-up 10 \+ 2: its seam meets the control line of depth 0\)/);
      expect(warning?.message).toMatch(/stock a wafer of 12 units|stock wafers of .*12/);
    }
  });

  test('the usual kit (wafers 2..19) builds the same cores with one wafer each: only the control key releases', () => {
    for (const operating of cores) {
      const pinning = pinCore(sfic6, { operating, control, topMaster: '044444' });
      expect(pinning.controlOpeningsCount).toBe(1);
      expect(keyOperates(pinning, sfic6, '066666').control).toBe(false);
      expect(pinning.issues.some((i) => i.code === 'control-opens-more')).toBe(false);
    }
  });

  test('an operating key that releases its own core stays an error, named by its symbol', () => {
    const pinning = pinCore(kit6, { operating: cores[2]!, control, symbols: ['AB1', 'AB', 'A'] });
    const found = pinning.issues.find((i) => i.code === 'operating-releases-core');
    expect(found).toMatchObject({ severity: 'error', key: 0 });
    expect(found?.message).toMatch(/^Key AB1 lines up the control shear line in every chamber/);
  });
});

describe('stock comes from the profile as it is now', () => {
  test('a profile edited in place is charted from its new stock (nothing cached by identity)', () => {
    const profile = smallKit(sfic6);
    const keys = { operating: ['000000'], control: '222222' };
    expect(pinCore(profile, keys).chambers[0]?.buildUp).toEqual([10, 2]);
    profile.wafers.push(12); // the admin adds a 12-unit wafer to the kit, same array
    expect(pinCore(profile, keys).chambers[0]?.buildUp).toEqual([12]);
    // ...then drops the 12 and the 10: 9 + 3 would seam at depth 9, inside the plug's reach.
    profile.wafers.splice(profile.wafers.indexOf(12), 1);
    profile.wafers.splice(profile.wafers.indexOf(10), 1);
    const after = pinCore(profile, keys);
    expect(after.issues.some((i) => i.code === 'size-not-stocked' && i.chamber === 1)).toBe(true);
  });

  test('charts come back the same whether computed or reused, and are read-only data', () => {
    const keys = { operating: ['022244', '024444', '044444'], control: '266666' };
    const first = pinCore(kit6, keys);
    const again = pinCore(kit6, keys);
    const fresh = pinCore({ ...kit6, wafers: [...kit6.wafers] }, keys); // same content, another object
    expect(again).toEqual(first);
    expect(fresh).toEqual(first);
    expect(Object.isFrozen(first.chambers[0])).toBe(true);
    expect(Object.isFrozen(first.chambers[0]?.buildUp)).toBe(true);
    // Issues are the caller's own: changing one does not reach the next chart.
    first.issues[0]!.message = 'changed';
    expect(pinCore(kit6, keys).issues[0]?.message).not.toBe('changed');
  });
});
