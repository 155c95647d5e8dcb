import { describe, expect, test } from 'vitest';
import { pinCore } from './pinCore';
import { builtInProfiles } from './profiles';
import { smallKit } from './testing/arbitraries';
import type { Profile } from './types';

/*
 * pinCore's edges, worked out by hand on cores of our own (formulas from the keying
 * primer, common practice: bottom = shallowest depth, build-up = control + sleeve −
 * deepest, top = stack − control − sleeve; a two-wafer seam at height h meets the control
 * line of depth h − sleeve).
 */
const sfic6 = builtInProfiles['sfic-6'] as Profile;
const sfic7 = builtInProfiles['sfic-7'] as Profile;
const kit6 = smallKit(sfic6);

// First in the file on purpose: the largest core of these tests, pinned before any other.
describe('a core with many operating keys (cross-keyed cores, common practice)', () => {
  test('ten keys on seven chambers: each chamber holds exactly the distinct depths of the keys there (brute force)', () => {
    const keys = ['4444444', '0444444', '2444444', '6444444', '8444444', '4044444', '4244444', '4644444', '4844444', '4404444'];
    const pinning = pinCore(sfic7, { operating: keys, control: '7777777' });
    expect(pinning.issues.filter((i) => i.severity === 'error')).toEqual([]);
    const expected = [0, 1, 2, 3, 4, 5, 6].map((c) => [...new Set(keys.map((k) => Number(k[c])))].sort((a, b) => a - b));
    expect(pinning.chambers.map((ch) => ch.depths)).toEqual(expected);
    // Openings: the product of the distinct depths per chamber, 5 × 5 × 2 = 50.
    expect(pinning.openingsCount).toBe(50);
    // The control key's row comes after the ten keys: top pins 13 − 7 = 6 everywhere.
    expect(pinning.chambers.map((ch) => ch.top)).toEqual([6, 6, 6, 6, 6, 6, 6]);
  });
});

describe('unreadable keys other than the operating ones', () => {
  test('an unreadable control key leaves the chart empty, both openings counts 0', () => {
    const pinning = pinCore(sfic6, { operating: ['024680', '224680'], control: '35791' });
    expect(pinning).toMatchObject({ chambers: [], openingsCount: 0, controlOpeningsCount: 0 });
    expect(pinning.issues.map((i) => i.code)).toEqual(['bitting-length']);
  });

  test('an unreadable named top master leaves the chart empty too', () => {
    const pinning = pinCore(sfic6, { operating: ['024680', '224680'], control: '357913', topMaster: '2246x0' });
    expect(pinning).toMatchObject({ chambers: [], openingsCount: 0, controlOpeningsCount: 0 });
    expect(pinning.issues).toStrictEqual([{
      code: 'bitting-not-digit', severity: 'error', chamber: 5,
      message: 'Top master, chamber 5: “x” is not a depth; type one digit per chamber and nothing else.',
    }]);
  });

  test('issue fields are present only when they apply: a control key of the wrong length has neither chamber nor key', () => {
    const [issue] = pinCore(sfic6, { operating: ['024680'], control: '3579' }).issues;
    expect(issue).toStrictEqual({
      code: 'bitting-length', severity: 'error',
      message: 'Control key: the bitting has 4 cuts; SFIC 6-pin, .0125 in steps, stack 23 takes 6, one digit per chamber, chamber 1 first.',
    });
  });

  test('a bitting that is not text at all (a damaged record) is reported, never thrown', () => {
    const damaged = ['0', '2', '4', '6', '8', '0'] as unknown as string;
    const pinning = pinCore(sfic6, { operating: [damaged, '224680'], control: '357913' });
    expect(pinning.chambers).toEqual([]);
    expect(pinning.issues).toStrictEqual([{
      code: 'bitting-length', severity: 'error', key: 0,
      message: 'Operating key 1: the bitting has 0 cuts; SFIC 6-pin, .0125 in steps, stack 23 takes 6, one digit per chamber, chamber 1 first.',
    }]);
  });
});

describe('MACS (keying primer: the profile’s maximum adjacent cut, an error for the key)', () => {
  const macs7: Profile = { ...sfic6, maxAdjacentCut: 7 };

  test('the message gives the difference of the two cuts', () => {
    const pinning = pinCore(macs7, { operating: ['193579', '393579'], control: '535353' });
    expect(pinning.issues.filter((i) => i.code === 'macs-exceeded')).toStrictEqual([{
      code: 'macs-exceeded', severity: 'error', chamber: 1, key: 0,
      message: 'Operating key 1: cuts 1 and 9 in chambers 1 and 2 differ by 8, more than the 7 this profile allows — the key cannot be cut; change one of those cuts.',
    }]);
  });

  test('a control key breaking it: the issue names no operating key', () => {
    const pinning = pinCore(macs7, { operating: ['224466', '024466'], control: '191357' });
    expect(pinning.issues.filter((i) => i.code === 'macs-exceeded')).toStrictEqual([{
      code: 'macs-exceeded', severity: 'error', chamber: 1,
      message: 'Control key: cuts 1 and 9 in chambers 1 and 2 differ by 8, more than the 7 this profile allows — the key cannot be cut; change one of those cuts.',
    }]);
  });

  test('only neighbouring cuts of one key are compared, never the last cut of one key with the first of the next', () => {
    const macs2: Profile = { ...sfic6, maxAdjacentCut: 2 };
    // Every key is flat: no two neighbouring cuts differ at all.
    const pinning = pinCore(macs2, { operating: ['000000', '444444'], control: '222222' });
    expect(pinning.issues).toEqual([]);
    expect(pinCore(macs2, { operating: ['888888', '444444', '000000'], control: '666666' }).issues.filter((i) => i.severity === 'error')).toEqual([]);
  });
});

