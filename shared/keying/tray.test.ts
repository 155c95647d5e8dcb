import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import { pinCore } from './pinCore';
import { builtInProfiles } from './profiles';
import { keyedCore, text, usualProfile } from './testing/arbitraries';
import { partKinds, trayFor, type SizeCount } from './tray';
import type { Profile } from './types';

const sfic6 = builtInProfiles['sfic-6'] as Profile;
const count = (list: SizeCount[]): number => list.reduce((n, s) => n + s.count, 0);

describe('trayFor: worked example of our own', () => {
  // Two cores under one master (all 6s), control all 3s.
  //  core 1: change 2s → bottom 2, wafer 4, build-up 3 + 10 - 6 = 7, top 10 in every chamber
  //  core 2: change 0s → bottom 0, wafer 6, build-up 7, top 10
  const a = pinCore(sfic6, { operating: ['222222', '666666'], control: '333333' });
  const b = pinCore(sfic6, { operating: ['000000', '666666'], control: '333333' });
  const broken = pinCore(sfic6, { operating: ['000000', '100000'], control: '333333' }); // 1-unit wafer
  const tray = trayFor(sfic6, [a, broken, b]);

  test('counts each part per chamber', () => {
    expect(tray.perChamber).toHaveLength(6);
    expect(tray.perChamber[0]).toEqual({
      chamber: 1,
      bottom: [{ size: 0, count: 1 }, { size: 2, count: 1 }],
      master: [{ size: 4, count: 1 }, { size: 6, count: 1 }],
      buildUp: [{ size: 7, count: 2 }],
      top: [{ size: 10, count: 2 }],
    });
  });

  test('totals are the sum over chambers', () => {
    expect(tray.totals.bottom).toEqual([{ size: 0, count: 6 }, { size: 2, count: 6 }]);
    expect(tray.totals.top).toEqual([{ size: 10, count: 12 }]);
  });

  test('pinnings with errors are left out and listed', () => {
    expect(tray.cores).toBe(2);
    expect(tray.skipped).toEqual([1]);
  });

  test('two-wafer build-ups are spelled out, lower wafer first', () => {
    // Depth 0 under control 9: 19 units. 9 + 10 would put the seam at depth 9, inside the
    // plug's reach; 10 + 9 seams at the control line of depth 0, allowed as the fallback.
    const deep = pinCore(sfic6, { operating: ['024680', '224680'], control: '357919' });
    const t = trayFor(sfic6, [deep, deep]);
    expect(t.twoWaferBuildUps).toContainEqual({ chamber: 6, total: 19, wafers: [10, 9], count: 2 });
    expect(t.perChamber[5]?.buildUp).toEqual([{ size: 9, count: 2 }, { size: 10, count: 2 }]);
  });
});

describe('trayFor properties', () => {
  test('every part of every good chart is on the tray once', () => {
    fc.assert(fc.property(fc.array(keyedCore(usualProfile), { minLength: 1, maxLength: 8 }), (cores) => {
      const profile = cores[0]!.profile;
      const same = cores.filter((c) => c.profile.chambers === profile.chambers);
      const pinnings = same.map((c) => pinCore(profile, { operating: c.operating.map(text), control: text(c.control) }));
      const tray = trayFor(profile, pinnings);
      const good = pinnings.filter((_, i) => !tray.skipped.includes(i));
      expect(tray.cores).toBe(good.length);
      const parts = good.flatMap((p) => p.chambers);
      expect(count(tray.totals.bottom)).toBe(parts.length);
      expect(count(tray.totals.top)).toBe(parts.length);
      expect(count(tray.totals.master)).toBe(parts.reduce((n, c) => n + c.masters.length, 0));
      expect(count(tray.totals.buildUp)).toBe(parts.reduce((n, c) => n + c.buildUp.length, 0));
      for (const kind of partKinds) {
        expect(tray.perChamber.reduce((n, ch) => n + count(ch[kind]), 0)).toBe(count(tray.totals[kind]));
      }
    }), { numRuns: 100 });
  });
});
