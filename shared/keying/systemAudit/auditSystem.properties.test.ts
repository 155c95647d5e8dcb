import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import { readBitting } from '../bitting';
import { keyOperates } from '../keyOperates';
import { pinCore } from '../pinCore';
import { runs, smallKit, smallProfile, usualProfile } from '../testing/arbitraries';
import type { Profile } from '../types';
import { auditSystem } from './auditSystem';
import type { SystemAuditInput, KeyLevel } from './types';

/*
 * fast-check builds random systems (keys from a few depths so that incidental access,
 * duplicates and close keys are common). The audit is compared with brute force written
 * from the records alone (not with another finder over the same context), and with
 * keyOperates on charts pinned afresh.
 */
function systemArb(profile: Profile): fc.Arbitrary<SystemAuditInput> {
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

// A kit of wafers 2..10 makes two-wafer seams, so keys that release cores are common too.
const systems = fc.oneof(usualProfile, smallProfile, usualProfile.map(smallKit)).chain((profile) => fc.tuple(fc.constant(profile), systemArb(profile)));

/**
 * The access findings worked out by brute force from the records alone, sharing nothing
 * with the audit's context: a core's chart accepts, in each chamber, the depths of the
 * readable keys the core lists (keying primer, "Incidental keys": a core opens for any key
 * whose depth in every chamber is one of that chamber's operating depths).
 */
function bruteAccess(profile: Profile, system: SystemAuditInput): Set<string> {
  const depthsOf = new Map<string, number[]>();
  for (const k of system.keys) {
    const t = k.bitting.trim();
    const ok = t.length === profile.chambers && [...t].every((ch) => ch >= '0' && ch <= '9' && Number(ch) >= profile.minDepth && Number(ch) <= profile.maxDepth);
    if (ok && !depthsOf.has(k.id)) depthsOf.set(k.id, [...t].map(Number));
  }
  const firstOf = new Map<string, SystemAuditInput['keys'][number]>();
  for (const k of system.keys) if (!firstOf.has(k.id)) firstOf.set(k.id, k);
  const out = new Set<string>();
  const seenCores = new Set<string>();
  for (const core of system.cores) {
    if (seenCores.has(core.id)) continue;
    seenCores.add(core.id);
    const listed = core.operating.filter((id) => depthsOf.has(id));
    const accepts = Array.from({ length: profile.chambers }, (_, i) => new Set(listed.map((id) => depthsOf.get(id)![i])));
    system.keys.forEach((key, index) => {
      const d = depthsOf.get(key.id);
      if (!d || firstOf.get(key.id) !== key) return;
      const turns = listed.length > 0 && d.every((x, i) => accepts[i]!.has(x));
      const byCore = core.operating.includes(key.id);
      const byKey = key.opens.includes(core.id);
      if (turns && !byCore && !byKey) out.add(`unintended-access ${index} ${core.id}`);
      if (byKey && !turns) out.add(`intended-key-fails ${index} ${core.id}`);
      if ((byKey && turns && !byCore) || (byCore && !byKey)) out.add(`records-disagree ${index} ${core.id}`);
    });
  }
  return out;
}

describe('auditSystem against independent oracles (fast-check, brute force)', () => {
  test('access findings: exactly the (key, core) pairs brute force over the records finds', () => {
    fc.assert(fc.property(systems, ([profile, system]) => {
      const found = new Set<string>();
      for (const f of auditSystem(profile, system)) {
        if (f.code !== 'unintended-access' && f.code !== 'intended-key-fails' && f.code !== 'records-disagree') continue;
        const index = system.keys.findIndex((k) => k.id === f.keyIds?.[0]);
        for (const c of f.cores ?? []) found.add(`${f.code} ${index} ${c}`);
      }
      expect([...found].sort()).toEqual([...bruteAccess(profile, system)].sort());
    }), { numRuns: runs(200) });
  }, 60_000);

  test('duplicates and the control key: keys sharing one readable bitting are named together', () => {
    fc.assert(fc.property(systems, ([profile, system]) => {
      const findings = auditSystem(profile, system);
      if (!readBitting(profile, system.control).ok) return;
      const readable = system.keys.filter((k) => readBitting(profile, k.bitting).ok);
      const groups = new Map<string, string[]>();
      for (const k of readable) groups.set(k.bitting.trim(), [...(groups.get(k.bitting.trim()) ?? []), k.id]);
      const expected = [...groups.values()].filter((g) => g.length > 1).map((g) => g.join(' ')).sort();
      expect(findings.filter((f) => f.code === 'duplicate-bitting').map((f) => (f.keyIds ?? []).join(' ')).sort()).toEqual(expected);
      const asControl = readable.filter((k) => k.bitting.trim() === system.control.trim()).map((k) => k.id);
      expect(findings.filter((f) => f.code === 'control-equals-key').flatMap((f) => f.keyIds ?? [])).toEqual(asControl);
    }), { numRuns: runs(200) });
  }, 60_000);
});

describe('auditSystem: the expensive searches', () => {
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
    }), { numRuns: runs(150) });
  }, 60_000);

  test('every key that releases a core, other than one cut like the control key, is reported for that core', () => {
    fc.assert(fc.property(systems, ([profile, system]) => {
      const findings = auditSystem(profile, system).filter((f) => f.code === 'key-releases-core');
      const readable = system.keys.filter((k) => readBitting(profile, k.bitting).ok);
      const control = system.control.trim();
      for (const core of system.cores) {
        const operating = readable.filter((k) => core.operating.includes(k.id));
        const pinning = pinCore(profile, { operating: operating.map((k) => k.bitting), control: system.control });
        for (const key of readable) {
          const releases = keyOperates(pinning, profile, key.bitting).control && key.bitting.trim() !== control;
          const reported = findings.some((f) => f.keyIds?.[0] === key.id && f.cores?.includes(core.id));
          expect(reported, `${key.id} in ${core.id}`).toBe(releases);
        }
      }
    }), { numRuns: runs(150) });
  }, 60_000);
});

