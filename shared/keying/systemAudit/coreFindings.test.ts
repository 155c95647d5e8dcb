import { describe, expect, test } from 'vitest';
import { pinCore } from '../pinCore';
import { builtInProfiles } from '../profiles';
import type { Profile } from '../types';
import { auditSystem } from './auditSystem';
import type { SystemAuditFinding, SystemAuditInput, SystemAuditKey } from './types';

/*
 * Findings about the control key and each core's pinning, on small systems of our own
 * whose answers are worked out by hand (common practice: a control key must differ from
 * every operating key, should differ from the top master in every chamber, and must not
 * turn any plug; a core with a pinning error is not built).
 */
const sfic6 = builtInProfiles['sfic-6'] as Profile;
const key = (id: string, bitting: string, opens: string[]): SystemAuditKey => ({ id, symbol: id, bitting, opens });
const codes = (f: SystemAuditFinding[]) => f.map((x) => x.code);
const of = (f: SystemAuditFinding[], code: SystemAuditFinding['code']) => f.filter((x) => x.code === code);

const clean: SystemAuditInput = {
  control: '135791',
  topMaster: 'A',
  keys: [key('A', '444444', ['R1', 'R2']), key('AA1', '424444', ['R1']), key('AA2', '464444', ['R2'])],
  cores: [{ id: 'R1', label: 'Room 1', operating: ['AA1', 'A'] }, { id: 'R2', label: 'Room 2', operating: ['AA2', 'A'] }],
};

describe('a clean system raises none of the control and pinning findings', () => {
  test('no key cut like the control key, no shared depth with the top master, no plug turned, nothing unbuildable or over the threshold', () => {
    const found = codes(auditSystem(sfic6, clean));
    for (const code of ['control-equals-key', 'control-shares-top-master', 'control-turns-plug', 'core-unbuildable', 'openings-over-threshold'] as const) {
      expect(found).not.toContain(code);
    }
  });
});

describe('keys cut like the control key', () => {
  test('one key: "Key … has … it"', () => {
    const f = auditSystem(sfic6, { ...clean, keys: [...clean.keys, key('X', '135791', [])] });
    expect(of(f, 'control-equals-key').map((x) => x.message)).toEqual(['Key X has the control key’s bitting: whoever holds it can remove cores.']);
  });
  test('two keys: "Keys … and … have … them", both named', () => {
    const f = auditSystem(sfic6, { ...clean, keys: [...clean.keys, key('X', '135791', []), key('Y', '135791', [])] });
    expect(of(f, 'control-equals-key')).toEqual([expect.objectContaining({ keys: ['X', 'Y'], message: 'Keys X and Y have the control key’s bitting: whoever holds them can remove cores.' })]);
  });
});

describe('the control key and the top master', () => {
  test('one chamber in common: "chamber 2"; two: "chambers 2, 5"', () => {
    const one = auditSystem(sfic6, { ...clean, control: '145791' });
    expect(of(one, 'control-shares-top-master')).toEqual([expect.objectContaining({ chambers: [2], keys: ['A'], message: 'The control key has the top master’s depth in chamber 2.' })]);
    const two = auditSystem(sfic6, { ...clean, control: '145741' });
    expect(of(two, 'control-shares-top-master').map((x) => [x.chambers, x.message])).toEqual([[[2, 5], 'The control key has the top master’s depth in chambers 2, 5.']]);
  });

  test('a control key that is one of the plug’s depths in every chamber of a core turns it', () => {
    // Room 1 takes 424444, 444424 and 444444: depths {2,4} in chambers 2 and 5, {4} elsewhere; 424424 is none of
    // those keys, yet one of the depths in every chamber.
    const f = auditSystem(sfic6, {
      ...clean,
      control: '424424',
      keys: [...clean.keys, key('AA1b', '444424', ['R1'])],
      cores: [{ id: 'R1', label: 'Room 1', operating: ['AA1', 'AA1b', 'A'] }, clean.cores[1]!],
    });
    expect(of(f, 'control-turns-plug')).toEqual([expect.objectContaining({ cores: ['R1'], data: { cores: 1 }, message: 'The control key would turn the plug of 1 core: Room 1.' })]);
  });
});

describe('cores that cannot be built, and the openings threshold', () => {
  test('a core with no operating key cannot be pinned as planned; a core over the threshold is named with its count', () => {
    const f = auditSystem(sfic6, {
      ...clean,
      openingsThreshold: 1,
      cores: [...clean.cores, { id: 'R3', label: 'Room 3', operating: [] }],
    });
    const unbuildable = of(f, 'core-unbuildable');
    expect(unbuildable.map((x) => x.cores)).toEqual([['R3']]);
    expect(unbuildable[0]?.message).toMatch(/^Core Room 3 cannot be pinned as planned \(1 problem\): /);
    expect(unbuildable[0]?.chambers).toEqual([]);
    // Rooms 1 and 2 each accept 2 bittings (change key and master differ in one chamber); Room 3 has no chart.
    expect(of(f, 'openings-over-threshold').map((x) => [x.cores, x.data])).toEqual([[['R1'], { openingsCount: 2, threshold: 1 }], [['R2'], { openingsCount: 2, threshold: 1 }]]);
    expect(of(f, 'openings-over-threshold')[0]?.message).toBe('Core Room 1 accepts 2 bittings (openings count), over this system’s threshold of 1.');
  });

  test('at the threshold is not over it', () => {
    expect(of(auditSystem(sfic6, { ...clean, openingsThreshold: 2 }), 'openings-over-threshold')).toEqual([]);
  });

  test('stock the kit cannot make: the chambers named once each', () => {
    const thin: Profile = { ...sfic6, wafers: [7] };
    const f = auditSystem(thin, clean);
    const unbuildable = of(f, 'core-unbuildable');
    expect(unbuildable.length).toBeGreaterThan(0);
    for (const u of unbuildable) {
      expect(u.chambers!.length).toBe(new Set(u.chambers).size);
      expect(u.chambers!.length).toBeGreaterThan(0);
      expect(u.message).toMatch(/\(\d+ problems?\): /);
    }
  });

  test('a core with many problems: the count of all, the words of the first three only (common practice: a summary stays short)', () => {
    const thin: Profile = { ...sfic6, wafers: [7] };
    // Room 1 as pinCore charts it on its own: its errors, in pinCore's order.
    const errors = pinCore(thin, { operating: ['424444', '444444'], control: '135791' }).issues.filter((i) => i.severity === 'error');
    expect(errors.length).toBeGreaterThan(3);
    const [room1] = of(auditSystem(thin, clean), 'core-unbuildable');
    expect(room1?.message).toBe(`Core Room 1 cannot be pinned as planned (${errors.length} problems): ${errors.slice(0, 3).map((e) => e.message).join(' ')}`);
  });
});
