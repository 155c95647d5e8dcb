import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import { hasErrors } from './errors';
import { keyOperates } from './keyOperates';
import { pinCore } from './pinCore';
import { allBittings, keyedCore, runs, smallProfile, text, type KeyedCore, usualProfile } from './testing/arbitraries';

/*
 * Property checks with fast-check as the outside reference. The brute-force side never
 * looks at the chart: a bitting should turn the plug exactly when, in every chamber, its
 * cut equals the cut of some operating key.
 */
const bruteForceTurns = (core: KeyedCore, bitting: readonly number[]): boolean =>
  bitting.every((d, i) => core.operating.some((key) => key[i] === d));

const pin = (core: KeyedCore) =>
  pinCore(core.profile, { operating: core.operating.map(text), control: text(core.control) });

const cores = fc.oneof(keyedCore(usualProfile), keyedCore(smallProfile));

describe('pinCore properties', () => {
  test('every intended key turns its core and the control key releases it', () => {
    fc.assert(fc.property(cores, (core) => {
      const pinning = pin(core);
      fc.pre(!hasErrors(pinning));
      for (const key of core.operating) expect(keyOperates(pinning, core.profile, key).plug).toBe(true);
      expect(keyOperates(pinning, core.profile, core.control)).toEqual({ plug: false, control: true });
    }), { numRuns: runs(400) });
  });

  test('a random bitting turns the plug exactly when brute force says so', () => {
    const withBitting = cores.chain((core) =>
      fc.tuple(
        fc.constant(core),
        fc.oneof(
          fc.array(fc.integer({ min: core.profile.minDepth, max: core.profile.maxDepth }), { minLength: core.profile.chambers, maxLength: core.profile.chambers }),
          // Mixes of the operating keys' cuts, so "turns" is often true too.
          fc.tuple(...core.operating[0]!.map((_, i) => fc.constantFrom(...core.operating.map((k) => k[i] as number)))),
        ),
      ));
    fc.assert(fc.property(withBitting, ([core, bitting]) => {
      const pinning = pin(core);
      fc.pre(pinning.chambers.length > 0);
      expect(keyOperates(pinning, core.profile, bitting).plug).toBe(bruteForceTurns(core, bitting));
    }), { numRuns: runs(500) });
  });

  test('openings count equals the brute-force count over every bitting of a small profile', () => {
    fc.assert(fc.property(keyedCore(smallProfile), (core) => {
      const pinning = pin(core);
      fc.pre(pinning.chambers.length > 0);
      let turning = 0;
      let byDefinition = 0;
      for (const bitting of allBittings(core.profile)) {
        if (keyOperates(pinning, core.profile, bitting).plug) turning++;
        if (bruteForceTurns(core, bitting)) byDefinition++;
      }
      expect(pinning.openingsCount).toBe(turning);
      expect(pinning.openingsCount).toBe(byDefinition);
    }), { numRuns: runs(60) });
  });

  test('every chamber totals the stack whenever the chart has no stack error', () => {
    fc.assert(fc.property(cores, (core) => {
      const pinning = pin(core);
      fc.pre(!pinning.issues.some((i) => i.code === 'stack-mismatch'));
      for (const ch of pinning.chambers) {
        const sum = ch.bottom + ch.masters.reduce((a, b) => a + b, 0) + ch.buildUp.reduce((a, b) => a + b, 0) + ch.top;
        expect(sum).toBe(core.profile.stackUnits);
        expect(ch.total).toBe(core.profile.stackUnits);
      }
    }), { numRuns: runs(400) });
  });

  test('pinCore never throws, whatever it is given', () => {
    const junk = fc.string({ maxLength: 9 });
    fc.assert(fc.property(usualProfile, fc.array(junk, { maxLength: 4 }), junk, (profile, operating, control) => {
      const pinning = pinCore(profile, { operating, control });
      expect(Array.isArray(pinning.issues)).toBe(true);
    }), { numRuns: runs(300) });
  });
});
