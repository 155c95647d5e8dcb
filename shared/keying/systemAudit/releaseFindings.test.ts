import { describe, expect, test } from 'vitest';
import { hasBreakAt } from '../keyOperates';
import { pinCore } from '../pinCore';
import { builtInProfiles } from '../profiles';
import { smallKit } from '../testing/arbitraries';
import type { Profile } from '../types';
import { auditSystem } from './auditSystem';
import type { SystemAuditInput } from './types';

/*
 * The control shear line in the system audit, on the keying primer's example (common
 * practice: a kit of wafers 2..10): control 266666, top master 044444, masters 024444 and
 * 064444, change keys 022244 and 028844 under the first, 066666 under the second. Every
 * build-up is over 10 units, so each is two wafers and each seam releases one more depth.
 * The counts are checked by brute force: each chamber's depths whose control line meets a
 * break (hasBreakAt over all ten depths), multiplied over the chambers, which are independent.
 */
const sfic6 = builtInProfiles['sfic-6'] as Profile;
const kit6 = smallKit(sfic6);
const keys = [
  ['k-a', 'A', '044444', ['R1', 'R2', 'R3']],
  ['k-aa', 'AA', '024444', ['R1', 'R2']],
  ['k-ab', 'AB', '064444', ['R3']],
  ['k-aa1', 'AA1', '022244', ['R1']],
  ['k-aa2', 'AA2', '028844', ['R2']],
  ['k-ab1', 'AB1', '066666', ['R3']],
] as const;
const system: SystemAuditInput = {
  control: '266666',
  topMaster: 'k-a',
  keys: keys.map(([id, symbol, bitting, opens]) => ({ id, symbol, bitting, opens: [...opens] })),
  cores: [
    { id: 'R1', label: 'Room 1', operating: ['k-aa1', 'k-aa', 'k-a'] },
    { id: 'R2', label: 'Room 2', operating: ['k-aa2', 'k-aa', 'k-a'] },
    { id: 'R3', label: 'Room 3', operating: ['k-ab1', 'k-ab', 'k-a'] },
  ],
};

function releasingBittings(profile: Profile, operating: string[]): number {
  const pinning = pinCore(profile, { operating, control: system.control });
  return pinning.chambers.reduce((n, ch) => n * Array.from({ length: 10 }, (_, d) => d).filter((d) => hasBreakAt(ch, d + profile.sleeveUnits)).length, 1);
}

describe('who lines up the control shear line (the primer’s example)', () => {
  // Audited inside each test, so mutation testing counts these tests for the audit.
  const audit = () => auditSystem(kit6, system);

  test('the change key that releases every core: one error naming it and the three rooms', () => {
    const releases = audit().filter((f) => f.code === 'key-releases-core');
    expect(releases).toHaveLength(1);
    expect(releases[0]).toMatchObject({
      severity: 'error', keys: ['AB1'], keyIds: ['k-ab1'], cores: ['R1', 'R2', 'R3'], data: { cores: 3 },
      message: 'Key AB1 lines up the control shear line of 3 cores it is not the control key of: Room 1, Room 2 and Room 3. Whoever holds it can remove those cores.',
    });
  });

  test('the summary counts every core over one opening, the largest count by brute force and the first core with it', () => {
    const counts = system.cores.map((c) => releasingBittings(kit6, c.operating.map((id) => keys.find((k) => k[0] === id)![2])));
    const largest = Math.max(...counts);
    const [summary] = audit().filter((f) => f.code === 'control-openings');
    expect(summary).toMatchObject({ severity: 'info', cores: ['R1', 'R2', 'R3'], data: { cores: 3, coresOverOne: 3, largestControlOpenings: largest } });
    expect(summary?.message).toBe(`Control openings: 3 cores of 3 release for more bittings than the control key (largest ${largest} bittings, core Room ${counts.indexOf(largest) + 1}): Room 1, Room 2 and Room 3.`);
  });

  test('with the usual kit (wafers 2..19) every build-up is one wafer: no key releases, and the summary says the control key alone', () => {
    const usual = auditSystem(sfic6, system);
    expect(usual.filter((f) => f.code === 'key-releases-core')).toEqual([]);
    const [summary] = usual.filter((f) => f.code === 'control-openings');
    expect(summary).toMatchObject({ cores: [], data: { cores: 3, coresOverOne: 0, largestControlOpenings: 1 } });
    expect(summary?.message).toBe('Control openings: each of the 3 pinned cores releases for the control key alone (every build-up is one wafer or its seam releases no other bitting).');
  });

  test('a key cut like the control key is not reported here (control-equals-key says it releases every core)', () => {
    const withTwin = auditSystem(sfic6, { ...system, keys: [...system.keys, { id: 'k-c', symbol: 'C', bitting: '266666', opens: [] }] });
    expect(withTwin.filter((f) => f.code === 'key-releases-core')).toEqual([]);
    expect(withTwin.some((f) => f.code === 'control-equals-key')).toBe(true);
  });

  test('no pinned core (every core’s keys unreadable): no summary', () => {
    const unreadable = auditSystem(sfic6, { ...system, cores: system.cores.map((c) => ({ ...c, operating: ['k-bad'] })), keys: [...system.keys, { id: 'k-bad', symbol: 'BAD', bitting: '12x456', opens: [] }] });
    expect(unreadable.filter((f) => f.code === 'control-openings')).toEqual([]);
  });
});

describe('the control-line findings at their edges (the same example, worked out by hand)', () => {
  test('a key that releases one core: "that core"', () => {
    const one = auditSystem(kit6, { ...system, cores: [system.cores[0]!] });
    expect(one.filter((f) => f.code === 'key-releases-core').map((f) => [f.keys, f.cores, f.message])).toEqual([[
      ['AB1'], ['R1'], 'Key AB1 lines up the control shear line of 1 core it is not the control key of: Room 1. Whoever holds it can remove that core.',
    ]]);
  });

  test('two cores tied for the most control openings: the first one is named', () => {
    const twin = { ...system.cores[0]!, id: 'R1b', label: 'Room 1b' };
    const [summary] = auditSystem(kit6, { ...system, cores: [system.cores[0]!, twin] }).filter((f) => f.code === 'control-openings');
    expect(summary?.message).toMatch(/bittings, core Room 1\): Room 1 and Room 1b\.$/);
  });

  test('the advice follows the count: something to do only when a core releases for more than the control key', () => {
    const [over] = auditSystem(kit6, system).filter((f) => f.code === 'control-openings');
    expect(over?.advice).toMatch(/^Each extra opening comes from a two-wafer build-up/);
    const [alone] = auditSystem(sfic6, system).filter((f) => f.code === 'control-openings');
    expect(alone?.advice).toBe('Nothing to do; keep build-ups to one stocked wafer where you can.');
  });
});
