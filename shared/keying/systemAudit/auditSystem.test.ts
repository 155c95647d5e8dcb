import { describe, expect, test } from 'vitest';
import { systemAuditFindingCodes } from '../codes';
import { builtInProfiles } from '../profiles';
import { smallKit } from '../testing/arbitraries';
import type { Profile } from '../types';
import { auditSystem } from './auditSystem';
import { grouped } from './format';
import type { SystemAuditFinding, SystemAuditInput } from './types';

const sfic6 = builtInProfiles['sfic-6'] as Profile;

/*
 * A small system of our own with one of each problem planted:
 * top master A 444444; masters AA 244444 and AB 644444; change keys AA1, AA2, AB1 (two-step).
 * AC1 is cut like AA2 (duplicate); SP1 442444 is an incidental key of Room 101; X1 is cut
 * like the control key; BAD cannot be read; Z1 needs a one-unit wafer in core C5.
 */
const system: SystemAuditInput = {
  control: '135794',
  openingsThreshold: 3,
  keys: [
    { id: 'k-a', symbol: 'A', bitting: '444444', level: 'grand-master', opens: ['C1', 'C2', 'C3', 'C5'] },
    { id: 'k-aa', symbol: 'AA', bitting: '244444', level: 'master', opens: ['C1', 'C2'] },
    { id: 'k-ab', symbol: 'AB', bitting: '644444', level: 'master', opens: [] },
    { id: 'k-aa1', symbol: 'AA1', bitting: '242444', level: 'change', opens: ['C1', 'C9'] },
    { id: 'k-aa2', symbol: 'AA2', bitting: '246444', level: 'change', opens: ['C2'] },
    { id: 'k-ab1', symbol: 'AB1', bitting: '644404', level: 'change', opens: ['C3', 'C2'] },
    { id: 'k-ac1', symbol: 'AC1', bitting: '246444', level: 'change', opens: [] },
    { id: 'k-spare', symbol: 'SP1', bitting: '442444', level: 'change', opens: [] },
    { id: 'k-x', symbol: 'X1', bitting: '135794', level: 'change', opens: ['C4'] },
    { id: 'k-bad', symbol: 'BAD', bitting: '12a456', level: 'change', opens: [] },
    { id: 'k-z1', symbol: 'Z1', bitting: '454444', level: 'change', opens: ['C5'] },
  ],
  cores: [
    { id: 'C1', label: 'Room 101', operating: ['k-aa1', 'k-aa', 'k-a'] },
    { id: 'C2', label: 'Room 102', operating: ['k-aa2', 'k-aa', 'k-a', 'k-missing'] },
    { id: 'C3', label: 'Room 201', operating: ['k-ab1', 'k-ab', 'k-a'] },
    { id: 'C4', operating: ['k-x'] },
    { id: 'C5', operating: ['k-z1', 'k-a'] },
  ],
};

// Audited inside each test (not once on import), so mutation testing counts every test that reads a finding.
const audit = (): SystemAuditFinding[] => auditSystem(sfic6, system);
const of = (code: SystemAuditFinding['code']): SystemAuditFinding[] => audit().filter((f) => f.code === code);

