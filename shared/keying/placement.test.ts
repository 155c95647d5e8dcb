import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import { checkKeyPlacement, masterConstantChambers, placementChecker, type PlacedKey, type PlacementSystem } from './placement';
import { builtInProfiles } from './profiles';
import { allBittings, runs, text } from './testing/arbitraries';
import type { Profile } from './types';

const sfic7 = builtInProfiles['sfic-7'] as Profile;
const sfic6 = builtInProfiles['sfic-6'] as Profile;

/*
 * A three-level system of our own, shaped like the demo campus: grand master A, masters
 * AA and AB progressed in chambers 1-2, change keys progressed in chambers 5-7.
 */
const campus: PlacementSystem = {
  control: '7351735',
  topMasterId: 'a',
  keys: [
    { id: 'a', symbol: 'A', bitting: '4628462', parentId: null },
    { id: 'aa', symbol: 'AA', bitting: '2428462', parentId: 'a' },
    { id: 'ab', symbol: 'AB', bitting: '2828462', parentId: 'a' },
    { id: 'aa1', symbol: 'AA1', bitting: '2428440', parentId: 'aa' },
  ],
};
const codes = (bitting: string, parentId: string | null, id?: string) =>
  checkKeyPlacement(sfic7, campus, { bitting, parentId, ...(id ? { id } : {}) }).map((p) => [p.code, p.chamber ?? null]);

describe('checkKeyPlacement: worked examples of our own (keying primer, "A key under a master keeps its master’s constant positions")', () => {
  test('a change key that progresses only the change-key chambers is accepted', () => {
    expect(codes('2428420', 'aa')).toEqual([]);
  });

  test('a change key identical to its master is refused, naming the master', () => {
    const problems = checkKeyPlacement(sfic7, campus, { bitting: '2428462', parentId: 'aa' });
    expect(problems).toEqual([{ code: 'placement-equals-master', field: 'bitting', message: 'The bitting is the same as its master AA: two keys of one system never share a bitting. Progress at least one more position.' }]);
  });

  test('a key identical to a sibling, to a key elsewhere, or to the control key is refused, each named', () => {
    expect(codes('2428440', 'aa')).toEqual([['placement-equals-sibling', null]]);
    // AB's bitting under AA: also a change of chamber 2, which AA holds constant.
    expect(codes('2828462', 'aa')).toEqual([['placement-equals-key', null], ['placement-master-constant', 2]]);
    expect(codes('7351735', null)).toEqual([['placement-equals-control', null], ['placement-parity', 1], ['placement-parity', 2], ['placement-parity', 3], ['placement-parity', 4], ['placement-parity', 5], ['placement-parity', 6], ['placement-parity', 7]]);
  });

  test('a change key that changes a position its master holds constant is refused, naming the chamber', () => {
    // AA differs from A in chambers 1 and 2, so keys under AA keep AA's cuts there.
    const problems = checkKeyPlacement(sfic7, campus, { bitting: '0428420', parentId: 'aa' });
    expect(problems).toEqual([{
      code: 'placement-master-constant', field: 'bitting', chamber: 1,
      message: 'Chamber 1: master AA holds this position constant (it was progressed at a level above), so a key under AA keeps AA’s cut there. Cut chamber 1 as AA is cut.',
    }]);
    expect(masterConstantChambers(sfic7, campus, 'aa')).toEqual([1, 2]);
    // Under the grand master nothing was progressed above, so every chamber is free.
    expect(masterConstantChambers(sfic7, campus, 'a')).toEqual([]);
  });

  test('an odd cut under an even top master is refused (two-step progression keeps parity)', () => {
    const problems = checkKeyPlacement(sfic7, campus, { bitting: '2428430', parentId: 'aa' });
    expect(problems).toEqual([{
      code: 'placement-parity', field: 'bitting', chamber: 6,
      message: 'Chamber 6: the cut breaks top master A’s parity (odd or even) there; under 2-step progression every key of the system keeps it. Choose a cut 2 steps from the top master’s.',
    }]);
    // A key with no master is still held to the named top master's parity.
    expect(codes('4628463', null)).toEqual([['placement-parity', 7]]);
    // One-step profiles ask no parity.
    expect(checkKeyPlacement({ ...sfic7, step: 1 }, campus, { bitting: '2428430', parentId: 'aa' })).toEqual([]);
  });

  test('MACS: a key that breaks it cannot be cut and is refused, naming the chambers (keying primer, MACS)', () => {
    const macs6 = { ...sfic7, maxAdjacentCut: 6 };
    const problems = checkKeyPlacement(macs6, campus, { bitting: '2428002', parentId: 'aa' });
    expect(problems).toEqual([{
      code: 'macs-exceeded', field: 'bitting', chamber: 4,
      message: 'Chambers 4 and 5: cuts 8 and 0 differ by 8, more than the maximum adjacent cut of 6; the key cannot be cut. Change one of the two cuts.',
    }]);
    // Exactly the limit is fine: 2 next to 8 (chambers 3 and 4) differs by 6, within a MACS of 6.
    expect(checkKeyPlacement(macs6, campus, { bitting: '2428422', parentId: 'aa' })).toEqual([]);
  });

  test('changing an existing key leaves that key out of the comparisons; an unknown master is named', () => {
    expect(codes('2428440', 'aa', 'aa1')).toEqual([]);
    expect(checkKeyPlacement(sfic7, campus, { bitting: '2428420', parentId: 'nope' })).toEqual([
      { code: 'placement-unknown-master', field: 'parentId', message: 'The master this key hangs under is not in the key system; choose one of its masters.' },
    ]);
  });

  test('an unreadable bitting is one problem naming what to fix', () => {
    expect(checkKeyPlacement(sfic7, campus, { bitting: '24284', parentId: 'aa' })).toEqual([
      expect.objectContaining({ code: 'bitting-length', field: 'bitting' }),
    ]);
  });

  test('without a named top master the top of the key’s own chain sets the parity', () => {
    const unnamed: PlacementSystem = { ...campus, topMasterId: undefined };
    expect(checkKeyPlacement(sfic7, unnamed, { bitting: '2428430', parentId: 'aa' }).map((p) => p.code)).toEqual(['placement-parity']);
    // A key with no master and no named top master has nothing to keep.
    expect(checkKeyPlacement(sfic7, unnamed, { bitting: '1357913', parentId: null })).toEqual([]);
  });

  test('a four-level chain: a change key keeps every position progressed at any level above (8-chamber profile)', () => {
    const eight: Profile = { ...sfic7, chambers: 8 };
    const system: PlacementSystem = {
      control: '13571357',
      keys: [
        { id: 'g', symbol: 'GGM', bitting: '24682468', parentId: null },
        { id: 'a', symbol: 'A', bitting: '44682468', parentId: 'g' }, // chamber 1
        { id: 'aa', symbol: 'AA', bitting: '44882468', parentId: 'a' }, // chamber 3
      ],
    };
    expect(masterConstantChambers(eight, system, 'aa')).toEqual([1, 3]);
    expect(checkKeyPlacement(eight, system, { bitting: '44882400', parentId: 'aa' })).toEqual([]);
    expect(checkKeyPlacement(eight, system, { bitting: '24882400', parentId: 'aa' }).map((p) => p.chamber)).toEqual([1]);
    expect(checkKeyPlacement(eight, system, { bitting: '44682400', parentId: 'aa' }).map((p) => p.chamber)).toEqual([3]);
  });
});

