import { describe, expect, test } from 'vitest';
import { builtInProfiles } from '../profiles';
import type { Profile } from '../types';
import { buildContext, levelOf, type SystemAuditContext } from './context';
import type { SystemAuditInput, SystemAuditKey } from './types';

/*
 * What the system audit reads from the records, worked out by hand (common practice: a
 * record's references are resolved once, the first record of an id wins, lists come out
 * ascending and without repeats; the top master is the highest level meant for the most
 * cores when the system does not name one).
 */
const sfic6 = builtInProfiles['sfic-6'] as Profile;
const key = (id: string, bitting: string, opens: string[], level?: SystemAuditKey['level']): SystemAuditKey =>
  ({ id, symbol: id.toUpperCase(), bitting, opens, ...(level ? { level } : {}) });

describe('levelOf', () => {
  test('the level given, else change for a key meant for at most one core and master above that', () => {
    expect(levelOf({ opens: [] })).toBe('change');
    expect(levelOf({ opens: ['c1'] })).toBe('change');
    expect(levelOf({ opens: ['c1', 'c2'] })).toBe('master');
    expect(levelOf({ level: 'grand-master', opens: [] })).toBe('grand-master');
    expect(levelOf({ level: 'change', opens: ['c1', 'c2', 'c3'] })).toBe('change');
  });
});

describe('buildContext resolves the records', () => {
  const system: SystemAuditInput = {
    control: '135791',
    keys: [
      key('k0', '444444', ['c0', 'c1', 'c0']),
      key('k1', '244444', ['c1', 'nowhere', 'gone']),
      key('k0', '666666', ['c1']),
      key('k3', '24x444', ['c0']),
      key('k4', '242444', ['c0']),
    ],
    cores: [
      { id: 'c0', operating: ['k4', 'k0', 'k4', 'missing', 'k3', 'also-missing'] },
      { id: 'c1', operating: ['k1', 'k0'] },
      { id: 'c0', operating: ['k1'] },
    ],
  };
  // Built inside each test, so mutation testing counts these tests for buildContext.
  const built = (): SystemAuditContext => buildContext(sfic6, system)!;

  test('the first record of a key id or a core id is the one referenced', () => {
    const ctx = built();
    // c0's k0 is the first k0 (444444), not the later record cut 666666.
    expect(ctx.coreKeys[0]).toEqual([0, 4]);
    expect(ctx.openers[0]).toEqual([0, 4]);
    expect(ctx.openers[2]).toEqual([]);
  });

  test('each core’s keys ascending and once, unreadable keys left out, unknown ones listed by core', () => {
    const ctx = built();
    expect(ctx.coreKeys).toEqual([[0, 4], [0, 1], [1]]);
    expect(ctx.unknownKeys.get(0)).toEqual(['missing', 'also-missing']);
    expect(ctx.unknownKeys.has(1)).toBe(false);
  });

  test('openers ascending and once, though a key lists a core twice; unknown cores listed by key', () => {
    const ctx = built();
    expect(ctx.openers[1]).toEqual([0, 1, 2]);
    expect(ctx.unknownCores.get(1)).toEqual(['nowhere', 'gone']);
    expect(ctx.validKeys).toEqual([0, 1, 2, 4]);
    expect(ctx.depths[3]).toBeNull();
  });

  test('an unreadable control bitting: no context', () => {
    expect(buildContext(sfic6, { ...system, control: '13579' })).toBeNull();
  });
});

describe('the top master', () => {
  const base = { control: '135791', cores: [] };
  test('named: its index, or none when it is unknown or its bitting unreadable', () => {
    const keys = [key('a', '444444', []), key('b', '44x444', []), key('c', '244444', [])];
    expect(buildContext(sfic6, { ...base, keys, topMaster: 'c' })!.topMaster).toBe(2);
    expect(buildContext(sfic6, { ...base, keys, topMaster: 'b' })!.topMaster).toBe(-1);
    expect(buildContext(sfic6, { ...base, keys, topMaster: 'zz' })!.topMaster).toBe(-1);
  });

  test('not named: the highest level, then the one meant for the most cores, then the first; unreadable keys never', () => {
    const pick = (keys: SystemAuditKey[]) => buildContext(sfic6, { ...base, keys })!.topMaster;
    expect(pick([key('m', '444444', ['a', 'b']), key('g', '244444', [], 'grand-master'), key('gg', '24x444', [], 'great-grand-master')])).toBe(1);
    expect(pick([key('g', '244444', [], 'grand-master'), key('gg', '224444', [], 'great-grand-master')])).toBe(1);
    expect(pick([key('m1', '444444', ['a', 'b']), key('m2', '244444', ['a', 'b', 'c']), key('m3', '224444', ['a', 'b', 'c'])])).toBe(1);
    expect(pick([key('c1', '444444', ['a']), key('c2', '244444', [])])).toBe(0);
    // A lower level never wins on the number of cores: the grand master meant for one core stays above a master meant for three.
    expect(pick([key('g', '244444', ['a'], 'grand-master'), key('m', '444444', ['a', 'b', 'c'])])).toBe(0);
    expect(pick([key('bad', '4x4444', ['a', 'b'])])).toBe(-1);
    expect(pick([])).toBe(-1);
  });

  test('the top master is never counted as a change key, whatever its level says', () => {
    const ctx = buildContext(sfic6, { ...base, topMaster: 'a', keys: [key('a', '444444', [], 'change'), key('b', '244444', ['x']), key('c', '224444', ['x', 'y'])] })!;
    expect(ctx.isChange).toEqual([false, true, false]);
  });
});
