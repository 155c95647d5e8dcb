import { describe, expect, test } from 'vitest';
import { hasErrors } from './errors';
import { pinCore } from './pinCore';
import { builtInProfiles } from './profiles';
import { smallKit } from './testing/arbitraries';
import type { Profile } from './types';

const sfic6 = builtInProfiles['sfic-6'] as Profile;
const kit6 = smallKit(sfic6);
const sfic7 = builtInProfiles['sfic-7'] as Profile;
const same = (d: number, n = 7): string => String(d).repeat(n);

describe('pinCore: the usual .0125 in SFIC formulas', () => {
  // The keying primer's worked example (our own, not from a published table): change 2,
  // master 6, control 4 gives bottom 2, master wafer 4, build-up 8, top 9; total 23.
  test('primer worked example', () => {
    const pinning = pinCore(sfic7, { operating: [same(2), same(6)], control: same(4) });
    expect(pinning.issues).toEqual([]);
    expect(pinning.chambers[0]).toEqual({ chamber: 1, depths: [2, 6], bottom: 2, masters: [4], buildUp: [8], top: 9, total: 23 });
  });

  // top = 13 - control and build-up = control + 10 - deepest operating depth, for stack 23
  // and sleeve 10 (common practice, no source). Table cases are our own.
  test.each([
    // control, change, master, top, buildUp
    [1, 0, 4, 12, [7]],
    [3, 2, 8, 10, [5]],
    [5, 0, 2, 8, [13]], // one wafer: the usual kit stocks 2..19 (see the two-wafer test)
    [9, 1, 3, 4, [16]],
    [6, 4, 8, 7, [8]],
  ])('control %i over depths %i and %i: top %i', (control, change, master, top, buildUp) => {
    const pinning = pinCore(sfic6, { operating: [same(change, 6), same(master, 6)], control: same(control, 6) });
    const ch = pinning.chambers[0];
    expect(ch?.top).toBe(13 - control);
    expect(ch?.top).toBe(top);
    expect(ch?.buildUp.reduce((a, b) => a + b, 0)).toBe(control + 10 - Math.max(change, master));
    expect(ch?.total).toBe(23);
    expect(ch?.buildUp).toEqual(buildUp);
  });

  test('the control shear line sits 10 units above the operating one: build-up top = control + 10', () => {
    const ch = pinCore(sfic7, { operating: ['0246802', '2468024'], control: '3579135' }).chambers;
    for (const c of ch) {
      const buildUpTop = c.bottom + c.masters.reduce((a, b) => a + b, 0) + c.buildUp.reduce((a, b) => a + b, 0);
      expect(buildUpTop).toBe(Number('3579135'[c.chamber - 1]) + 10);
    }
  });
});

describe('pinCore: worked examples of our own', () => {
  test('three keys in one chamber give two master wafers, shallowest first', () => {
    // Change 0, master 4, grand master 8 in chamber 1; all agree elsewhere.
    const pinning = pinCore(sfic6, { operating: ['022222', '422222', '822222'], control: '755555' });
    expect(pinning.chambers[0]).toMatchObject({ depths: [0, 4, 8], bottom: 0, masters: [4, 4], buildUp: [9], top: 6, total: 23 });
    expect(pinning.chambers[1]).toMatchObject({ depths: [2], bottom: 2, masters: [], buildUp: [13], top: 8, total: 23 });
    expect(pinning.openingsCount).toBe(3);
  });

  test('openings count is the product of distinct depths per chamber', () => {
    // Chambers with 2, 2, 3, 1, 1, 1 depths: 2 × 2 × 3 = 12.
    const pinning = pinCore(sfic6, { operating: ['002222', '222222', '224222', '000222'], control: '577777' });
    expect(pinning.chambers.map((c) => c.depths.length)).toEqual([2, 2, 3, 1, 1, 1]);
    expect(pinning.openingsCount).toBe(12);
  });

  test('duplicate operating keys are harmless and reported once', () => {
    const once = pinCore(sfic6, { operating: ['024680', '224680'], control: '357913' });
    const twice = pinCore(sfic6, { operating: ['024680', '224680', '024680'], control: '357913' });
    expect(twice.chambers).toEqual(once.chambers);
    expect(twice.issues).toEqual(once.issues);
  });

  test('a build-up over the largest wafer is made from two, seam kept off the operating depths', () => {
    // A kit of wafers 2..10. Deepest 2, control 7: 15 units. 10 + 5 would put the seam at
    // 12 = 2 + sleeve, so a key cut 2 there would line up the control line; 9 + 6 puts it
    // at 11, the control line of depth 1, which no operating key has there.
    const pinning = pinCore(kit6, { operating: ['022222', '222222'], control: '777777' });
    expect(pinning.chambers[0]?.buildUp).toEqual([9, 6]);
    expect(pinning.chambers[0]?.total).toBe(23);
    expect(hasErrors(pinning)).toBe(false);
  });

  test('the usual kit (wafers 2..19) makes every build-up one wafer: only the control key releases', () => {
    // The primer: "0-9 bottom pins, 2-19 wafers" (common practice); 19 = control 9 + 10 - depth 0.
    const pinning = pinCore(sfic6, { operating: ['000000', '222222'], control: '999999' });
    expect(pinning.chambers.map((c) => c.buildUp)).toEqual(Array(6).fill([17]));
    expect(pinning.controlOpeningsCount).toBe(1);
  });

  test('a build-up of 0 needs no wafer', () => {
    // Control 0 with deepest operating depth... impossible for the usual profile (sleeve 10 > 9),
    // so take a custom profile with sleeve 9 where control 0 over depth 9 meets exactly.
    const tight: Profile = { ...sfic6, sleeveUnits: 9, maxDepth: 9 };
    const pinning = pinCore(tight, { operating: ['999999', '799999'], control: '000000' });
    expect(pinning.chambers[1]?.buildUp).toEqual([]);
    expect(pinning.chambers[1]?.total).toBe(23);
    // The parts add up to the stack, so this is no stack mismatch (keying primer: a mismatch is parts that do not total H).
    expect(pinning.issues.map((i) => i.code)).not.toContain('stack-mismatch');
  });
});