/*
 * Brute force against an oracle written from the primer's words, not from the code: a
 * position is held when the depths met on the way from the master up to the top are not
 * all the same there; parity is "same remainder mod the step as the top master"; MACS is
 * the largest neighbouring difference; a key may equal no other bitting of the system.
 */
const five: Profile = { ...sfic6, id: 'five', chambers: 5, maxDepth: 4, bottomPins: [0, 1, 2, 3, 4] };

function oracle(profile: Profile, system: PlacementSystem, bitting: number[], parentId: string | null): boolean {
  const byId = new Map(system.keys.map((k) => [k.id, k]));
  const path: number[][] = [];
  for (let at = parentId === null ? undefined : byId.get(parentId); at; at = at.parentId ? byId.get(at.parentId) : undefined) {
    path.push([...at.bitting].map(Number));
  }
  const top = system.topMasterId ? [...(byId.get(system.topMasterId) as PlacedKey).bitting].map(Number) : path[path.length - 1];
  const parent = path[0];
  for (let i = 0; i < profile.chambers; i++) {
    if (parent && new Set(path.map((p) => p[i])).size > 1 && bitting[i] !== parent[i]) return false;
    if (top && profile.step === 2 && Math.abs((bitting[i] as number) - (top[i] as number)) % 2 === 1) return false;
    if (i > 0 && Math.abs((bitting[i] as number) - (bitting[i - 1] as number)) > profile.maxAdjacentCut) return false;
  }
  const all = [system.control, ...system.keys.map((k) => k.bitting)];
  return !all.includes(text(bitting));
}

