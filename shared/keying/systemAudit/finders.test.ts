import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import { sortCloseGroups, type CloseGroup } from './finders';

/* The order both finders must return close-key groups in: by first key, then by position (checked against a plain sort of the pairs, common practice). */
describe('sortCloseGroups', () => {
  test('by first key, then by position; the same list comes back', () => {
    const groups: CloseGroup[] = [
      { position: 3, keys: [4, 9] }, { position: 0, keys: [4, 5] }, { position: 5, keys: [1, 2] }, { position: 2, keys: [10, 11] }, { position: 1, keys: [1, 7] },
    ];
    const sorted = sortCloseGroups(groups);
    expect(sorted).toBe(groups);
    expect(sorted.map((g) => [g.keys[0], g.position])).toEqual([[1, 1], [1, 5], [4, 0], [4, 3], [10, 2]]);
  });

  test('any list (fast-check): ascending by (first key, position)', () => {
    fc.assert(
      fc.property(fc.array(fc.record({ position: fc.integer({ min: 0, max: 7 }), first: fc.integer({ min: 0, max: 50 }) }), { maxLength: 40 }), (rows) => {
        const out = sortCloseGroups(rows.map((r) => ({ position: r.position, keys: [r.first, r.first + 1] })));
        return out.every((g, i) => i === 0 || out[i - 1]!.keys[0]! < g.keys[0]! || (out[i - 1]!.keys[0] === g.keys[0] && out[i - 1]!.position <= g.position));
      }),
      { seed: 20261202, numRuns: 200 },
    );
  });
});