describe('pinCore: warnings', () => {
  test('control key sharing the top master’s depth, one warning per chamber', () => {
    const pinning = pinCore(sfic6, { operating: ['024680', '224680'], control: '235793' });
    expect(pinning.issues).toEqual([
      { code: 'control-shares-top-master', severity: 'warning', chamber: 1, message: 'Chamber 1: the control key has the top master’s depth (2) — the usual advice is a control key that differs from the top master in every chamber.' },
    ]);
    expect(hasErrors(pinning)).toBe(false);
  });

  test('the top master can be named instead of taken as the last operating key', () => {
    const pinning = pinCore(sfic6, { operating: ['224680', '024680'], control: '235793', topMaster: '224680' });
    expect(pinning.issues.map((i) => [i.code, i.chamber])).toEqual([['control-shares-top-master', 1]]);
  });

  test('parity broken under two-step progression', () => {
    const pinning = pinCore(sfic6, { operating: ['024680', '524680'], control: '757913' });
    expect(pinning.issues).toEqual([
      { code: 'parity-broken', severity: 'warning', chamber: 1, message: 'Chamber 1: operating depths 0, 5 mix odd and even — under two-step progression every key keeps the top master’s parity here; recut the key that breaks it.' },
    ]);
  });

  test('parity is not asked of a one-step profile', () => {
    const pinning = pinCore({ ...sfic6, step: 1 }, { operating: ['024680', '524680'], control: '757913' });
    expect(pinning.issues).toEqual([]);
  });

  // Keying primer, MACS: a key that breaks it cannot be cut, so it is an error for that key, never only a warning.
  test('MACS exceeded by an operating key and by the control key is an error that blocks the chart', () => {
    const macs8: Profile = { ...sfic6, maxAdjacentCut: 8 };
    const pinning = pinCore(macs8, { operating: ['094680', '294680'], control: '513579' });
    expect(pinning.issues).toEqual([
      { code: 'macs-exceeded', severity: 'error', chamber: 1, key: 0, message: 'Operating key 1: cuts 0 and 9 in chambers 1 and 2 differ by 9, more than the 8 this profile allows — the key cannot be cut; change one of those cuts.' },
    ]);
    expect(hasErrors(pinning)).toBe(true);
    const control = pinCore(macs8, { operating: ['024680', '224680'], control: '091357' });
    expect(control.issues).toEqual([
      { code: 'macs-exceeded', severity: 'error', chamber: 1, message: 'Control key: cuts 0 and 9 in chambers 1 and 2 differ by 9, more than the 8 this profile allows — the key cannot be cut; change one of those cuts.' },
    ]);
    expect(hasErrors(control)).toBe(true);
    // A difference of exactly the limit is allowed (the limit is the largest difference cut).
    expect(pinCore(macs8, { operating: ['084680', '284680'], control: '513579' }).issues).toEqual([]);
  });

  // Keying primer, "Smallest wafer and parity": every key keeps the top master's parity in each position.
  test('with a named top master every operating key is checked for its parity, the first one too', () => {
    // Operating key 1 (the change key) is odd in chamber 2 where the named top master is even; key 2 is fine.
    const pinning = pinCore(sfic6, { operating: ['054680', '224680'], control: '557913', topMaster: '224680' });
    expect(pinning.issues.filter((i) => i.code === 'key-parity')).toEqual([
      { code: 'key-parity', severity: 'warning', chamber: 2, key: 0, message: 'Operating key 1, chamber 2: cut 5 breaks the top master’s parity there; under 2-step progression every key keeps it — recut this key.' },
    ]);
    // The same keys without a named top master: only the per-chamber warning (no master to compare with).
    expect(pinCore(sfic6, { operating: ['054680', '224680'], control: '557913' }).issues.map((i) => i.code)).toEqual(['parity-broken']);
    // A one-step profile asks no parity (keying primer: parity belongs to two-step progression).
    expect(pinCore({ ...sfic6, step: 1 }, { operating: ['054680', '224680'], control: '557913', topMaster: '224680' }).issues).toEqual([]);
  });

  test('more bittings than the control key release: a warning naming the chambers, the seam and the stock that fixes it', () => {
    // A kit of wafers 2..10 (our own example). Chambers 1 and 2 need 12 units over depth 0:
    // 10 + 2, seam at the control line of depth 0; each of those chambers releases for 0 and 2.
    const seamed = pinCore(kit6, { operating: ['004466', '006666'], control: '224444' });
    expect(seamed.chambers.slice(0, 2).map((c) => c.buildUp)).toEqual([[10, 2], [10, 2]]);
    expect(seamed.controlOpeningsCount).toBe(4);
    expect(seamed.issues).toContainEqual({
      code: 'control-opens-more', severity: 'warning', chamber: 1,
      message: 'The core releases for 4 bittings, not only the control key: chamber 1 (build-up 10 + 2: its seam meets the control line of depth 0) and chamber 2 (build-up 10 + 2: its seam meets the control line of depth 0) — stock a wafer of 12 units so each build-up is one part, or choose a control cut there closer to the deepest operating cut so one stocked wafer makes the build-up.',
    });
    expect(hasErrors(seamed)).toBe(false);
  });

  test('messages name operating keys by symbol when the caller gives symbols', () => {
    const macs8: Profile = { ...sfic6, maxAdjacentCut: 8 };
    const pinning = pinCore(macs8, { operating: ['294680', '094680'], control: '513579', symbols: ['AA1', 'AA'] });
    expect(pinning.issues.find((i) => i.code === 'macs-exceeded')?.message).toMatch(/^Key AA: cuts 0 and 9/);
    const bad = pinCore(sfic6, { operating: ['24680', '024680'], control: '513579', symbols: ['AA1', 'AA'] });
    expect(bad.issues[0]?.message).toMatch(/^Key AA1: the bitting has 5 cuts/);
  });
});

