import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import { progressKeys } from './progressKeys';
import type { PlacementSystem } from './placement';
import { builtInProfiles } from './profiles';
import { allBittings, runs, text } from './testing/arbitraries';
import type { Profile } from './types';

const sfic6 = builtInProfiles['sfic-6'] as Profile;
const sfic7 = builtInProfiles['sfic-7'] as Profile;

describe('progressKeys: published and derived counts', () => {
  // Two-step total position progression of 6 positions, depths 0..9: 4 depths per position
  // besides the top master's, 4^6 = 4,096 (Locksmith Ledger, "The Concepts and Mechanics
  // of Master Keying", Dec 2004).
  test('4^6 = 4,096 change keys for six progressed positions', () => {
    expect(progressKeys(sfic6, { topMaster: '246802', progress: [1, 2, 3, 4, 5, 6] })).toHaveLength(4096);
  });

  // The same rule over 7 positions: 4^7 = 16,384 (our arithmetic from the rule above).
  test('4^7 = 16,384 for seven', () => {
    const keys = progressKeys(sfic7, { topMaster: '1357913', progress: [1, 2, 3, 4, 5, 6, 7] });
    expect(keys).toHaveLength(16384);
    expect(new Set(keys).size).toBe(16384);
  });
});

describe('progressKeys: worked examples of our own', () => {
  test('ascending, last progressed chamber fastest; other chambers keep the top master', () => {
    const keys = progressKeys(sfic6, { topMaster: '246802', progress: [5, 6] });
    expect(keys.slice(0, 5)).toEqual(['246820', '246824', '246826', '246828', '246840']);
    expect(keys).toHaveLength(16);
    expect(keys.every((k) => k.startsWith('2468'))).toBe(true);
  });

  test('drops the control key and keys that break the maximum adjacent cut', () => {
    const all = progressKeys(sfic6, { topMaster: '246802', progress: [5, 6] });
    const noControl = progressKeys(sfic6, { topMaster: '246802', progress: [5, 6], control: '246824' });
    expect(noControl).toEqual(all.filter((k) => k !== '246824'));
    expect(noControl).toHaveLength(15);
    // MACS 5: chamber 5 sits between an 8 and a 2, so of 2, 4, 6, 8 only 4 and 6 are cuttable.
    const macs5 = progressKeys({ ...sfic6, maxAdjacentCut: 5 }, { topMaster: '246802', progress: [5] });
    expect(macs5).toEqual(['246842', '246862']);
  });

  test('limit caps the count, and the order is deterministic', () => {
    const opts = { topMaster: '1357913', progress: [7, 3, 3, 5] };
    const limited = progressKeys(sfic7, { ...opts, limit: 10 });
    expect(limited).toEqual(progressKeys(sfic7, opts).slice(0, 10));
    expect(progressKeys(sfic7, { ...opts, limit: 0 })).toEqual([]);
  });

  test('a one-step profile progresses through every other depth', () => {
    expect(progressKeys({ ...sfic6, step: 1 }, { topMaster: '246802', progress: [1] })).toHaveLength(9);
  });

  test('no progressed chamber, no change keys', () => {
    expect(progressKeys(sfic6, { topMaster: '246802', progress: [] })).toEqual([]);
  });
});

