import { describe, expect, test } from 'vitest';
import { formatBitting, parseBitting, readBitting } from './bitting';
import { KeyingError } from './errors';
import { builtInProfiles } from './profiles';
import type { Profile } from './types';

const sfic7 = builtInProfiles['sfic-7'] as Profile;

describe('parseBitting', () => {
  // Worked examples of our own: bittings are read chamber 1 first, one digit per chamber.
  test('reads one depth per chamber, chamber 1 first', () => {
    expect(parseBitting(sfic7, '2468024')).toEqual([2, 4, 6, 8, 0, 2, 4]);
  });

  test('ignores spaces around the bitting (pasted from a list)', () => {
    expect(parseBitting(sfic7, ' 2468024\n')).toEqual([2, 4, 6, 8, 0, 2, 4]);
  });

  test('round-trips through formatBitting', () => {
    expect(formatBitting(parseBitting(sfic7, '0918273'))).toBe('0918273');
  });

  test.each([
    ['246802', 'bitting-length', undefined, 'The bitting has 6 cuts; SFIC 7-pin, .0125 in steps, stack 23 takes 7, one digit per chamber, chamber 1 first.'],
    ['', 'bitting-length', undefined, 'The bitting has 0 cuts; SFIC 7-pin, .0125 in steps, stack 23 takes 7, one digit per chamber, chamber 1 first.'],
    ['2', 'bitting-length', undefined, 'The bitting has 1 cut; SFIC 7-pin, .0125 in steps, stack 23 takes 7, one digit per chamber, chamber 1 first.'],
    ['24-8024', 'bitting-not-digit', 3, 'Chamber 3: “-” is not a depth; type one digit per chamber and nothing else.'],
  ])('%j throws %s', (input, code, chamber, message) => {
    const error = (() => {
      try {
        parseBitting(sfic7, input);
      } catch (e) {
        return e;
      }
      return null;
    })();
    expect(error).toBeInstanceOf(KeyingError);
    expect(error).toMatchObject({ code, chamber, message, name: 'KeyingError' });
  });

  test('a depth outside the profile throws depth-out-of-range naming the chamber', () => {
    const shallow: Profile = { ...sfic7, maxDepth: 8 };
    expect(() => parseBitting(shallow, '2468924')).toThrow(
      expect.objectContaining({
        code: 'depth-out-of-range',
        chamber: 5,
        message: 'Chamber 5: depth 9 is outside this profile’s depths 0 to 8; choose a cut within that range.',
      }),
    );
  });

  test('messages never repeat the whole bitting (bitting lists are restricted)', () => {
    const r = readBitting(sfic7, '24680245');
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.message).not.toContain('24680245');
  });
});