describe('pinCore on the smallest and largest cores (5 and 8 chambers)', () => {
  // The primer's formulas per chamber: bottom = change depth, master wafer = master - change,
  // build-up = control + 10 - master, top = 13 - control (stack 23, sleeve 10; common practice).
  test.each([5, 8])('%i chambers: every chamber follows the formulas, the last one too', (chambers) => {
    const profile: Profile = { ...sfic6, chambers };
    const change = [0, 2, 4, 6, 8, 0, 2, 4].slice(0, chambers);
    const master = [4, 6, 8, 8, 8, 2, 4, 6].slice(0, chambers);
    const control = [1, 3, 5, 7, 9, 1, 3, 5].slice(0, chambers);
    const pinning = pinCore(profile, { operating: [change.join(''), master.join('')], control: control.join('') });
    expect(pinning.issues.filter((i) => i.severity === 'error')).toEqual([]);
    expect(pinning.chambers).toHaveLength(chambers);
    pinning.chambers.forEach((ch, i) => {
      const c = control[i]!;
      expect(ch.chamber).toBe(i + 1);
      expect(ch.bottom).toBe(change[i]);
      expect(ch.masters).toEqual(master[i] === change[i] ? [] : [master[i]! - change[i]!]);
      expect(ch.buildUp.reduce((a, b) => a + b, 0)).toBe(c + 10 - master[i]!);
      expect(ch.top).toBe(13 - c);
      expect(ch.total).toBe(23);
    });
    expect(pinning.openingsCount).toBe(2 ** master.filter((m, i) => m !== change[i]).length);
  });
});

