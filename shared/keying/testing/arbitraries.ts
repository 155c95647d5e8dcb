/**
 * Test-only: fast-check generators for profiles and keyed cores. Imported by *.test.ts
 * files only; nothing in the app or the server imports this folder.
 */
import fc from 'fast-check';
import { builtInProfiles } from '../profiles';
import { progressionDepths } from '../rules';
import type { Profile } from '../types';

const range = (from: number, to: number): number[] =>
  Array.from({ length: Math.max(0, to - from + 1) }, (_, i) => from + i);

/**
 * Small but valid profiles, so every bitting can be enumerated: 5 chambers, depths
 * 0..3 or 0..4, every part size stocked (stock gaps are tested by example instead).
 */
export const smallProfile: fc.Arbitrary<Profile> = fc
  .record({
    maxDepth: fc.integer({ min: 3, max: 4 }),
    step: fc.constantFrom(1, 2),
    sleeveExtra: fc.integer({ min: 0, max: 2 }),
    stackExtra: fc.integer({ min: 0, max: 3 }),
  })
  .map(({ maxDepth, step, sleeveExtra, stackExtra }): Profile => {
    const sleeveUnits = maxDepth + 1 + sleeveExtra;
    const stackUnits = maxDepth + sleeveUnits + 1 + stackExtra;
    const minWaferUnits = step;
    return {
      id: 'small', label: 'Small test profile', chambers: 5, minDepth: 0, maxDepth,
      stackUnits, sleeveUnits, minWaferUnits, step, maxAdjacentCut: maxDepth,
      bottomPins: range(0, maxDepth), wafers: range(1, stackUnits), topPins: range(1, stackUnits),
      chamberOneAt: 'back',
    };
  });

export const usualProfile: fc.Arbitrary<Profile> = fc.constantFrom(
  builtInProfiles['sfic-6'] as Profile,
  builtInProfiles['sfic-7'] as Profile,
);

export interface KeyedCore {
  profile: Profile;
  /** Operating keys, top master last. */
  operating: number[][];
  control: number[];
}

/** Keys that follow the profile's progression from a random top master, and a random control key. */
export function keyedCore(profiles: fc.Arbitrary<Profile>, maxKeys = 4): fc.Arbitrary<KeyedCore> {
  return profiles.chain((profile) => {
    const depth = fc.integer({ min: profile.minDepth, max: profile.maxDepth });
    return fc.array(depth, { minLength: profile.chambers, maxLength: profile.chambers }).chain((top) => {
      const keyDepths = top.map((t) => fc.constantFrom(t, ...progressionDepths(profile, t)));
      return fc.record({
        profile: fc.constant(profile),
        others: fc.array(fc.tuple(...keyDepths), { minLength: 0, maxLength: maxKeys - 1 }),
        control: fc.array(depth, { minLength: profile.chambers, maxLength: profile.chambers }),
      }).map(({ others, control }) => ({ profile, operating: [...others, top], control }));
    });
  });
}

export const text = (depths: readonly number[]): string => depths.join('');

/** Every bitting of a profile, for brute-force checks on small profiles. */
export function* allBittings(profile: Profile): Generator<number[]> {
  const depths = new Array<number>(profile.chambers).fill(profile.minDepth);
  for (;;) {
    yield [...depths];
    let i = profile.chambers - 1;
    while (i >= 0 && depths[i] === profile.maxDepth) {
      depths[i] = profile.minDepth;
      i--;
    }
    if (i < 0) return;
    depths[i] = (depths[i] as number) + 1;
  }
}

/**
 * A shop whose kit stocks wafers 2..10 only (the old built-in stock), so build-ups over
 * 10 are made of two wafers and their seams can meet the control line.
 */
export function smallKit(profile: Profile): Profile {
  return { ...profile, id: `${profile.id}-kit10`, label: `${profile.label}, wafers 2-10`, wafers: range(2, 10), topPins: range(3, 13) };
}

/**
 * fast-check runs for a property: `n`, or a tenth of it (at least 5) in the mutation run,
 * which marks itself in testing/fixedSeed.ts. Stryker runs the covering tests once per
 * mutant, so the full counts would take hours on a shared machine.
 */
export const runs = (n: number): number =>
  (globalThis as { cwMutationRun?: boolean }).cwMutationRun ? Math.max(5, Math.ceil(n / 10)) : n;
