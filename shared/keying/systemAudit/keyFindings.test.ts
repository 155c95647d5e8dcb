import { describe, expect, test } from 'vitest';
import { builtInProfiles } from '../profiles';
import type { Profile } from '../types';
import { auditSystem } from './auditSystem';
import type { SystemAuditFinding, SystemAuditInput, SystemAuditKey } from './types';

/*
 * Findings about the keys themselves on systems of our own, answers worked out by hand
 * from the keying primer's rules (two-step progression keeps the top master's parity in
 * every chamber; change keys one position apart by two steps are the normal minimum; a
 * maximum adjacent cut limits neighbouring cuts; one bitting, one symbol).
 */
const sfic6 = builtInProfiles['sfic-6'] as Profile;
const key = (id: string, bitting: string, opens: string[] = []): SystemAuditKey => ({ id, symbol: id, bitting, opens });
const of = (f: SystemAuditFinding[], code: SystemAuditFinding['code']) => f.filter((x) => x.code === code);

const base: SystemAuditInput = {
  control: '135791',
  topMaster: 'A',
  keys: [key('A', '444444', ['R1'])],
  cores: [{ id: 'R1', label: 'Room 1', operating: ['A'] }],
};

describe('references to keys the system does not hold', () => {
  test('one unknown key: "it is"; two: "they are"; the core named', () => {
    const one = auditSystem(sfic6, { ...base, cores: [{ id: 'R1', label: 'Room 1', operating: ['A', 'Z9'] }] });
    expect(of(one, 'unknown-key')).toEqual([expect.objectContaining({ cores: ['R1'], data: { keys: 1 }, message: 'Core Room 1 lists 1 key not in the system: Z9; it is left out of its pinning.' })]);
    const two = auditSystem(sfic6, { ...base, cores: [{ id: 'R1', label: 'Room 1', operating: ['A', 'Z9', 'Z8'] }] });
    expect(of(two, 'unknown-key').map((x) => x.message)).toEqual(['Core Room 1 lists 2 keys not in the system: Z9 and Z8; they are left out of its pinning.']);
  });

  test('a key that lists a core the system does not hold', () => {
    const f = auditSystem(sfic6, { ...base, keys: [key('A', '444444', ['R1', 'R7'])] });
    expect(of(f, 'unknown-core')).toEqual([expect.objectContaining({ keys: ['A'], cores: ['R7'], message: 'Key A lists 1 core not in the system: R7.' })]);
  });
});

describe('keys with one bitting', () => {
  test('three keys cut alike make one finding, named by all three, once', () => {
    const f = auditSystem(sfic6, { ...base, keys: [...base.keys, key('B', '424444'), key('C', '424444'), key('D', '424444')] });
    expect(of(f, 'duplicate-bitting')).toEqual([expect.objectContaining({ keys: ['B', 'C', 'D'], message: 'Keys B, C and D have the same bitting: each operates every core the others do.' })]);
  });
});

describe('parity and the maximum adjacent cut', () => {
  test('under two-step progression a key off the top master’s parity is named with its chambers', () => {
    const f = auditSystem(sfic6, { ...base, keys: [...base.keys, key('B', '434445'), key('C', '414444')] });
    expect(of(f, 'parity-broken').map((x) => [x.keys, x.chambers, x.message])).toEqual([
      [['B'], [2, 6], 'Key B breaks the top master’s parity in chambers 2, 6: a core it shares with a key of the other parity needs an odd-sized wafer there.'],
      [['C'], [2], 'Key C breaks the top master’s parity in chamber 2: a core it shares with a key of the other parity needs an odd-sized wafer there.'],
    ]);
  });

  test('one-step progression has no parity to keep', () => {
    const oneStep: Profile = { ...sfic6, step: 1 };
    expect(of(auditSystem(oneStep, { ...base, keys: [...base.keys, key('B', '434445')] }), 'parity-broken')).toEqual([]);
  });

  test('the cuts that break the maximum adjacent cut, and by how much', () => {
    const tight: Profile = { ...sfic6, maxAdjacentCut: 5 };
    const f = auditSystem(tight, { ...base, keys: [...base.keys, key('B', '404444'), key('C', '408444')] });
    expect(of(f, 'macs-exceeded').map((x) => [x.keys, x.chambers, x.message])).toEqual([
      [['C'], [2, 3], 'Key C: cuts in chambers 2 and 3 differ by 8, more than the 5 this profile allows.'],
    ]);
  });
});

