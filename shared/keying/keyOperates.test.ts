import { describe, expect, test } from 'vitest';
import { keyOperates } from './keyOperates';
import { pinCore } from './pinCore';
import { builtInProfiles } from './profiles';
import { smallKit } from './testing/arbitraries';
import type { CorePinning, Profile } from './types';

const sfic7 = builtInProfiles['sfic-7'] as Profile;

// Worked examples of our own, on the primer's example core: change 2s, master 6s, control 4s.
describe('keyOperates', () => {
  // Pinned inside each test, so every test that reads the chart also runs pinCore (mutation testing counts it).
  const pinning = (): CorePinning => pinCore(sfic7, { operating: ['2222222', '6666666'], control: '4444444' });

  test.each([
    ['change key', '2222222', true, false],
    ['master key', '6666666', true, false],
    ['an incidental mix of the two', '2626266', true, false],
    ['control key', '4444444', false, true],
    ['a key off by one chamber', '2222224', false, false],
    ['a stranger', '1357913', false, false],
  ])('%s %s: plug %s, control %s', (_, bitting, plug, control) => {
    expect(keyOperates(pinning(), sfic7, bitting)).toEqual({ plug, control });
  });

  test('takes depths already read', () => {
    expect(keyOperates(pinning(), sfic7, [6, 2, 6, 2, 6, 2, 6])).toEqual({ plug: true, control: false });
  });

  test('an unreadable bitting throws, as parseBitting does', () => {
    expect(() => keyOperates(pinning(), sfic7, '22')).toThrow(expect.objectContaining({ code: 'bitting-length' }));
  });

  test('a pinning without chambers turns nothing', () => {
    const empty = pinCore(sfic7, { operating: [], control: '4444444' });
    expect(keyOperates(empty, sfic7, '2222222')).toEqual({ plug: false, control: false });
  });

  test('a two-wafer seam is a break like any other: it can line up the control line', () => {
    // A kit of wafers 2..10. All 0s under control 2s: build-ups 10 + 2, seam at 10 = 0 + sleeve.
    const kit7 = smallKit(sfic7);
    const seamed = pinCore(kit7, { operating: ['0000000'], control: '2222222' });
    expect(keyOperates(seamed, kit7, '0000000')).toEqual({ plug: true, control: true });
    // ...but never the operating line: no depth 0..9 reaches a seam at 10.
    expect(keyOperates(seamed, kit7, '9999999').plug).toBe(false);
  });
});
