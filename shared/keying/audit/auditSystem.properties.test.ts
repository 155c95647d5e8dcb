import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import { naiveAudit } from '../../../bench/naiveAudit';
import { readBitting } from '../bitting';
import { keyOperates } from '../keyOperates';
import { pinCore } from '../pinCore';
import { smallProfile, usualProfile } from '../testing/arbitraries';
import type { Profile } from '../types';
import { auditSystem } from './auditSystem';
import type { AuditInput, KeyLevel } from './types';

/*
 * fast-check builds random systems (keys from a few depths so that incidental access,
 * duplicates and close keys are common); the indexed audit must agree with the all-pairs
 * baseline, which tests every key against every core with keyOperates.
 */
function systemArb(profile: Profile): fc.Arbitrary<AuditInput> {
  const depth = fc.integer({ min: profile.minDepth, max: Math.min(profile.maxDepth, profile.minDepth + 4) });
  const bitting = fc.array(depth, { minLength: profile.chambers, maxLength: profile.chambers }).map((d) => d.join(''));
  const level = fc.option(fc.constantFrom<KeyLevel>('grand-master', 'master', 'change'), { nil: undefined });
  return fc.record({
    keyBittings: fc.array(fc.oneof({ weight: 9, arbitrary: bitting }, { weight: 1, arbitrary: fc.string({ maxLength: 8 }) }), { minLength: 1, maxLength: 40 }),
    levels: fc.array(level, { minLength: 40, maxLength: 40 }),
    coreCount: fc.integer({ min: 1, max: 12 }),
    links: fc.array(fc.tuple(fc.nat(), fc.nat(), fc.constantFrom('both', 'core', 'key')), { maxLength: 80 }),
    control: bitting,
    threshold: fc.option(fc.integer({ min: 1, max: 64 }), { nil: undefined }),
  }).map(({ keyBittings, levels, coreCount, links, control, threshold }) => {
    const keys = keyBittings.map((b, i) => {
      const lvl = levels[i];
      return { id: `k${i}`, symbol: `S${i % 7}`, bitting: b, opens: [] as string[], ...(lvl ? { level: lvl } : {}) };
    });
    const cores = Array.from({ length: coreCount }, (_, c) => ({ id: `c${c}`, operating: [] as string[] }));
    for (const [k, c, side] of links) {
      const key = keys[k % keys.length]!;
      const core = cores[c % cores.length]!;
      if (side !== 'key') core.operating.push(key.id);
      if (side !== 'core') key.opens.push(core.id);
    }
    return { keys, cores, control, ...(threshold ? { openingsThreshold: threshold } : {}) };
  });
}

const systems = fc.oneof(usualProfile, smallProfile).chain((profile) => fc.tuple(fc.constant(profile), systemArb(profile)));

describe('auditSystem against the all-pairs baseline', () => {
  test('identical findings on random systems', () => {
    fc.assert(fc.property(systems, ([profile, system]) => {
      expect(auditSystem(profile, system)).toEqual(naiveAudit(profile, system));
    }), { numRuns: 300 });
  });

  test('every key turning a core neither record names is reported for that core', () => {
    fc.assert(fc.property(systems, ([profile, system]) => {
      const findings = auditSystem(profile, system).filter((f) => f.code === 'unintended-access');
      const readable = system.keys.filter((k) => readBitting(profile, k.bitting).ok);
      for (const core of system.cores) {
        const operating = readable.filter((k) => core.operating.includes(k.id));
        const pinning = pinCore(profile, { operating: operating.map((k) => k.bitting), control: system.control });
        for (const key of readable) {
          const intended = core.operating.includes(key.id) || key.opens.includes(core.id);
          const turns = keyOperates(pinning, profile, key.bitting).plug;
          const reported = findings.some((f) => f.keyIds?.[0] === key.id && f.cores?.includes(core.id));
          expect(reported, `${key.id} in ${core.id}`).toBe(turns && !intended);
        }
      }
    }), { numRuns: 150 });
  });
});