describe('auditSystem: the control openings summary against pinCore core by core', () => {
  test('counts the pinned cores, those releasing for more than the control key, and names the first core with the largest count (brute force over pinCore)', () => {
    fc.assert(fc.property(systems, ([profile, system]) => {
      const findings = auditSystem(profile, system);
      const readable = system.keys.filter((k) => readBitting(profile, k.bitting).ok);
      const pinnings = system.cores.map((core) => pinCore(profile, { operating: readable.filter((k) => core.operating.includes(k.id)).map((k) => k.bitting), control: system.control }));
      const pinned = pinnings.filter((p) => p.chambers.length > 0).length;
      const summary = findings.filter((f) => f.code === 'control-openings');
      if (!readBitting(profile, system.control).ok) return;
      if (pinned === 0) {
        expect(summary).toEqual([]);
        return;
      }
      const more = system.cores.filter((_, c) => pinnings[c]!.chambers.length > 0 && pinnings[c]!.controlOpeningsCount > 1).map((c) => c.id);
      let largest = 0;
      let first = -1;
      pinnings.forEach((p, c) => {
        if (p.chambers.length > 0 && p.controlOpeningsCount > largest) [largest, first] = [p.controlOpeningsCount, c];
      });
      expect(summary).toHaveLength(1);
      expect(summary[0]).toMatchObject({ severity: 'info', cores: more, data: { cores: pinned, coresOverOne: more.length, largestControlOpenings: largest } });
      if (more.length === 0) expect(summary[0]!.message).toMatch(/^Control openings: each of the /);
      else expect(summary[0]!.message).toContain(`core ${system.cores[first]!.label ?? system.cores[first]!.id})`);
      for (const f of findings.filter((x) => x.code === 'key-releases-core')) expect(f.data).toEqual({ cores: f.cores!.length });
    }), { numRuns: runs(150) });
  }, 60_000);
});
