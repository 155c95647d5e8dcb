import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import { builtInProfiles } from '../profiles';
import type { Profile } from '../types';
import { buildContext, type SystemAuditContext } from './context';
import { KeyList, keysMatching } from './enumerate';

/*
 * The audit's two search helpers against brute force (common practice: an optimised search
 * is checked against the obvious loop). KeyList against Array.prototype.sort; keysMatching
 * against "every key whose cut in each chamber is one of that chamber's allowed depths".
 */
const profile = builtInProfiles['sfic-6'] as Profile;

describe('KeyList', () => {
  test.each([0, 1, 2, 31, 32, 33, 255, 256, 257, 1000])('%i keys come out ascending, then the list is empty and reusable', (n) => {
    const list = new KeyList();
    const pushed = Array.from({ length: n }, (_, i) => (i * 7919 + 13) % 1009);
    for (const k of pushed) list.push(k);
    expect(list.length).toBe(n);
    expect(list.takeAscending()).toEqual([...pushed].sort((a, b) => a - b));
    expect(list.length).toBe(0);
    list.push(5);
    list.push(2);
    expect(list.takeAscending()).toEqual([2, 5]);
  });

  test('random lists, duplicates included (fast-check)', () => {
    fc.assert(
      fc.property(fc.array(fc.integer({ min: 0, max: 100_000 }), { maxLength: 700 }), (keys) => {
        const list = new KeyList();
        for (const k of keys) list.push(k);
        const sorted = [...keys].sort((a, b) => a - b);
        const out = list.takeAscending();
        return out.length === sorted.length && out.every((k, i) => k === sorted[i]);
      }),
      { seed: 20261202, numRuns: 60 },
    );
  });
});

const bitting = fc.array(fc.integer({ min: 0, max: 9 }), { minLength: 6, maxLength: 6 }).map((d) => d.join(''));

function contextOf(bittings: string[]): SystemAuditContext {
  const ctx = buildContext(profile, {
    control: '999999',
    keys: bittings.map((b, i) => ({ id: `k${i}`, symbol: `K${i}`, bitting: b, opens: [] })),
    cores: [],
  });
  if (!ctx) throw new Error('the control bitting is readable');
  return ctx;
}

/** Brute force: every readable key, cut by cut. */
function bruteForce(ctx: SystemAuditContext, masks: Int32Array): number[] {
  return ctx.validKeys.filter((k) => (ctx.depths[k] as number[]).every((d, i) => ((masks[i] as number) >> d) & 1));
}

function found(ctx: SystemAuditContext, masks: Int32Array, count: number): number[] {
  const out = new KeyList();
  keysMatching(ctx, masks, count, out);
  return out.takeAscending();
}

describe('keysMatching', () => {
  test('both ways of searching (bitting look-up, scan of every key) find exactly the brute-force keys (fast-check)', () => {
    const mask = fc.integer({ min: 0, max: 1023 });
    fc.assert(
      fc.property(fc.array(bitting, { minLength: 1, maxLength: 60 }), fc.array(mask, { minLength: 6, maxLength: 6 }), fc.nat(), (bittings, m, pick) => {
        // Half the runs make sure at least one key matches: the masks hold one key's cuts.
        const chosen = bittings[pick % bittings.length] as string;
        const masks = Int32Array.from(m, (x, i) => (pick % 2 ? x | (1 << Number(chosen[i])) : x));
        const ctx = contextOf(bittings);
        const expected = bruteForce(ctx, masks);
        const lookUp = found(ctx, masks, 0);
        const scan = found(ctx, masks, Number.MAX_SAFE_INTEGER);
        return JSON.stringify(lookUp) === JSON.stringify(expected) && JSON.stringify(scan) === JSON.stringify(expected);
      }),
      { seed: 20261202, numRuns: 200 },
    );
  });

  test('keys cut alike are all found, and an unreadable bitting never is', () => {
    const ctx = contextOf(['123456', '123456', 'not a bitting', '123457', '123456']);
    const masks = Int32Array.from([1 << 1, 1 << 2, 1 << 3, 1 << 4, 1 << 5, (1 << 6) | (1 << 7)]);
    expect(found(ctx, masks, 0)).toEqual([0, 1, 3, 4]);
    expect(found(ctx, masks, Number.MAX_SAFE_INTEGER)).toEqual([0, 1, 3, 4]);
    expect(found(ctx, Int32Array.from([0, 0, 0, 0, 0, 0]), 0)).toEqual([]);
  });

  /*
   * Which way it searches: looking bittings up while the openings count is at most 256 or an
   * eighth of the keys, scanning the keys above that. A context whose key list is empty (or
   * lists one key that does not match, many times) tells the two apart: the look-up still
   * finds the matching keys through the bitting table, the scan finds none.
   */
  test('the look-up up to 256 openings, the scan above', () => {
    const ctx = contextOf(['123456', '654321']);
    const masks = Int32Array.from([1 << 1, 1 << 2, 1 << 3, 1 << 4, 1 << 5, 1 << 6]);
    const blind = { ...ctx, validKeys: [] };
    expect(found(blind, masks, 256)).toEqual([0]);
    expect(found(blind, masks, 257)).toEqual([]);
  });

  test('with many keys, the look-up up to an eighth of them', () => {
    const ctx = contextOf(['123456', '654321']);
    const masks = Int32Array.from([1 << 1, 1 << 2, 1 << 3, 1 << 4, 1 << 5, 1 << 6]);
    const many = { ...ctx, validKeys: new Array<number>(4000).fill(1) };
    expect(found(many, masks, 500)).toEqual([0]);
    expect(found(many, masks, 501)).toEqual([]);
  });
});
