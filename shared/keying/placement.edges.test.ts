import { describe, expect, test } from 'vitest';
import { checkKeyPlacement, type PlacementSystem } from './placement';
import { builtInProfiles } from './profiles';
import type { Profile } from './types';

/*
 * Edges of the one placement check that hand entry, CSV import and progression share, worked
 * out by hand from the keying primer's hierarchy rules (a key never shares a bitting; the worst
 * match is named: its master, then a sibling, then any key; parity follows the named top master
 * or the top of the key's own chain; one-step progression has no parity to keep).
 */
const sfic6 = builtInProfiles['sfic-6'] as Profile;
const system: PlacementSystem = {
  control: '135791',
  keys: [
    { id: 'a', symbol: 'A', bitting: '444444', parentId: null },
    { id: 'aa', symbol: 'AA', bitting: '244444', parentId: 'a' },
    { id: 'aa1', symbol: 'AA1', bitting: '242444', parentId: 'aa' },
    { id: 'b', symbol: 'B', bitting: '666666', parentId: null },
    { id: 'a', symbol: 'A-again', bitting: '888888', parentId: null },
  ],
};
const codes = (bitting: string, parentId: string | null, extra: Partial<PlacementSystem> = {}, id?: string) =>
  checkKeyPlacement(sfic6, { ...system, ...extra }, { bitting, parentId, ...(id ? { id } : {}) }).map((p) => p.code);

describe('a bitting that cannot be read', () => {
  test('names the chamber when the problem is in one, and has no chamber otherwise', () => {
    const [inChamber] = checkKeyPlacement(sfic6, system, { bitting: '24x444', parentId: 'aa' });
    expect(inChamber).toMatchObject({ field: 'bitting', chamber: 3 });
    const [tooShort] = checkKeyPlacement(sfic6, system, { bitting: '2424', parentId: 'aa' });
    expect(tooShort?.field).toBe('bitting');
    expect('chamber' in tooShort!).toBe(false);
  });
});

describe('the same bitting as another key: the closest relation is named', () => {
  test('its master, then a sibling, then any key; a key at the top has no siblings', () => {
    expect(codes('244444', 'aa')).toContain('placement-equals-master');
    expect(codes('242444', 'aa')).toContain('placement-equals-sibling');
    expect(codes('242444', 'a')).toContain('placement-equals-key');
    expect(codes('666666', null)).toContain('placement-equals-key');
    expect(codes('666666', null)).not.toContain('placement-equals-sibling');
  });
  test('the first record of an id is the key (a later record under the same id is not in the system)', () => {
    expect(codes('888888', null)).not.toContain('placement-equals-key');
    expect(codes('444444', null)).toContain('placement-equals-key');
  });
  test('a key changed in place is not compared with itself', () => {
    expect(codes('242444', 'aa', {}, 'aa1')).toEqual([]);
  });
});

describe('the maximum adjacent cut', () => {
  test('names the two chambers, both cuts and the difference', () => {
    const tight: Profile = { ...sfic6, maxAdjacentCut: 5 };
    const [macs] = checkKeyPlacement(tight, system, { bitting: '208444', parentId: 'aa' }).filter((p) => p.code === 'macs-exceeded');
    expect(macs).toMatchObject({ chamber: 2, message: 'Chambers 2 and 3: cuts 0 and 8 differ by 8, more than the maximum adjacent cut of 5; the key cannot be cut. Change one of the two cuts.' });
  });
});

describe('parity', () => {
  test('follows the top of the key’s own chain, or the named top master', () => {
    expect(codes('243444', 'aa')).toContain('placement-parity');
    // Named top master B (666666): its parity is the same as A's here, so the rule reads the same.
    expect(codes('243444', 'aa', { topMasterId: 'b' })).toContain('placement-parity');
    // A named top master that is not in the system: the chain's top decides.
    expect(codes('243444', 'aa', { topMasterId: 'zz' })).toContain('placement-parity');
  });
  test('one-step progression has no parity; a key with no master above it and none named has none to keep', () => {
    expect(checkKeyPlacement({ ...sfic6, step: 1 }, system, { bitting: '243444', parentId: 'aa' }).map((p) => p.code)).not.toContain('placement-parity');
    expect(codes('353535', null)).not.toContain('placement-parity');
  });
  test('the top master changed in place is not held to its own parity', () => {
    expect(codes('454545', null, { topMasterId: 'a' }, 'a')).not.toContain('placement-parity');
  });
});

