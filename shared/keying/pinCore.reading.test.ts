import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import { readBitting } from './bitting';
import { pinCore } from './pinCore';
import { builtInProfiles } from './profiles';
import { runs } from './testing/arbitraries';
import type { Profile } from './types';

/*
 * pinCore reads bittings with its own allocation-free reader; readBitting is the engine's
 * reference reader (String.prototype.trim, then one digit per chamber). The two must
 * accept exactly the same texts (common practice: two readers of one format agree).
 * Blanks are the ECMAScript WhiteSpace and LineTerminator code points String.prototype.trim
 * removes (ECMA-262, "String.prototype.trim"): tab, line feed, space, no-break space,
 * em space, line separator, byte order mark.
 */
const sfic6 = builtInProfiles['sfic-6'] as Profile;
/** A profile whose depths are 2..7 (a custom profile), so digits outside it are refused. */
const narrow: Profile = { ...sfic6, id: 'narrow', minDepth: 2, maxDepth: 7 };
const blanks = ['\t', '\n', ' ', '\u00a0', '\u2003', '\u2028', '\ufeff'];
const control = '777777';

function readsLike(profile: Profile, bitting: string): void {
  const reading = readBitting(profile, bitting);
  const pinning = pinCore(profile, { operating: [bitting], control });
  if (reading.ok) {
    // Read: a chart whose chambers hold the key's depths (a single key: bottom pin = its depth).
    expect(pinning.chambers.map((ch) => ch.bottom), JSON.stringify(bitting)).toEqual(reading.depths);
  } else {
    expect(pinning.chambers, JSON.stringify(bitting)).toEqual([]);
    expect(pinning.issues.map((i) => i.code)).toContain(reading.code);
  }
}

describe('pinCore reads a bitting exactly as readBitting does', () => {
  test('blanks around a bitting are ignored, on either side, whichever blank (ECMA-262 trim)', () => {
    for (const b of blanks) {
      for (const text of [`${b}246802`, `246802${b}`, `${b}${b}246802${b}`]) {
        readsLike(sfic6, text);
        expect(pinCore(sfic6, { operating: [text], control }).chambers.map((ch) => ch.bottom)).toEqual([2, 4, 6, 8, 0, 2]);
      }
    }
  });

  test('a blank inside the bitting, or a character just past the printable range, is refused', () => {
    for (const text of ['246 802', '2468\u00a002', '24680~', '~24680', '24680\u007f', '\u007f24680', '24680\u0080']) {
      readsLike(sfic6, text);
      expect(pinCore(sfic6, { operating: [text], control }).chambers).toEqual([]);
    }
  });

  test('the characters either side of the digits, and depths outside a custom profile, are refused', () => {
    // '/' and ':' are the code points just below '0' and just above '9'.
    for (const text of ['/24680', '24680:', '123456', '234568', '734562', '277777', '777772']) readsLike(narrow, text);
    expect(pinCore(narrow, { operating: ['277777'], control }).chambers.length).toBe(6);
    expect(pinCore(narrow, { operating: ['177777'], control }).chambers).toEqual([]);
    expect(pinCore(narrow, { operating: ['777778'], control }).chambers).toEqual([]);
  });

  test('the control key and a named top master are read the same way', () => {
    const padded = pinCore(sfic6, { operating: ['246802'], control: `\u00a0${control}\n`, topMaster: '\t246802 ' });
    expect(padded.chambers.map((ch) => ch.top)).toEqual([6, 6, 6, 6, 6, 6]);
    expect(padded.issues.filter((i) => i.severity === 'error')).toEqual([]);
  });

  test('any text of digits, blanks and other characters (fast-check): accepted and read alike', () => {
    const char = fc.oneof(
      fc.constantFrom('0', '2', '4', '5', '7', '9', ...blanks, 'x', '/', ':', '~', '\u007f', '\u00e9'),
      fc.string({ maxLength: 1 }),
    );
    const text = fc.oneof(
      fc.array(char, { maxLength: 9 }).map((cs) => cs.join('')),
      fc.tuple(fc.array(fc.constantFrom(...blanks), { maxLength: 2 }), fc.array(fc.integer({ min: 0, max: 9 }), { minLength: 5, maxLength: 7 }), fc.array(fc.constantFrom(...blanks), { maxLength: 2 }))
        .map(([a, d, b]) => `${a.join('')}${d.join('')}${b.join('')}`),
    );
    fc.assert(fc.property(fc.constantFrom(sfic6, narrow), text, (profile, bitting) => readsLike(profile, bitting)), { numRuns: runs(400) });
  });
});
