import { describe, expect, test } from 'vitest';
import { progressKeys } from './progressKeys';
import type { PlacementSystem } from './placement';
import { builtInProfiles } from './profiles';
import { allBittings, text } from './testing/arbitraries';
import type { Profile } from './types';

/*
 * Progression where the chambers do not all offer the same number of depths: a profile cut
 * 0..8 in steps of 2 gives an even master cut four other depths and an odd one three. The
 * oracle is brute force over every bitting (the keying primer's rules for total position and
 * rotating constant progression).
 */
const sfic6 = builtInProfiles['sfic-6'] as Profile;
const five: Profile = { ...sfic6, chambers: 5, maxDepth: 8, maxAdjacentCut: 8 };

function bruteForce(profile: Profile, top: number[], progress: number[], constants: number | null): Set<string> {
  const out = new Set<string>();
  for (const b of allBittings(profile)) {
    let same = 0;
    const ok = b.every((d, i) => {
      if (!progress.includes(i + 1)) return d === top[i];
      if (d === top[i]) return ++same > 0;
      return (d - (top[i] as number)) % profile.step === 0;
    });
    if (ok && same === (constants ?? 0)) out.add(text(b));
  }
  return out;
}

describe('progression over chambers with different numbers of depths (brute force)', () => {
  const top = [1, 2, 3, 4, 6];

  test('rotating constant: every pattern gives all its keys, the longest pattern included', () => {
    for (const constants of [1, 2]) {
      const keys = progressKeys(five, { topMaster: text(top), progress: [1, 2, 3], method: 'rotating-constant', constants });
      expect(keys.length).toBe(new Set(keys).size);
      expect(new Set(keys)).toEqual(bruteForce(five, top, [1, 2, 3], constants));
    }
  });

  test('total position: every key, the first progressed chamber changing slowest', () => {
    const keys = progressKeys(five, { topMaster: text(top), progress: [1, 2] });
    expect(new Set(keys)).toEqual(bruteForce(five, top, [1, 2], null));
    expect(keys).toEqual([...keys].sort());
    expect(keys).toHaveLength(3 * 4);
  });

  test('the chambers may be given in any order and more than once: the keys and their order are the same', () => {
    const plain = progressKeys(five, { topMaster: text(top), progress: [2, 4] });
    expect(progressKeys(five, { topMaster: text(top), progress: [4, 2, 4] })).toEqual(plain);
    const rotating = progressKeys(five, { topMaster: text(top), progress: [1, 2, 3], method: 'rotating-constant' });
    expect(progressKeys(five, { topMaster: text(top), progress: [3, 1, 2, 1], method: 'rotating-constant' })).toEqual(rotating);
  });
});

describe('progress-held names every chamber the master holds', () => {
  const system: PlacementSystem = {
    control: '135791',
    topMasterId: 'a',
    keys: [
      { id: 'a', symbol: 'A', bitting: '246802', parentId: null },
      { id: 'ab', symbol: 'AB', bitting: '466802', parentId: 'a' },
    ],
  };
  test('two held chambers: "them"', () => {
    expect(() => progressKeys(sfic6, { topMaster: '466802', progress: [2, 1, 6], placement: { system, parentId: 'ab' } }))
      .toThrow(expect.objectContaining({ code: 'progress-held', chamber: 1, message: 'Chamber 1, 2: the master holds them constant (progressed at a level above), so keys under it may not progress them; choose other chambers.' }));
  });
  test('the chambers it does not hold progress as usual', () => {
    expect(progressKeys(sfic6, { topMaster: '466802', progress: [6], placement: { system, parentId: 'ab' } })).toEqual(['466800', '466804', '466806', '466808']);
  });
});
