import { describe, expect, test } from 'vitest';
import { builtInProfiles } from '../profiles';
import type { Profile } from '../types';
import { auditSystem } from './auditSystem';
import type { SystemAuditInput } from './types';

const sfic6 = builtInProfiles['sfic-6'] as Profile;

/*
 * Edges of the audit rules, each on a system of our own small enough to check by hand:
 * the openings threshold at and past its value, which keys make a position "mastered",
 * and parity for every key, the first one included.
 */

describe('openings threshold: over means more than (keying primer, incidental keys)', () => {
  // One core for change 222222 under master 444444: two depths in every chamber, 2^6 = 64 bittings.
  const system = (openingsThreshold: number): SystemAuditInput => ({
    control: '135791',
    openingsThreshold,
    topMaster: 'm',
    keys: [
      { id: 'm', symbol: 'M', bitting: '444444', level: 'master', opens: ['c'] },
      { id: 'k', symbol: 'M1', bitting: '222222', level: 'change', opens: ['c'] },
    ],
    cores: [{ id: 'c', operating: ['k', 'm'] }],
  });
  const over = (t: number) => auditSystem(sfic6, system(t)).filter((f) => f.code === 'openings-over-threshold');

  test('a core accepting exactly the threshold is not reported; one more than the threshold is', () => {
    expect(over(64)).toEqual([]);
    expect(over(63)).toEqual([expect.objectContaining({ cores: ['c'], data: { openingsCount: 64, threshold: 63 } })]);
  });
});

describe('rights amplification counts positions change keys progress, not masters (M. Blaze, IEEE S&P 2003)', () => {
  test('a position only a master differs in is not mastered', () => {
    // Master AA differs from top A in chamber 1; change key AA1 differs from A in chambers 1 and 6.
    // Blaze's attack starts from a change key, so only AA1's positions count: 1 and 6.
    const findings = auditSystem(sfic6, {
      control: '135791',
      topMaster: 'a',
      keys: [
        { id: 'a', symbol: 'A', bitting: '444444', level: 'grand-master', opens: [] },
        { id: 'aa', symbol: 'AA', bitting: '244444', level: 'master', opens: [] },
        { id: 'ab', symbol: 'AB', bitting: '424444', level: 'master', opens: [] },
        { id: 'aa1', symbol: 'AA1', bitting: '244442', level: 'change', opens: [] },
      ],
      cores: [],
    });
    const ra = findings.find((f) => f.code === 'rights-amplification');
    // Two-step depths 0..9 leave 4 other depths per position: 2 x 4 test cuts, 6 x 4 over all positions.
    expect(ra).toMatchObject({ chambers: [1, 6], data: { positionsMastered: 2, chambers: 6, testCuts: 8, testCutsAllPositions: 24 } });
  });
});

describe('parity against the named top master, for every key (keying primer, two-step progression)', () => {
  test('the first key of the system is checked like the others', () => {
    const findings = auditSystem(sfic6, {
      control: '135791',
      topMaster: 'a',
      keys: [
        { id: 'x', symbol: 'X1', bitting: '344444', level: 'change', opens: [] },
        { id: 'a', symbol: 'A', bitting: '444444', level: 'grand-master', opens: [] },
        { id: 'y', symbol: 'Y1', bitting: '444445', level: 'change', opens: [] },
      ],
      cores: [],
    });
    expect(findings.filter((f) => f.code === 'parity-broken').map((f) => [f.keys, f.chambers])).toEqual([
      [['X1'], [1]],
      [['Y1'], [6]],
    ]);
  });

  test('the named top master decides, not the key that opens most', () => {
    // B opens more cores, but A is named: parity is A's (even), so B's odd cuts are reported.
    const findings = auditSystem(sfic6, {
      control: '135791',
      topMaster: 'a',
      keys: [
        { id: 'a', symbol: 'A', bitting: '444444', level: 'grand-master', opens: [] },
        { id: 'b', symbol: 'B', bitting: '555555', level: 'grand-master', opens: ['c1', 'c2'] },
      ],
      cores: [{ id: 'c1', operating: ['b'] }, { id: 'c2', operating: ['b'] }],
    });
    expect(findings.filter((f) => f.code === 'parity-broken').map((f) => f.keys)).toEqual([['B']]);
  });
});

describe('MACS in the audit is an error for the key (keying primer, MACS)', () => {
  test('a key with neighbouring cuts further apart than the profile allows is an error finding', () => {
    const findings = auditSystem({ ...sfic6, maxAdjacentCut: 4 }, {
      control: '135791', topMaster: 'a',
      keys: [
        { id: 'a', symbol: 'A', bitting: '444444', level: 'grand-master', opens: [] },
        { id: 'k', symbol: 'K1', bitting: '404444', level: 'change', opens: [] },
        { id: 'j', symbol: 'J1', bitting: '084444', level: 'change', opens: [] },
      ],
      cores: [],
    });
    // K1: 4 then 0 differs by exactly 4, allowed. J1: 0 then 8 differs by 8.
    expect(findings.filter((f) => f.code === 'macs-exceeded').map((f) => [f.severity, f.keys, f.chambers])).toEqual([['error', ['J1'], [1, 2]]]);
  });
});