describe('progressKeys: bad input', () => {
  test.each([
    [{ topMaster: '246802', progress: [7] }, 'progress-chamber', 'Chamber 7 is not on this core; choose chambers 1 to 6 to progress.'],
    [{ topMaster: '246802', progress: [1], limit: -1 }, 'progress-limit', 'The limit is -1; give a whole number of keys, 0 or more.'],
    [{ topMaster: '24680', progress: [1] }, 'bitting-length', 'The bitting has 5 cuts; SFIC 6-pin, .0125 in steps, stack 23 takes 6, one digit per chamber, chamber 1 first.'],
  ])('%j → %s', (opts, code, message) => {
    expect(() => progressKeys(sfic6, opts)).toThrow(expect.objectContaining({ code, message }));
  });

  test('progress-too-large without a limit; fine with one', () => {
    const big: Profile = { ...sfic7, chambers: 8, step: 1 };
    const opts = { topMaster: '12345678', progress: [1, 2, 3, 4, 5, 6, 7, 8] };
    expect(() => progressKeys(big, opts)).toThrow(expect.objectContaining({
      code: 'progress-too-large',
      message: 'Progressing chambers 1, 2, 3, 4, 5, 6, 7, 8 gives 43,046,721 keys; set a limit of at most 1,000,000.',
    }));
    expect(progressKeys(big, { ...opts, limit: 3 })).toHaveLength(3);
  });
});

describe('progressKeys: brute force over every 5-chamber bitting', () => {
  // fast-check picks the top master, the progressed chambers, MACS and step; brute force
  // keeps every bitting that differs from the top master in exactly the progressed
  // chambers, by a multiple of the step, within MACS.
  const five: Profile = { ...sfic6, chambers: 5 };
  test('progressKeys lists exactly the bittings the rule allows, in ascending order', () => {
    fc.assert(fc.property(
      fc.array(fc.integer({ min: 0, max: 9 }), { minLength: 5, maxLength: 5 }),
      fc.subarray([1, 2, 3, 4, 5], { minLength: 1 }),
      fc.integer({ min: 4, max: 9 }),
      fc.constantFrom(1, 2),
      (top, progress, maxAdjacentCut, step) => {
        const profile = { ...five, maxAdjacentCut, step };
        const expected: string[] = [];
        for (const b of allBittings(profile)) {
          const ok = b.every((d, i) =>
            progress.includes(i + 1) ? d !== top[i] && (d - (top[i] as number)) % step === 0 : d === top[i]);
          const macs = b.every((d, i) => i === 0 || Math.abs(d - (b[i - 1] as number)) <= maxAdjacentCut);
          if (ok && macs) expected.push(text(b));
        }
        expect(progressKeys(profile, { topMaster: text(top), progress })).toEqual(expected);
      },
    ), { numRuns: runs(25) });
  });
});

describe('progressKeys: rotating constant, worked examples of our own (keying primer, "Progression")', () => {
  test('one constant per key, rotating key to key: the constant chamber cycles 4, 5, 6', () => {
    const keys = progressKeys(sfic6, { topMaster: '246802', progress: [4, 5, 6], method: 'rotating-constant' });
    // 3 ways to choose the constant chamber, 4 x 4 depths for the other two: 48 keys.
    expect(keys).toHaveLength(48);
    expect(new Set(keys).size).toBe(48);
    // By hand: chamber 4 (8) takes 0 2 4 6, chamber 5 (0) takes 2 4 6 8, chamber 6 (2) takes 0 4 6 8;
    // the free chambers count up like an odometer, last chamber fastest.
    expect(keys.slice(0, 6)).toEqual(['246820', '246000', '246022', '246824', '246004', '246042']);
    const constantAt = (k: string) => [3, 4, 5].filter((i) => k[i] === '246802'[i]).map((i) => i + 1);
    expect(keys.slice(0, 6).map(constantAt)).toEqual([[4], [5], [6], [4], [5], [6]]);
    expect(keys.every((k) => k.startsWith('246') && constantAt(k).length === 1)).toBe(true);
  });

  test('two constants of four progressed chambers: C(4,2) = 6 patterns of 4 x 4 keys', () => {
    const keys = progressKeys(sfic6, { topMaster: '246802', progress: [3, 4, 5, 6], method: 'rotating-constant', constants: 2 });
    expect(keys).toHaveLength(6 * 16);
    expect(keys.every((k) => [2, 3, 4, 5].filter((i) => k[i] === '246802'[i]).length === 2)).toBe(true);
  });

  test.each([[0], [3], [1.5]])('constants %s of 3 progressed chambers is refused (progress-constants)', (constants) => {
    expect(() => progressKeys(sfic6, { topMaster: '246802', progress: [4, 5, 6], method: 'rotating-constant', constants }))
      .toThrow(expect.objectContaining({ code: 'progress-constants' }));
  });

  test('limit and the control key apply as for total position progression', () => {
    const all = progressKeys(sfic6, { topMaster: '246802', progress: [4, 5, 6], method: 'rotating-constant' });
    expect(progressKeys(sfic6, { topMaster: '246802', progress: [4, 5, 6], method: 'rotating-constant', limit: 5 })).toEqual(all.slice(0, 5));
    expect(progressKeys(sfic6, { topMaster: '246802', progress: [4, 5, 6], method: 'rotating-constant', control: '246042' })).toEqual(all.filter((k) => k !== '246042'));
  });
});

