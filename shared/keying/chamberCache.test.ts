import { describe, expect, test } from 'vitest';
import { chamberKey, freezeChamber, profileCache } from './chamberCache';
import { builtInProfiles } from './profiles';
import type { Profile } from './types';

const fresh = (): Profile => structuredClone(builtInProfiles['sfic-7'] as Profile);

/*
 * The chamber cache is keyed by the profile's content, not only its object: a profile
 * edited in place (a shop changing its stock) must never be pinned from stale figures
 * (common practice: a cache is invalidated by what it was computed from).
 */
describe('profileCache follows the profile’s content', () => {
  test('the same profile, unchanged, keeps its cache', () => {
    const p = fresh();
    expect(profileCache(p)).toBe(profileCache(p));
  });

  const figures = ['chambers', 'minDepth', 'maxDepth', 'stackUnits', 'sleeveUnits', 'minWaferUnits', 'step'] as const;
  test.each(figures)('editing %s in place starts a fresh cache', (field) => {
    const p = fresh();
    const before = profileCache(p);
    (p as unknown as Record<string, number>)[field] = p[field] + 1;
    const after = profileCache(p);
    expect(after).not.toBe(before);
    expect(profileCache(p)).toBe(after);
  });

  const lists = ['bottomPins', 'wafers', 'topPins'] as const;
  test.each(lists)('editing the stocked %s in place (a size changed, or one more size) starts a fresh cache', (field) => {
    const p = fresh();
    const before = profileCache(p);
    p[field][0] = (p[field][0] as number) + 100;
    const changed = profileCache(p);
    expect(changed).not.toBe(before);
    expect(changed.stock.profile[field][0]).toBe(p[field][0]);
    p[field].push(99);
    expect(profileCache(p)).not.toBe(changed);
  });
});

describe('chamberKey', () => {
  test('is one-to-one over every chamber, depth set and control depth a profile allows (brute force: 8 chambers × 1,024 masks × 16 depths)', () => {
    const seen = new Set<number>();
    for (let i = 0; i < 8; i++) for (let m = 0; m < 1024; m++) for (let c = 0; c < 16; c++) seen.add(chamberKey(i, m, c));
    expect(seen.size).toBe(8 * 1024 * 16);
  });
});

describe('profileCache bounds and snapshots (common practice: a cache is bounded and never aliases its source)', () => {
  test('a cache that reached 50,000 chambers is started afresh; one below that is kept', () => {
    const p = fresh();
    const c = profileCache(p);
    for (let i = 0; i < 49_999; i++) c.entries.set(i, {} as never);
    expect(profileCache(p)).toBe(c);
    c.entries.set(49_999, {} as never);
    const next = profileCache(p);
    expect(next).not.toBe(c);
    expect(next.entries.size).toBe(0);
  });

  test('the stock table describes the sizes as they were checked, not the profile’s live lists', () => {
    const p = fresh();
    const c = profileCache(p);
    const wafers = [...c.stock.profile.wafers];
    p.wafers.push(25);
    expect(c.stock.profile.wafers).toEqual(wafers);
    expect(c.lists[1]).toEqual(wafers);
    expect(profileCache(p).stock.profile.wafers).toEqual([...wafers, 25]);
  });

  test('two profiles with the same content keep separate caches', () => {
    const a = fresh();
    const b = fresh();
    expect(profileCache(a)).not.toBe(profileCache(b));
  });
});

describe('freezeChamber', () => {
  test('the chamber and its lists are frozen, and the same object comes back', () => {
    const ch = { chamber: 1, depths: [2, 4], bottom: 2, masters: [2], buildUp: [12], top: 5, total: 21 };
    const frozen = freezeChamber(ch);
    expect(frozen).toBe(ch);
    for (const part of [frozen, frozen.depths, frozen.masters, frozen.buildUp]) expect(Object.isFrozen(part)).toBe(true);
  });
});
