import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import { keyExposure, type ExposureInput } from './keyExposure';
import { keyOperates } from './keyOperates';
import { pinCore } from './pinCore';
import { builtInProfiles } from './profiles';
import { allBittings, keyedCore, runs, smallKit, smallProfile, text, usualProfile } from './testing/arbitraries';
import type { Profile } from './types';

const sfic7 = builtInProfiles['sfic-7'] as Profile;

/** The rule itself, core by core: pinCore's chart, then keyOperates (brute force). */
function bruteForce(profile: Profile, input: ExposureInput, key: { id?: string; bitting: string }) {
  const byId = new Map(input.keys.map((k) => [k.id, k.bitting]));
  const out: { core: number; how: string }[] = [];
  input.cores.forEach((core, c) => {
    const operating = core.operating.map((id) => byId.get(id) ?? 'unknown');
    const does = keyOperates(pinCore(profile, { operating, control: input.control }), profile, key.bitting);
    if (does.plug) out.push({ core: c, how: core.operating.includes(key.id ?? '') ? 'intended' : 'incidental' });
    else if (does.control) out.push({ core: c, how: 'control' });
  });
  return out;
}

// Worked example of our own on the primer's layout: a master over two change keys.
describe('keyExposure: worked example (from memory: the primer\'s incidental key)', () => {
  const input: ExposureInput = {
    control: '4444444',
    keys: [
      { id: 'M', bitting: '6666666' },
      { id: 'C1', bitting: '2222222' },
      { id: 'C2', bitting: '2222266' },
    ],
    cores: [
      { id: 'door-1', operating: ['C1', 'M'] },
      { id: 'door-2', operating: ['C2', 'M'] },
      { id: 'door-3', operating: ['C1'] },
    ],
  };
  test('the master turns the cores it is pinned for (intended) and not the core without it', () => {
    expect(keyExposure(sfic7, input, { id: 'M', bitting: '6666666' })).toEqual([{ core: 0, how: 'intended' }, { core: 1, how: 'intended' }]);
  });
  test('a change key turns another core incidentally through its master wafers', () => {
    // C1 (all 2s) in door-2: C2 and the master both cut 6 in chambers 6-7, so those chambers
    // break at 6 only and C1 does not turn door-2.
    expect(keyExposure(sfic7, input, { id: 'C1', bitting: '2222222' })).toEqual([{ core: 0, how: 'intended' }, { core: 2, how: 'intended' }]);
    // C2 (2s, then 6 6) in door-1: chambers 1-5 break at 2 (C1), 6-7 at 6 (master wafers): incidental.
    expect(keyExposure(sfic7, input, { id: 'C2', bitting: '2222266' })).toEqual([{ core: 0, how: 'incidental' }, { core: 1, how: 'intended' }]);
  });
  test('the control key removes every core (primer: a lost control key exposes every core)', () => {
    expect(keyExposure(sfic7, input, { bitting: '4444444' })).toEqual([0, 1, 2].map((core) => ({ core, how: 'control' })));
  });
  test('equals keyOperates on every core (brute force)', () => {
    for (const k of input.keys) expect(keyExposure(sfic7, input, k)).toEqual(bruteForce(sfic7, input, k));
  });
  test('a core with an unreadable or unknown key has no chart and exposes nothing, as keyOperates on an empty chart', () => {
    const bad: ExposureInput = { ...input, keys: [...input.keys, { id: 'X', bitting: '22' }], cores: [{ id: 'a', operating: ['C1', 'X'] }, { id: 'b', operating: ['nope'] }, { id: 'c', operating: [] }] };
    expect(keyExposure(sfic7, bad, { id: 'C1', bitting: '2222222' })).toEqual([]);
    expect(bruteForce(sfic7, bad, { id: 'C1', bitting: '2222222' })).toEqual([]);
  });
  test('an unreadable key throws, as keyOperates does', () => {
    expect(() => keyExposure(sfic7, input, { bitting: '22' })).toThrow(expect.objectContaining({ code: 'bitting-length' }));
  });
});

/** A random system: cores made of keys from one progression, keyed the usual way. */
const system = (profiles: fc.Arbitrary<Profile>) =>
  fc.array(keyedCore(profiles, 4), { minLength: 1, maxLength: 6 }).filter((cores) => cores.every((c) => c.profile === cores[0]!.profile)).map((cores) => {
    const profile = cores[0]!.profile;
    const control = text(cores[0]!.control);
    const keys: { id: string; bitting: string }[] = [];
    const idOf = (b: string) => {
      let k = keys.find((x) => x.bitting === b);
      if (!k) keys.push((k = { id: `k${keys.length}`, bitting: b }));
      return k.id;
    };
    const input: ExposureInput = { control, keys, cores: cores.map((c, i) => ({ id: `c${i}`, operating: c.operating.map((d) => idOf(text(d))) })) };
    return { profile, input };
  });

describe('keyExposure equals keyOperates over pinCore (fast-check, brute force)', () => {
  test('every stored key, in random systems on the usual profiles', () => {
    fc.assert(
      fc.property(system(usualProfile), ({ profile, input }) => {
        for (const k of input.keys) expect(keyExposure(profile, input, k)).toEqual(bruteForce(profile, input, k));
        expect(keyExposure(profile, input, { bitting: input.control })).toEqual(bruteForce(profile, input, { bitting: input.control }));
      }),
      { numRuns: runs(200) },
    );
  }, 60_000);
  test('every bitting of a small profile, with two-wafer seams (smallKit-style stock) included', () => {
    fc.assert(
      fc.property(system(smallProfile), fc.boolean(), ({ profile, input }, kit) => {
        const p = kit ? { ...smallKit(profile), wafers: [1, 2, 3], topPins: profile.topPins } : profile;
        for (const depths of allBittings(p)) {
          const key = { bitting: text(depths) };
          expect(keyExposure(p, input, key)).toEqual(bruteForce(p, input, key));
        }
      }),
      { numRuns: runs(30) },
    );
  }, 60_000);
  test('a profile edited in place is never read from stale masks (the chamber cache refreshes, and these masks with it)', () => {
    const p: Profile = { ...sfic7, wafers: [...sfic7.wafers] };
    const input: ExposureInput = { control: '2222222', keys: [{ id: 'a', bitting: '0000000' }], cores: [{ id: 'c', operating: ['a'] }] };
    const before = keyExposure(p, input, { bitting: '0000000' });
    expect(before).toEqual(bruteForce(p, input, { bitting: '0000000' }));
    p.wafers.splice(0, p.wafers.length, 2, 3, 4, 5, 6, 7, 8, 9, 10);
    expect(keyExposure(p, input, { bitting: '1000000' })).toEqual(bruteForce(p, input, { bitting: '1000000' }));
  });
});