describe('progressKeys inside a system: the hierarchy rules (keying primer, "A key under a master keeps its master’s constant positions")', () => {
  const system: PlacementSystem = {
    control: '135791',
    topMasterId: 'a',
    keys: [
      { id: 'a', symbol: 'A', bitting: '246802', parentId: null },
      { id: 'aa', symbol: 'AA', bitting: '446802', parentId: 'a' },
      { id: 'aa1', symbol: 'AA1', bitting: '446800', parentId: 'aa' },
    ],
  };
  test('a chamber the master holds constant may not be progressed: progress-held names it', () => {
    expect(() => progressKeys(sfic6, { topMaster: '446802', progress: [1, 6], placement: { system, parentId: 'aa' } }))
      .toThrow(expect.objectContaining({ code: 'progress-held', chamber: 1, message: 'Chamber 1: the master holds it constant (progressed at a level above), so keys under it may not progress it; choose other chambers.' }));
  });

  test('keys already in the system are left out, and so is the control key', () => {
    const keys = progressKeys(sfic6, { topMaster: '446802', progress: [6], placement: { system, parentId: 'aa' } });
    expect(keys).toEqual(['446804', '446806', '446808']); // 446800 is AA1
    const withControl = progressKeys(sfic6, { topMaster: '446802', progress: [6], placement: { system: { ...system, control: '446806' }, parentId: 'aa' } });
    expect(withControl).toEqual(['446804', '446808']);
  });
});

describe('progressKeys: rotating constant against brute force (fast-check; every bitting of a 5-chamber profile)', () => {
  // Brute force keeps every bitting that equals the top master outside the progressed
  // chambers, equals it in exactly `constants` of them, differs by a multiple of the step
  // in the rest, and stays within MACS; the result must be exactly that set, and the
  // first keys must cycle through different constant chambers.
  const five: Profile = { ...sfic6, chambers: 5 };
  test('lists exactly the bittings the rule allows, each once, rotating the constant', () => {
    fc.assert(fc.property(
      fc.array(fc.integer({ min: 0, max: 9 }), { minLength: 5, maxLength: 5 }),
      fc.subarray([1, 2, 3, 4, 5], { minLength: 2, maxLength: 4 }),
      fc.integer({ min: 0, max: 3 }),
      fc.integer({ min: 4, max: 9 }),
      fc.constantFrom(1, 2),
      (top, progress, extra, maxAdjacentCut, step) => {
        const constants = 1 + (extra % (progress.length - 1));
        const profile = { ...five, maxAdjacentCut, step };
        const expected = new Set<string>();
        for (const b of allBittings(profile)) {
          let same = 0;
          const ok = b.every((d, i) => {
            if (!progress.includes(i + 1)) return d === top[i];
            if (d === top[i]) return ++same > 0;
            return (d - (top[i] as number)) % step === 0;
          });
          const macs = b.every((d, i) => i === 0 || Math.abs(d - (b[i - 1] as number)) <= maxAdjacentCut);
          if (ok && macs && same === constants) expected.add(text(b));
        }
        const keys = progressKeys(profile, { topMaster: text(top), progress, method: 'rotating-constant', constants });
        expect(keys.length).toBe(new Set(keys).size);
        expect(new Set(keys)).toEqual(expected);
      },
    ), { numRuns: runs(40) });
  });

  test('without MACS in the way, consecutive keys keep different chambers constant until every choice has had a turn', () => {
    fc.assert(fc.property(
      fc.array(fc.integer({ min: 0, max: 9 }), { minLength: 5, maxLength: 5 }),
      fc.subarray([1, 2, 3, 4, 5], { minLength: 2, maxLength: 5 }),
      (top, progress) => {
        const keys = progressKeys(five, { topMaster: text(top), progress, method: 'rotating-constant' });
        const sorted = [...progress].sort((a, b) => a - b);
        const constantOf = (k: string) => sorted.filter((c) => k[c - 1] === String(top[c - 1]));
        // Each of the n chambers takes the constant in turn, in chamber order.
        expect(keys.slice(0, sorted.length).map(constantOf)).toEqual(sorted.map((c) => [c]));
      },
    ), { numRuns: runs(100) });
  });
});