/** A random tree of up to 6 keys (each hangs under an earlier one or at the top). */
const systemArb = (profile: Profile) => {
  const bitting = fc.array(fc.integer({ min: 0, max: profile.maxDepth }), { minLength: 5, maxLength: 5 }).map(text);
  return fc.record({
    bittings: fc.array(bitting, { minLength: 1, maxLength: 6 }),
    parents: fc.array(fc.nat(), { minLength: 6, maxLength: 6 }),
    control: bitting,
    named: fc.boolean(),
  }).map(({ bittings, parents, control, named }): PlacementSystem => ({
    control,
    ...(named ? { topMasterId: 'k0' } : {}),
    keys: bittings.map((b, i) => ({ id: `k${i}`, symbol: `S${i}`, bitting: b, parentId: i === 0 ? null : `k${(parents[i] as number) % i}` })),
  }));
};

describe('checkKeyPlacement: edges (common practice unless named)', () => {
  test('changing the named top master itself asks no parity of it (it sets the parity)', () => {
    expect(checkKeyPlacement(sfic7, campus, { id: 'a', bitting: '5628462', parentId: null })).toEqual([]);
    // Any other key with that cut in chamber 1 is off the top master's parity.
    expect(codes('5628462', null)).toEqual([['placement-parity', 1]]);
  });

  test('a bitting with a letter names the chamber it is in', () => {
    expect(checkKeyPlacement(sfic7, campus, { bitting: '24x8420', parentId: 'aa' })).toEqual([
      { code: 'bitting-not-digit', field: 'bitting', chamber: 3, message: expect.stringMatching(/^Chamber 3: “x” is not a depth/) },
    ]);
  });

  test('a loop in the stored hierarchy ends the walk up instead of hanging', () => {
    const looped: PlacementSystem = {
      control: '7351735',
      keys: [
        { id: 'p', symbol: 'P', bitting: '4628462', parentId: 'q' },
        { id: 'q', symbol: 'Q', bitting: '2628462', parentId: 'p' },
      ],
    };
    // Walking up from P: P then Q; Q's master P is met again and the walk stops. P differs from Q in chamber 1.
    expect(masterConstantChambers(sfic7, looped, 'p')).toEqual([1]);
    expect(checkKeyPlacement(sfic7, looped, { bitting: '4628440', parentId: 'p' })).toEqual([]);
  });

  test('a key listed twice under one id counts once; an unreadable key is skipped in the comparisons', () => {
    const odd: PlacementSystem = {
      control: '7351735',
      keys: [
        { id: 'm', symbol: 'M', bitting: '2428462', parentId: null },
        { id: 'm', symbol: 'M-again', bitting: '0000000', parentId: null },
        { id: 'u', symbol: 'U', bitting: 'not a bitting', parentId: 'm' },
      ],
    };
    expect(checkKeyPlacement(sfic7, odd, { bitting: '0000000', parentId: 'm' }).map((p) => p.code)).not.toContain('placement-equals-key');
    expect(checkKeyPlacement(sfic7, odd, { bitting: '2428460', parentId: 'u' })).toEqual([]);
  });

  test('an unreadable control key is no reason to refuse a key', () => {
    expect(checkKeyPlacement(sfic7, { ...campus, control: '' }, { bitting: '2428420', parentId: 'aa' })).toEqual([]);
  });
});

describe('checkKeyPlacement against a brute-force oracle (fast-check; every 5-chamber bitting)', () => {
  test('accepts exactly the bittings the primer’s rules allow, under any key of a random tree', () => {
    fc.assert(fc.property(
      systemArb(five), fc.nat(), fc.integer({ min: 1, max: 4 }), fc.constantFrom(1, 2),
      (system, pick, maxAdjacentCut, step) => {
        const profile = { ...five, maxAdjacentCut, step };
        const parentId = (system.keys[pick % system.keys.length] as PlacedKey).id;
        const check = placementChecker(profile, system);
        const wrong: string[] = [];
        for (const b of allBittings(profile)) {
          if ((check({ bitting: text(b), parentId }).length === 0) !== oracle(profile, system, b, parentId)) wrong.push(text(b));
        }
        expect(wrong).toEqual([]);
      },
    ), { numRuns: runs(25) });
  }, 60_000);

  test('every problem names a chamber within the profile, or none for whole-key problems', () => {
    fc.assert(fc.property(systemArb(five), fc.array(fc.integer({ min: 0, max: 4 }), { minLength: 5, maxLength: 5 }), fc.nat(), (system, b, pick) => {
      const parentId = (system.keys[pick % system.keys.length] as PlacedKey).id;
      for (const p of checkKeyPlacement(five, system, { bitting: text(b), parentId })) {
        if (p.code.startsWith('placement-equals')) expect(p.chamber).toBeUndefined();
        else expect(p.chamber).toBeGreaterThanOrEqual(1);
        expect(p.chamber ?? 1).toBeLessThanOrEqual(p.code === 'macs-exceeded' ? 4 : 5); // MACS names the left chamber of a pair
        expect(p.message).not.toContain(text(b)); // messages never repeat a bitting (restricted material)
      }
    }), { numRuns: runs(200) });
  });
});