describe('change keys one position apart', () => {
  const changes = (bittings: string[]) => bittings.map((b, i) => ({ ...key(`AA${i + 1}`, b, [`R${i + 1}`]), level: 'change' as const }));
  test('two steps apart under two-step progression: one line of information, chambers sorted, groups as details', () => {
    const f = auditSystem(sfic6, { ...base, keys: [...base.keys, ...changes(['444424', '444464', '424444', '464444'])] });
    const [one] = of(f, 'change-keys-one-apart');
    expect(one).toMatchObject({ severity: 'info', chambers: [2, 5], data: { groups: 2, keys: 4 } });
    expect(one?.message).toBe('2 groups of change keys (4 keys) differ in one position only, by two steps or more: the normal minimum of two-step progression, in chambers 2, 5.');
    expect(one?.details).toEqual(['AA1 and AA2: chamber 5', 'AA3 and AA4: chamber 2']);
    expect(of(f, 'change-keys-too-close')).toEqual([]);
  });

  test('one-step progression: a warning for each group, none of the summary', () => {
    const oneStep: Profile = { ...sfic6, step: 1 };
    const f = auditSystem(oneStep, { ...base, keys: [...base.keys, ...changes(['444424', '444434'])] });
    expect(of(f, 'change-keys-too-close').map((x) => [x.keys, x.chambers])).toEqual([[['AA1', 'AA2'], [5]]]);
    expect(of(f, 'change-keys-one-apart')).toEqual([]);
  });
});

describe('key findings at their edges (worked out by hand)', () => {
  const changes = (bittings: string[]) => bittings.map((b, i) => ({ ...key(`AA${i + 1}`, b, []), level: 'change' as const }));

  test('an unreadable bitting is named by the key’s symbol and id, with what is wrong', () => {
    const f = auditSystem(sfic6, { ...base, keys: [...base.keys, { id: 'k-b', symbol: 'B', bitting: '4x4444', opens: [] }] });
    expect(of(f, 'bad-bitting')).toEqual([expect.objectContaining({
      keys: ['B'], keyIds: ['k-b'],
      message: 'Key B: Chamber 2: “x” is not a depth; type one digit per chamber and nothing else.',
    })]);
  });

  test('a named top master the system does not hold: no parity to compare with, and no error', () => {
    const f = auditSystem(sfic6, { ...base, topMaster: 'ZZ', keys: [...base.keys, key('B', '434445')] });
    expect(of(f, 'parity-broken')).toEqual([]);
  });

  test('the maximum adjacent cut: the difference of cuts 1 and 9 is 8', () => {
    const tight: Profile = { ...sfic6, maxAdjacentCut: 7 };
    const f = auditSystem(tight, { ...base, keys: [...base.keys, key('B', '419444')] });
    expect(of(f, 'macs-exceeded').map((x) => x.message)).toEqual(['Key B: cuts in chambers 2 and 3 differ by 8, more than the 7 this profile allows.']);
  });

  test('two groups in the same chamber: the chamber named once, "chamber" for one', () => {
    // AA1/AA2 and AA3/AA4 each differ only in chamber 2; AA1 and AA3 differ in chambers 5 and 6.
    const f = auditSystem(sfic6, { ...base, keys: [...base.keys, ...changes(['424444', '464444', '424466', '464466'])] });
    const [one] = of(f, 'change-keys-one-apart');
    expect(one).toMatchObject({ chambers: [2], data: { groups: 2, keys: 4 } });
    expect(one?.message).toBe('2 groups of change keys (4 keys) differ in one position only, by two steps or more: the normal minimum of two-step progression, in chamber 2.');
  });

  /*
   * Total position progression of our own: chambers 1..p take every depth of a list, the
   * others stay constant. A chamber progressed over d depths, with d^(p−1) combinations of
   * the other progressed chambers, makes d^(p−1) groups (brute-force count: p × d^(p−1)).
   */
  const progression = (depths: number[], p: number, rest: string): string[] => {
    let out = [''];
    for (let i = 0; i < p; i++) out = out.flatMap((s) => depths.map((d) => `${s}${d}`));
    return out.map((s) => s + rest);
  };

  test('exactly 500 groups: every group listed, no "more" line', () => {
    const keys = progression([0, 2, 4, 6, 8], 4, '22');
    expect(keys).toHaveLength(625);
    const [one] = of(auditSystem(sfic6, { ...base, keys: [...base.keys, ...changes(keys)] }), 'change-keys-one-apart');
    expect(one).toMatchObject({ chambers: [1, 2, 3, 4], data: { groups: 500, keys: 625 } });
    expect(one?.details).toHaveLength(500);
    expect(one?.details?.some((line) => line.startsWith('and '))).toBe(false);
  });

  test('1,280 groups: the first 500 listed and a line for the other 780', () => {
    const keys = progression([0, 2, 4, 6], 5, '2');
    expect(keys).toHaveLength(1024);
    const [one] = of(auditSystem(sfic6, { ...base, keys: [...base.keys, ...changes(keys)] }), 'change-keys-one-apart');
    expect(one).toMatchObject({ chambers: [1, 2, 3, 4, 5], data: { groups: 1280, keys: 1024 } });
    expect(one?.details).toHaveLength(501);
    expect(one?.details?.[500]).toBe('and 780 more groups');
  });
});
