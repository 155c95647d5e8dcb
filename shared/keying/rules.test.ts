import { describe, expect, test } from 'vitest';
import { KeyingError } from './errors';
import { builtInProfiles } from './profiles';
import { macsBreak, progressionDepths, sameProgression } from './rules';
import type { Profile } from './types';

const sfic7 = builtInProfiles['sfic-7'] as Profile;
const withStep = (step: number): Profile => ({ ...sfic7, step });

/*
 * The progression and cut rules on their own, checked against arithmetic done by hand
 * (keying primer: two-step progression keeps a position's depths of one parity; MACS is the
 * largest difference allowed between neighbouring cuts).
 */
describe('sameProgression: depths a and b share a position when a ≡ b (mod step) (keying primer)', () => {
  test('two-step: same parity only, in either order', () => {
    expect(sameProgression(withStep(2), 3, 1)).toBe(true);
    expect(sameProgression(withStep(2), 1, 3)).toBe(true);
    expect(sameProgression(withStep(2), 3, 2)).toBe(false);
  });

  test('three-step: the difference decides, not the sum (4 − 1 = 3, 4 + 1 = 5) (by hand)', () => {
    expect(sameProgression(withStep(3), 4, 1)).toBe(true);
    expect(sameProgression(withStep(3), 5, 1)).toBe(false);
  });

  test('one-step, or no step at all, lets every depth share a position (common practice)', () => {
    expect(sameProgression(withStep(1), 4, 1)).toBe(true);
    expect(sameProgression(withStep(0), 4, 1)).toBe(true);
  });

  test('progressionDepths lists the other depths of the same progression in order (by hand, depths 0..9)', () => {
    expect(progressionDepths(withStep(2), 4)).toEqual([0, 2, 6, 8]);
    expect(progressionDepths(withStep(3), 4)).toEqual([1, 7]);
    expect(progressionDepths(withStep(1), 0)).toEqual([1, 2, 3, 4, 5, 6, 7, 8, 9]);
  });
});

describe('macsBreak: the first neighbouring pair over the MACS (keying primer)', () => {
  test('index of the left cut, or −1 (by hand, MACS 7)', () => {
    expect(macsBreak({ ...sfic7, maxAdjacentCut: 7 }, [0, 7, 0, 8])).toBe(2);
    expect(macsBreak({ ...sfic7, maxAdjacentCut: 7 }, [0, 7, 0, 7])).toBe(-1);
  });
});

describe('KeyingError', () => {
  test('carries its code, and the chamber it was given (common practice)', () => {
    const plain = new KeyingError('bitting-length', 'six cuts expected');
    expect(plain.code).toBe('bitting-length');
    expect(plain.chamber).toBeUndefined();
    const located = new KeyingError('bitting-length', 'six cuts expected', 3);
    expect(located.chamber).toBe(3);
  });
});
