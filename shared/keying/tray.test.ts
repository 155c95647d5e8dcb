import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import { pinCore } from './pinCore';
import { builtInProfiles } from './profiles';
import { keyedCore, runs, smallKit, text, usualProfile } from './testing/arbitraries';
import { partKinds, trayFor, type SizeCount } from './tray';
import type { CorePinning, Profile } from './types';

const sfic6 = builtInProfiles['sfic-6'] as Profile;
const count = (list: SizeCount[]): number => list.reduce((n, s) => n + s.count, 0);

describe('trayFor: worked example of our own', () => {
  // Two cores under one master (all 6s), control all 3s.
  //  core 1: change 2s → bottom 2, wafer 4, build-up 3 + 10 - 6 = 7, top 10 in every chamber
  //  core 2: change 0s → bottom 0, wafer 6, build-up 7, top 10
  // Pinned and counted inside each test, so mutation testing counts these tests for pinCore and trayFor.
  const worked = () => {
    const a = pinCore(sfic6, { operating: ['222222', '666666'], control: '333333' });
    const b = pinCore(sfic6, { operating: ['000000', '666666'], control: '333333' });
    const broken = pinCore(sfic6, { operating: ['000000', '100000'], control: '333333' }); // 1-unit wafer
    return trayFor(sfic6, [a, broken, b]);
  };

  test('counts each part per chamber', () => {
    const tray = worked();
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
    const tray = worked();
    expect(tray.totals.bottom).toEqual([{ size: 0, count: 6 }, { size: 2, count: 6 }]);
    expect(tray.totals.top).toEqual([{ size: 10, count: 12 }]);
  });

  test('pinnings with errors are left out and listed', () => {
    const tray = worked();
    expect(tray.cores).toBe(2);
    expect(tray.skipped).toEqual([1]);
  });

  test('two-wafer build-ups are spelled out, lower wafer first', () => {
    // A kit of wafers 2..10. Depth 0 under control 9: 19 units. 9 + 10 would put the seam
    // at depth 9, inside the plug's reach; 10 + 9 seams at the control line of depth 0,
    // allowed as the fallback.
    const kit6 = smallKit(sfic6);
    const deep = pinCore(kit6, { operating: ['024680', '224680'], control: '357919' });
    const t = trayFor(kit6, [deep, deep]);
    expect(t.twoWaferBuildUps).toContainEqual({ chamber: 6, total: 19, wafers: [10, 9], count: 2, seamReleases: [0] });
    expect(t.perChamber[5]?.buildUp).toEqual([{ size: 9, count: 2 }, { size: 10, count: 2 }]);
  });
});

describe('trayFor: warnings do not keep a core off the tray (keying primer: only errors block a chart)', () => {
  test('a core whose chart has only warnings is counted, not skipped', () => {
    // Control 4 shares the master's depth 4 in chamber 1: a warning, the core is still built.
    const warned = pinCore(sfic6, { operating: ['222222', '466666'], control: '435791' });
    expect(warned.issues.map((i) => i.severity)).toEqual(['warning']);
    const tray = trayFor(sfic6, [warned]);
    expect(tray.cores).toBe(1);
    expect(tray.skipped).toEqual([]);
    expect(count(tray.totals.top)).toBe(6);
  });
});

describe('trayFor properties', () => {
  // Oracle independent of the tray: a chart is usable when no issue is an error and every
  // chamber is there; its parts are counted straight off the chart, chamber by chamber.
  const usable = (p: CorePinning, profile: Profile) => p.chambers.length === profile.chambers && p.issues.every((i) => i.severity !== 'error');

  test('every part of every usable chart is on the tray once, and only those charts (fast-check)', () => {
    fc.assert(fc.property(fc.array(keyedCore(usualProfile), { minLength: 1, maxLength: 8 }), (cores) => {
      const profile = cores[0]!.profile;
      const same = cores.filter((c) => c.profile.chambers === profile.chambers);
      const pinnings = same.map((c) => pinCore(profile, { operating: c.operating.map(text), control: text(c.control) }));
      const tray = trayFor(profile, pinnings);
      const good = pinnings.filter((p) => usable(p, profile));
      expect(tray.cores).toBe(good.length);
      expect(tray.skipped).toEqual(pinnings.flatMap((p, i) => (usable(p, profile) ? [] : [i])));
      // Expected counts per chamber and kind, tallied by hand from the charts.
      for (let c = 1; c <= profile.chambers; c++) {
        const parts = good.map((p) => p.chambers[c - 1]!);
        const tally = (sizes: number[]) => {
          const m = new Map<number, number>();
          for (const s of sizes) m.set(s, (m.get(s) ?? 0) + 1);
          return [...m].sort((a, b) => a[0] - b[0]).map(([size, n]) => ({ size, count: n }));
        };
        const row = tray.perChamber[c - 1]!;
        expect(row.chamber).toBe(c);
        expect(row.bottom).toEqual(tally(parts.map((p) => p.bottom)));
        expect(row.master).toEqual(tally(parts.flatMap((p) => p.masters)));
        expect(row.buildUp).toEqual(tally(parts.flatMap((p) => p.buildUp)));
        expect(row.top).toEqual(tally(parts.map((p) => p.top)));
      }
      for (const kind of partKinds) {
        expect(tray.perChamber.reduce((n, ch) => n + count(ch[kind]), 0)).toBe(count(tray.totals[kind]));
      }
    }), { numRuns: runs(100) });
  });
});