describe('a master chain that loops', () => {
  test('the check ends, and the key being changed is not its own master', () => {
    const loop: PlacementSystem = {
      control: '135791',
      keys: [
        { id: 'x', symbol: 'X', bitting: '444444', parentId: 'y' },
        { id: 'y', symbol: 'Y', bitting: '244444', parentId: 'x' },
      ],
    };
    expect(checkKeyPlacement(sfic6, loop, { id: 'x', bitting: '444446', parentId: 'y' }).map((p) => p.code)).not.toContain('placement-equals-master');
  });
});

describe('placement: the message names the right key, worked out by hand', () => {
  test('a bitting equal to its master and to a sibling cut like the master: the master is named', () => {
    // A record error of our own: S hangs under AA and is cut like AA; a new key under AA cut alike names AA.
    const withTwin: PlacementSystem = { ...system, keys: [...system.keys, { id: 's', symbol: 'S', bitting: '244444', parentId: 'aa' }] };
    const [same] = checkKeyPlacement(sfic6, withTwin, { bitting: '244444', parentId: 'aa' }).filter((p) => p.code === 'placement-equals-master');
    expect(same?.message).toBe('The bitting is the same as its master AA: two keys of one system never share a bitting. Progress at least one more position.');
  });

  test('two unrelated keys cut alike: the first of them in the system is named', () => {
    const twins: PlacementSystem = {
      ...system,
      keys: [...system.keys, { id: 'x1', symbol: 'X1', bitting: '464646', parentId: 'b' }, { id: 'x2', symbol: 'X2', bitting: '464646', parentId: 'b' }],
    };
    const [same] = checkKeyPlacement(sfic6, twins, { bitting: '464646', parentId: 'a' });
    expect(same?.message).toBe('The bitting is the same as key X1: two keys of one system never share a bitting. Progress at least one more position.');
  });

  test('MACS: the difference of cuts 1 and 9 is 8', () => {
    const tight: Profile = { ...sfic6, maxAdjacentCut: 7 };
    const problems = checkKeyPlacement(tight, system, { bitting: '193579', parentId: null });
    expect(problems.filter((p) => p.code === 'macs-exceeded').map((p) => p.message)).toEqual([
      'Chambers 1 and 2: cuts 1 and 9 differ by 8, more than the maximum adjacent cut of 7; the key cannot be cut. Change one of the two cuts.',
    ]);
  });

  test('a key at the top with no named top master: no top master, so no parity to break', () => {
    expect(checkKeyPlacement(sfic6, system, { bitting: '135797', parentId: null })).toEqual([]);
    // The same for a key being changed (it has an id), and under a master whose own bitting cannot be read.
    expect(checkKeyPlacement(sfic6, system, { id: 'new', bitting: '135797', parentId: null })).toEqual([]);
    const unreadableTop: PlacementSystem = { ...system, keys: [{ id: 'u', symbol: 'U', bitting: '44x444', parentId: null }, ...system.keys] };
    expect(checkKeyPlacement(sfic6, unreadableTop, { id: 'new', bitting: '135797', parentId: 'u' })).toEqual([]);
  });

  test('a master re-hung under its own change key: the chain stops at the key itself', () => {
    // AA moved under AA1 (a loop). The chain above is AA1 alone: nothing is held constant and
    // AA1 is the top of that chain, so a new cut of AA that keeps AA1's parity is accepted.
    expect(checkKeyPlacement(sfic6, system, { id: 'aa', bitting: '042466', parentId: 'aa1' })).toEqual([]);
  });
});
