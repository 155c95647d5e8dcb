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
