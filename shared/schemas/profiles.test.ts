// One profile shape, one validator: the API's zod `Profile` and the engine's validateProfile
// accept and refuse the same profiles, at both edges of every limit in shared/keying/limits.ts
// (boundary-value analysis: min-1, min, max, max+1; common practice) and for random values (fast-check).
import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import {
  adjacentCutRange, builtInProfiles, chamberRange, depthRange, partSizeRange, sleeveRange, stackRange, stepRange, stockedSizesRange,
  validateProfile, waferRange, type Profile as EngineProfile, type Range,
} from '../keying';
import { Profile } from './profiles';

const sfic7 = { ...builtInProfiles['sfic-7']!, id: 'edge-test' };
/** Depths 0..1 and a 2-unit sleeve need only a 4-unit stack, so the stack's own minimum decides. */
const shallow: EngineProfile = { ...sfic7, minDepth: 0, maxDepth: 1, sleeveUnits: 2, stackUnits: stackRange.min, maxAdjacentCut: 1 };

interface Edge {
  limit: string;
  range: Range;
  /** The profile with the value put in. */
  at: (v: number) => EngineProfile;
  /** The field both validators name. */
  field: keyof EngineProfile;
}

const sizes = (n: number) => Array.from({ length: n }, (_, i) => 2 + (i % 18));
const edges: Edge[] = [
  { limit: 'chambers', range: chamberRange, at: (v) => ({ ...sfic7, chambers: v }), field: 'chambers' },
  { limit: 'shallowest depth', range: { min: depthRange.min, max: depthRange.max - 1 }, at: (v) => ({ ...sfic7, minDepth: v }), field: 'minDepth' },
  { limit: 'deepest depth', range: { min: depthRange.min + 1, max: depthRange.max }, at: (v) => ({ ...sfic7, minDepth: 0, maxDepth: v, sleeveUnits: Math.max(v + 1, 2), stackUnits: stackRange.max }), field: 'minDepth' },
  { limit: 'step', range: stepRange, at: (v) => ({ ...sfic7, step: v }), field: 'step' },
  { limit: 'stack (low end, shallow profile)', range: { min: stackRange.min, max: stackRange.max }, at: (v) => ({ ...shallow, stackUnits: v }), field: 'stackUnits' },
  { limit: 'stack (high end)', range: { min: 20, max: stackRange.max }, at: (v) => ({ ...sfic7, stackUnits: v }), field: 'stackUnits' },
  { limit: 'sleeve (low end, shallow profile)', range: { min: sleeveRange.min, max: sleeveRange.max }, at: (v) => ({ ...shallow, sleeveUnits: v, stackUnits: stackRange.max }), field: 'sleeveUnits' },
  { limit: 'sleeve (high end)', range: { min: 10, max: sleeveRange.max }, at: (v) => ({ ...sfic7, sleeveUnits: v, stackUnits: stackRange.max }), field: 'sleeveUnits' },
  { limit: 'thinnest wafer', range: waferRange, at: (v) => ({ ...sfic7, minWaferUnits: v }), field: 'minWaferUnits' },
  { limit: 'maximum adjacent cut', range: adjacentCutRange, at: (v) => ({ ...sfic7, maxAdjacentCut: v }), field: 'maxAdjacentCut' },
  { limit: 'a stocked part size', range: partSizeRange, at: (v) => ({ ...sfic7, wafers: [...sfic7.wafers, v] }), field: 'wafers' },
  { limit: 'how many sizes are stocked', range: stockedSizesRange, at: (v) => ({ ...sfic7, topPins: sizes(v) }), field: 'topPins' },
];

/** Both verdicts on one profile, and the fields each names. */
function verdicts(profile: unknown) {
  const zod = Profile.safeParse(profile);
  const engine = validateProfile(profile as EngineProfile);
  return {
    zod: zod.success,
    engine: engine.length === 0,
    zodFields: zod.success ? [] : [...new Set(zod.error.issues.map((i) => String(i.path[0])))].sort(),
    engineFields: [...new Set(engine.map((p) => p.field))].sort(),
  };
}

describe('the zod Profile and validateProfile agree at every limit (boundary values: min-1, min, max, max+1)', () => {
  const cases = edges.flatMap((e) => [
    [e.limit, e.range.min - 1, false, e] as const,
    [e.limit, e.range.min, true, e] as const,
    [e.limit, e.range.max, true, e] as const,
    [e.limit, e.range.max + 1, false, e] as const,
  ]);
  test.each(cases)('%s = %i: accepted %s by both', (_limit, value, accepted, e) => {
    const v = verdicts(e.at(value));
    expect(v.engine).toBe(accepted);
    expect(v.zod).toBe(accepted);
    if (!accepted) {
      expect(v.engineFields).toEqual([e.field]);
      expect(v.zodFields).toEqual([e.field]);
    }
  });

  test('the limits are the ones the trade uses: 5 to 8 chambers, depths 0 to 9, step 1 or 2 (keying primer; common practice)', () => {
    expect([chamberRange.min, chamberRange.max, depthRange.min, depthRange.max, stepRange.min, stepRange.max]).toEqual([5, 8, 0, 9, 1, 2]);
  });

  test('a fraction, a number as text, a missing field: refused by zod; the engine refuses the fraction too', () => {
    expect(verdicts({ ...sfic7, chambers: 6.5 })).toMatchObject({ zod: false, engine: false, zodFields: ['chambers'], engineFields: ['chambers'] });
    expect(Profile.safeParse({ ...sfic7, chambers: '7' }).success).toBe(false);
    const { step: _step, ...noStep } = sfic7;
    expect(Profile.safeParse(noStep).success).toBe(false);
    expect(Profile.safeParse({ ...sfic7, extra: 1 }).success).toBe(false);
  });

  test('the built-in profiles pass both (control)', () => {
    for (const p of Object.values(builtInProfiles)) expect(verdicts(p)).toMatchObject({ zod: true, engine: true });
  });

  test('for any whole numbers in the profile fields, the two verdicts and the fields they name are the same (fast-check)', () => {
    const numeric = ['chambers', 'minDepth', 'maxDepth', 'stackUnits', 'sleeveUnits', 'minWaferUnits', 'step', 'maxAdjacentCut'] as const;
    fc.assert(
      fc.property(fc.record(Object.fromEntries(numeric.map((k) => [k, fc.integer({ min: -2, max: 64 })])) as Record<(typeof numeric)[number], fc.Arbitrary<number>>), fc.array(fc.integer({ min: -2, max: 33 }), { maxLength: 42 }), (values, wafers) => {
        const v = verdicts({ ...sfic7, ...values, wafers });
        expect(v.zod).toBe(v.engine);
        expect(v.zodFields).toEqual(v.engineFields);
      }),
      { seed: 20261202, numRuns: 500 },
    );
  });
});
