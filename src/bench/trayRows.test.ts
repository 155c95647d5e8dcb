import { describe, expect, test } from 'vitest';
import { pinCore, trayFor } from '@shared/keying';
import { trayRows, twoWaferWords } from './trayRows';
import { kit6, mixedKeys, primerKeys, sfic6 } from './testing/fixtures';

describe('Tray rows', () => {
  // keying-primer worked example (bottom 2, master 4, build-up 8, top 9 in every chamber), two cores.
  test('one row per kind and size, counts per chamber and in total', () => {
    const tray = trayFor(sfic6, [pinCore(sfic6, primerKeys), pinCore(sfic6, primerKeys)]);
    expect(trayRows(tray).map((r) => [r.kindLabel, r.size, r.perChamber, r.total])).toEqual([
      ['Bottom pin', 2, [2, 2, 2, 2, 2, 2], 12],
      ['Master wafer', 4, [2, 2, 2, 2, 2, 2], 12],
      ['Build-up wafer', 8, [2, 2, 2, 2, 2, 2], 12],
      ['Top pin', 9, [2, 2, 2, 2, 2, 2], 12],
    ]);
  });

  // keying-primer stocked sizes: the pick list must say when a build-up is two wafers.
  test('zeros where a chamber takes none, totals add up, two-wafer build-ups spelled out', () => {
    const tray = trayFor(kit6, [pinCore(kit6, mixedKeys)]);
    const rows = trayRows(tray);
    for (const r of rows) expect(r.perChamber.reduce((a, b) => a + b, 0)).toBe(r.total);
    expect(rows.find((r) => r.kind === 'master' && r.size === 2)?.perChamber).toEqual([1, 0, 0, 0, 0, 1]);
    expect(tray.twoWaferBuildUps.map(twoWaferWords)).toEqual([
      'Chamber 1, build-up 13: stack the 9 first, then the 4 on top (×1) · seam at the control line of depth 1',
      'Chamber 3, build-up 15: stack the 9 first, then the 6 on top (×1) · seam at the control line of depth 3',
      'Chamber 6, build-up 15: stack the 9 first, then the 6 on top (×1) · seam at the control line of depth 1',
    ]);
  });
});
