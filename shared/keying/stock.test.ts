import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import { builtInProfiles } from './profiles';
import { hasBottom, hasTop, hasWafer, stockTable } from './stock';
import type { Profile } from './types';

/*
 * The stock table is a fast lookup of "is this size in the drawer?". Its oracle is the
 * plain list itself (brute force: Array.prototype.includes over the profile's lists), for
 * every size a custom profile might hold: negative, fractional, past the 31-bit mask and
 * the edges 0, 30 and 31 (common practice: a lookup table must agree with its source).
 */
const base = builtInProfiles['sfic-7'] as Profile;
const withStock = (bottomPins: number[], wafers: number[], topPins: number[]): Profile => ({ ...base, bottomPins, wafers, topPins });

const probes = [-31, -2, -1, -0.5, 0, 0.5, 1, 2, 2.5, 9, 19, 29, 29.5, 30, 30.5, 31, 32, 33, 40, 62, 63, 64];

describe('stock lookups agree with the profile’s own lists (brute force)', () => {
  test('edges of the mask: 0, 30 and 31, 32 and 63 (a 32-bit shift wraps), and sizes beyond', () => {
    const p = withStock([0, 30], [31, 32, 2], [63, 40, 1]);
    const t = stockTable(p);
    for (const s of probes) {
      expect(hasBottom(t, s), `bottom ${s}`).toBe(p.bottomPins.includes(s));
      expect(hasWafer(t, s), `wafer ${s}`).toBe(p.wafers.includes(s));
      expect(hasTop(t, s), `top ${s}`).toBe(p.topPins.includes(s));
    }
  });

  test('sizes that are not whole units, or negative, never set a bit for another size', () => {
    // 2.5 would set bit 2 if the mask took it, -1 would set bit 31 (1 << -1), 33 would set bit 1.
    const t = stockTable(withStock([2.5, -1, 33], [-2, 64], [30.5]));
    for (const s of [0, 1, 2, 3, 30, 31]) {
      expect(hasBottom(t, s), `bottom ${s}`).toBe(false);
      expect(hasWafer(t, s), `wafer ${s}`).toBe(false);
      expect(hasTop(t, s), `top ${s}`).toBe(false);
    }
    expect(hasBottom(t, 33)).toBe(true);
    expect(hasBottom(t, 2.5)).toBe(true);
    expect(hasBottom(t, -1)).toBe(true);
    expect(hasWafer(t, 64)).toBe(true);
    expect(hasTop(t, 30.5)).toBe(true);
  });

  test('random stock lists (fast-check): every probe answers as includes() does', () => {
    const size = fc.oneof(fc.integer({ min: -3, max: 70 }), fc.constantFrom(0.5, 2.5, 30.5, -0.5));
    fc.assert(
      fc.property(fc.array(size, { maxLength: 12 }), fc.array(size, { maxLength: 12 }), fc.array(size, { maxLength: 12 }), (b, w, tp) => {
        const p = withStock(b, w, tp);
        const t = stockTable(p);
        for (const s of [...probes, ...b, ...w, ...tp]) {
          if (hasBottom(t, s) !== b.includes(s) || hasWafer(t, s) !== w.includes(s) || hasTop(t, s) !== tp.includes(s)) return false;
        }
        return true;
      }),
      { seed: 20261202, numRuns: 300 },
    );
  });

  test('the built-in profiles: every stocked size is found, and the sizes next to the stock are not', () => {
    for (const p of Object.values(builtInProfiles)) {
      const t = stockTable(p);
      for (const s of p.wafers) expect(hasWafer(t, s)).toBe(true);
      for (const s of p.bottomPins) expect(hasBottom(t, s)).toBe(true);
      for (const s of p.topPins) expect(hasTop(t, s)).toBe(true);
      expect(hasWafer(t, Math.max(...p.wafers) + 1)).toBe(false);
      expect(hasBottom(t, -1)).toBe(false);
    }
  });
});