describe('auditSystem on a planted system', () => {
  test('unintended access: the incidental key and the duplicate', () => {
    expect(of('unintended-access').map((f) => [f.keys, f.cores])).toEqual([
      [['AC1'], ['C2']],
      [['SP1'], ['C1']],
    ]);
    expect(of('unintended-access')[1]?.message).toBe('Key SP1 turns 1 core it is not meant to operate: Room 101.');
  });

  test('a key meant for a core it does not turn', () => {
    expect(of('intended-key-fails')).toEqual([expect.objectContaining({
      keys: ['AB1'], cores: ['C2'],
      message: 'Key AB1 is meant to operate Room 102 but does not turn it: the core is not pinned for this key.',
    })]);
  });

  test('records that disagree', () => {
    expect(of('records-disagree').map((f) => [f.keys, f.cores])).toEqual([[['AB'], ['C3']]]);
  });

  test('openings over the threshold', () => {
    // Rooms 101, 102, 201 each have two depths in two chambers: 2 × 2 = 4 > 3.
    expect(of('openings-over-threshold').map((f) => [f.cores, f.data?.openingsCount])).toEqual([
      [['C1'], 4], [['C2'], 4], [['C3'], 4],
    ]);
  });

  test('duplicate bittings and change keys one cut apart', () => {
    expect(of('duplicate-bitting')).toEqual([expect.objectContaining({
      keys: ['AA2', 'AC1'], keyIds: ['k-aa2', 'k-ac1'],
      message: 'Keys AA2 and AC1 have the same bitting: each operates every core the others do.',
    })]);
    // Two-step progression: one position apart by two steps is the normal minimum (keying
    // primer, common practice), so the groups make one line of design information.
    expect(of('change-keys-too-close')).toEqual([]);
    expect(of('change-keys-one-apart')).toEqual([expect.objectContaining({
      severity: 'info', keys: ['AA1', 'AA2', 'AC1', 'SP1'], chambers: [1, 3],
      data: { groups: 2, keys: 4 },
      details: ['AA1 and SP1: chamber 1', 'AA1, AA2 and AC1: chamber 3'],
    })]);
  });

  test('change keys one step apart in a two-step system stay a warning of their own', () => {
    const out = auditSystem(sfic6, {
      control: '135791',
      keys: [
        { id: 'a', symbol: 'A', bitting: '444444', level: 'grand-master', opens: [] },
        { id: 'x', symbol: 'AA1', bitting: '242444', level: 'change', opens: [] },
        { id: 'y', symbol: 'AA2', bitting: '243444', level: 'change', opens: [] },
      ],
      cores: [],
    });
    expect(out.filter((f) => f.code === 'change-keys-too-close')).toEqual([expect.objectContaining({
      severity: 'warning', keys: ['AA1', 'AA2'], chambers: [3],
      message: 'Change keys AA1 and AA2 differ only in chamber 3, by less than the progression step: a worn key or a slightly miscut one may work the other doors.',
    })]);
    expect(out.some((f) => f.code === 'change-keys-one-apart')).toBe(false);
  });

  test('control-key problems', () => {
    expect(of('control-equals-key')[0]?.message).toBe('Key X1 has the control key’s bitting: whoever holds it can remove cores.');
    expect(of('control-turns-plug')).toEqual([expect.objectContaining({ cores: ['C4'], message: 'The control key would turn the plug of 1 core: C4.' })]);
    expect(of('control-shares-top-master')).toEqual([expect.objectContaining({ keys: ['A'], chambers: [6] })]);
  });

  test('unreadable keys, unknown references, unbuildable cores, parity', () => {
    expect(of('bad-bitting')[0]?.message).toBe('Key BAD: Chamber 3: “a” is not a depth; type one digit per chamber and nothing else.');
    expect(of('unknown-core')[0]).toMatchObject({ keys: ['AA1'], cores: ['C9'] });
    expect(of('unknown-key')[0]?.message).toBe('Core Room 102 lists 1 key not in the system: k-missing; it is left out of its pinning.');
    expect(of('core-unbuildable')).toEqual([expect.objectContaining({ cores: ['C5'], chambers: [2] })]);
    expect(of('parity-broken').map((f) => [f.keys, f.chambers])).toEqual([[['X1'], [1, 2, 3, 4, 5]], [['Z1'], [2]]]);
  });

  test('rights-amplification summary (M. Blaze, IEEE S&P 2003)', () => {
    // Change keys differ from A in chambers 1..5. Two-step, depths 0..9: 4 other
    // same-parity depths per position, so 5 × 4 = 20 test cuts, 6 × 4 = 24 trying all.
    expect(of('rights-amplification')).toEqual([expect.objectContaining({
      severity: 'info', keys: ['A'], chambers: [1, 2, 3, 4, 5],
      data: { positionsMastered: 5, chambers: 6, testCuts: 20, testCutsAllPositions: 24 },
    })]);
    expect(of('rights-amplification')[0]?.message).toMatch(/^Top master A: 5 of 6 positions are mastered\. .* at most 20 test cuts in the mastered positions \(24 test cuts when every position is tried/);
  });

  test('sorted errors, then warnings, then information; codes in their listed order', () => {
    const rank = { error: 0, warning: 1, info: 2 };
    const codes = Object.keys(systemAuditFindingCodes);
    const findings = audit();
    for (let i = 1; i < findings.length; i++) {
      const a = findings[i - 1] as SystemAuditFinding;
      const b = findings[i] as SystemAuditFinding;
      expect(rank[a.severity] * 100 + codes.indexOf(a.code)).toBeLessThanOrEqual(rank[b.severity] * 100 + codes.indexOf(b.code));
    }
    expect(auditSystem(sfic6, system)).toEqual(findings);
  });

  test('every finding says what to change', () => {
    for (const f of audit()) expect(f.advice.length, f.code).toBeGreaterThan(20);
  });
});

describe('auditSystem: edge cases', () => {
  test('an unreadable control key stops the audit with one finding', () => {
    expect(auditSystem(sfic6, { ...system, control: '1357' })).toEqual([{
      code: 'bad-bitting', severity: 'error',
      message: 'Control key: The bitting has 4 cuts; SFIC 6-pin, .0125 in steps, stack 23 takes 6, one digit per chamber, chamber 1 first.',
      advice: 'Correct the control key first: no core can be pinned, so nothing else was checked.',
    }]);
  });

  test('MACS breaks are reported per key', () => {
    const tight: Profile = { ...sfic6, maxAdjacentCut: 5 };
    const out = auditSystem(tight, {
      control: '357913',
      keys: [{ id: 'k1', symbol: 'AA1', bitting: '082468', opens: ['c1'] }],
      cores: [{ id: 'c1', operating: ['k1'] }],
    });
    expect(out.filter((f) => f.code === 'macs-exceeded')).toEqual([expect.objectContaining({
      keys: ['AA1'], chambers: [1, 2],
      message: 'Key AA1: cuts in chambers 1 and 2 differ by 8, more than the 5 this profile allows.',
    })]);
  });

  test('without levels, a key for one core is a change key and the widest key is the top master', () => {
    const out = auditSystem(sfic6, {
      control: '357913',
      keys: [
        { id: 'm', symbol: 'AA', bitting: '444444', opens: ['c1', 'c2'] },
        { id: 'a', symbol: 'AA1', bitting: '244444', opens: ['c1'] },
        { id: 'b', symbol: 'AA2', bitting: '264444', opens: ['c2'] },
      ],
      cores: [{ id: 'c1', operating: ['a', 'm'] }, { id: 'c2', operating: ['b', 'm'] }],
    });
    expect(out.find((f) => f.code === 'rights-amplification')).toMatchObject({ keys: ['AA'], data: { positionsMastered: 2, testCuts: 8 } });
  });
});

describe('auditSystem: the control shear line', () => {
  // The keying primer's example (common practice), with a shop kit of wafers 2..10: control
  // 266666, top master 044444, masters 024444 (AA) and 064444 (AB), change keys 022244 and
  // 028844 under AA, 066666 under AB. Chamber 1 of every core is built up 10 + 2, whose seam
  // is the control line of depth 0, so AB1 (066666) releases all three cores.
  const example: SystemAuditInput = {
    control: '266666',
    topMaster: 'k-a',
    keys: [
      { id: 'k-a', symbol: 'A', bitting: '044444', level: 'grand-master', opens: ['c1', 'c2', 'c3'] },
      { id: 'k-aa', symbol: 'AA', bitting: '024444', level: 'master', opens: ['c1', 'c2'] },
      { id: 'k-ab', symbol: 'AB', bitting: '064444', level: 'master', opens: ['c3'] },
      { id: 'k-aa1', symbol: 'AA1', bitting: '022244', level: 'change', opens: ['c1'] },
      { id: 'k-aa2', symbol: 'AA2', bitting: '028844', level: 'change', opens: ['c2'] },
      { id: 'k-ab1', symbol: 'AB1', bitting: '066666', level: 'change', opens: ['c3'] },
    ],
    cores: [
      { id: 'c1', label: 'C-001 (Room 101)', operating: ['k-aa1', 'k-aa', 'k-a'] },
      { id: 'c2', label: 'C-002 (Room 102)', operating: ['k-aa2', 'k-aa', 'k-a'] },
      { id: 'c3', label: 'C-003 (Room 201)', operating: ['k-ab1', 'k-ab', 'k-a'] },
    ],
  };

  test('a key that releases cores it is not the control key of: an error naming the key by symbol and the cores by tag and door', () => {
    const out = auditSystem(smallKit(sfic6), example);
    expect(out.filter((f) => f.code === 'key-releases-core')).toEqual([expect.objectContaining({
      severity: 'error', keys: ['AB1'], keyIds: ['k-ab1'], cores: ['c1', 'c2', 'c3'],
      message: 'Key AB1 lines up the control shear line of 3 cores it is not the control key of: C-001 (Room 101), C-002 (Room 102) and C-003 (Room 201). Whoever holds it can remove those cores.',
    })]);
    const summary = out.find((f) => f.code === 'control-openings');
    expect(summary).toMatchObject({ severity: 'info', cores: ['c1', 'c2', 'c3'], data: { cores: 3, coresOverOne: 3 } });
    // pinCore's own error inside the core finding names the key by symbol, not by list position.
    const unbuildable = out.find((f) => f.code === 'core-unbuildable');
    expect(unbuildable?.message).toMatch(/^Core C-003 \(Room 201\) cannot be pinned as planned \(1 problem\): Key AB1 lines up the control shear line in every chamber/);
  });

  test('with the usual kit (wafers 2..19) the same system is clean: the control key alone releases', () => {
    const out = auditSystem(sfic6, example);
    expect(out.some((f) => f.code === 'key-releases-core')).toBe(false);
    expect(out.find((f) => f.code === 'control-openings')).toMatchObject({
      message: 'Control openings: each of the 3 pinned cores releases for the control key alone (every build-up is one wafer or its seam releases no other bitting).',
      data: { cores: 3, coresOverOne: 0, largestControlOpenings: 1 },
    });
  });

  test('the summary names the first core, in system order, among those with the largest count (common practice: a stable report)', () => {
    const summary = auditSystem(smallKit(sfic6), example).find((f) => f.code === 'control-openings');
    expect(summary?.data?.largestControlOpenings).toBeGreaterThan(1);
    expect(summary?.message).toContain('core C-001 (Room 101))');
  });

  test('no finding names a key by its position in a list', () => {
    for (const f of auditSystem(smallKit(sfic6), example)) expect(f.message, f.code).not.toMatch(/(Operating|Change) key \d/);
  });
});

describe('counts in messages', () => {
  test('whole numbers read with thousands commas, as en-US writes them (common practice)', () => {
    for (const n of [0, 7, 999, 1000, 12345, 1234567, -4200]) expect(grouped(n)).toBe(n.toLocaleString('en-US'));
  });
});