describe('progressKeys: edges of the options (our own arithmetic)', () => {
  test('rotating constant counts every pattern toward the size check', () => {
    // 8 chambers, one-step: 9 other depths per chamber; one constant of 8 gives 8 x 9^7 = 38,263,752 keys.
    const big: Profile = { ...sfic7, chambers: 8, step: 1 };
    expect(() => progressKeys(big, { topMaster: '12345678', progress: [1, 2, 3, 4, 5, 6, 7, 8], method: 'rotating-constant' }))
      .toThrow(expect.objectContaining({ code: 'progress-too-large', message: 'Progressing chambers 1, 2, 3, 4, 5, 6, 7, 8 gives 38,263,752 keys; set a limit of at most 1,000,000.' }));
    expect(progressKeys(big, { topMaster: '12345678', progress: [1, 2, 3, 4, 5, 6, 7, 8], method: 'rotating-constant', limit: 4 })).toHaveLength(4);
  });

  test('rotating constant over one chamber is refused; over none it makes nothing', () => {
    expect(() => progressKeys(sfic6, { topMaster: '246802', progress: [3], method: 'rotating-constant' }))
      .toThrow(expect.objectContaining({ code: 'progress-constants', message: 'Rotating constant needs at least two chambers to progress (one stays at the master’s cut in each key); choose another chamber.' }));
    expect(() => progressKeys(sfic6, { topMaster: '246802', progress: [3, 4, 5], method: 'rotating-constant', constants: 3 }))
      .toThrow(expect.objectContaining({ code: 'progress-constants', message: 'Rotating constant keeps 3 chambers constant per key, but 3 are progressed; keep 1 to 2, or progress more chambers.' }));
    expect(progressKeys(sfic6, { topMaster: '246802', progress: [], method: 'rotating-constant' })).toEqual([]);
  });

  test('the method left out is total position progression', () => {
    expect(progressKeys(sfic6, { topMaster: '246802', progress: [5, 6], method: 'total-position' }))
      .toEqual(progressKeys(sfic6, { topMaster: '246802', progress: [5, 6] }));
  });

  test('a fractional or out-of-range chamber is refused by name; duplicates count once', () => {
    expect(() => progressKeys(sfic6, { topMaster: '246802', progress: [0] })).toThrow(expect.objectContaining({ code: 'progress-chamber', message: 'Chamber 0 is not on this core; choose chambers 1 to 6 to progress.' }));
    expect(() => progressKeys(sfic6, { topMaster: '246802', progress: [2.5] })).toThrow(expect.objectContaining({ code: 'progress-chamber' }));
    expect(() => progressKeys(sfic6, { topMaster: '246802', progress: [6], limit: 1.5 })).toThrow(expect.objectContaining({ code: 'progress-limit' }));
    expect(progressKeys(sfic6, { topMaster: '246802', progress: [6, 6] })).toHaveLength(4);
  });
});