describe('a key listed twice is reported once, under its first place in the list', () => {
  const macs7: Profile = { ...sfic6, maxAdjacentCut: 7 };

  test('MACS', () => {
    const pinning = pinCore(macs7, { operating: ['224466', '193579', '393579', '193579'], control: '535353' });
    expect(pinning.issues.filter((i) => i.code === 'macs-exceeded').map((i) => i.key)).toEqual([1]);
  });

  test('a key cut like the control key', () => {
    const pinning = pinCore(sfic6, { operating: ['357913', '224680', '357913'], control: '357913' });
    expect(pinning.issues.filter((i) => i.code === 'control-equals-operating').map((i) => i.key)).toEqual([0]);
  });

  test('parity against a named top master', () => {
    const pinning = pinCore(sfic6, { operating: ['224680', '254680', '254680'], control: '557913', topMaster: '224680' });
    expect(pinning.issues.filter((i) => i.code === 'key-parity').map((i) => [i.key, i.chamber])).toEqual([[1, 2]]);
  });
});

describe('the control-openings warning, worked out by hand (a kit of wafers 2..10, common practice)', () => {
  /*
   * Change key 000222, master 222222 (the top master), control 654000. Chambers 1..3 hold
   * depths 0 and 2 and need build-ups of 6 + 10 − 2 = 14, 13 and 12 units: two wafers each.
   * A 10 + x split seams at 2 + 10 = 12, the control line of depth 2, an operating depth, so
   * the splits are 9 + 5, 9 + 4 and 9 + 3, each seamed at 2 + 9 = 11: the control line of
   * depth 1. Each of those chambers releases for two depths (the control cut and 1):
   * 2 × 2 × 2 = 8 bittings. Chambers 4..6 take one 8-unit wafer.
   */
  test('three chambers named with their seams, the wafer sizes to stock ascending', () => {
    const pinning = pinCore(kit6, { operating: ['000222', '222222'], control: '654000' });
    expect(pinning.chambers.map((ch) => ch.buildUp)).toEqual([[9, 5], [9, 4], [9, 3], [8], [8], [8]]);
    expect(pinning.controlOpeningsCount).toBe(8);
    expect(pinning.issues).toStrictEqual([{
      code: 'control-opens-more', severity: 'warning', chamber: 1,
      message: 'The core releases for 8 bittings, not only the control key: chamber 1 (build-up 9 + 5: its seam meets the control line of depth 1), chamber 2 (build-up 9 + 4: its seam meets the control line of depth 1) and chamber 3 (build-up 9 + 3: its seam meets the control line of depth 1) — stock wafers of 12, 13 and 14 units so each build-up is one part, or choose a control cut there closer to the deepest operating cut so one stocked wafer makes the build-up.',
    }]);
  });
});

describe('no state carries over from one chart to the next (common practice for a function called in batches)', () => {
  test('a six-chamber chart right after a chart of three keys names only its own six chambers', () => {
    // The earlier chart's third key starts with a 3, as the later control key does.
    pinCore(sfic6, { operating: ['111111', '222222', '333333'], control: '555555' });
    const later = pinCore(sfic6, { operating: ['024680'], control: '357913' });
    expect(later.issues).toEqual([]);
    expect(later.chambers.map((ch) => ch.chamber)).toEqual([1, 2, 3, 4, 5, 6]);
  });
});

describe('a build-up thinner than the profile allows (keying primer: smallest wafer)', () => {
  test('one unit: the chart still shows the 1-unit build-up, and the message says "1 unit" and the control cut that fixes it', () => {
    // Chamber 1: depth 9 under control 0, so 0 + 10 − 9 = 1 unit; 9 + 2 − 10 = 1 is the shallowest control cut that leaves 2.
    // A profile object of its own, so its chambers are computed here and not taken from another test's cache.
    const pinning = pinCore({ ...sfic6 }, { operating: ['999999'], control: '099999' });
    expect(pinning.chambers[0]?.buildUp).toEqual([1]);
    expect(pinning.issues.filter((i) => i.code === 'wafer-too-thin')).toStrictEqual([{
      code: 'wafer-too-thin', severity: 'error', chamber: 1,
      message: 'Chamber 1: the build-up would be 1 unit (control 0 + sleeve 10 − deepest cut 9), thinner than the 2-unit minimum — choose a control cut of 1 or deeper in chamber 1, or a shallower deepest operating cut.',
    }]);
  });

  test('two units under a 3-unit minimum: "2 units"', () => {
    // 1 + 10 − 9 = 2 units; 9 + 3 − 10 = 2 is the shallowest control cut that leaves 3.
    const pinning = pinCore({ ...sfic6, minWaferUnits: 3 }, { operating: ['999999'], control: '199999' });
    expect(pinning.issues.filter((i) => i.code === 'wafer-too-thin').map((i) => i.message)).toEqual([
      'Chamber 1: the build-up would be 2 units (control 1 + sleeve 10 − deepest cut 9), thinner than the 3-unit minimum — choose a control cut of 2 or deeper in chamber 1, or a shallower deepest operating cut.',
    ]);
  });

  test('a build-up no stocked wafers can make stays on the chart as the size needed', () => {
    // Wafers 2..4 only: 9 + 10 − 0 = 19 units cannot be one wafer or two.
    const pinning = pinCore({ ...sfic6, wafers: [2, 3, 4] }, { operating: ['000000'], control: '999999' });
    expect(pinning.chambers.map((ch) => ch.buildUp)).toEqual(Array(6).fill([19]));
    expect(pinning.issues.filter((i) => i.code === 'size-not-stocked').map((i) => i.chamber)).toEqual([1, 2, 3, 4, 5, 6]);
  });
});
