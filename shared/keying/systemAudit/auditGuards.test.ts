import { describe, expect, test } from 'vitest';
import { builtInProfiles } from '../profiles';
import type { Profile } from '../types';
import { auditSystem } from './auditSystem';

const sfic6 = builtInProfiles['sfic-6'] as Profile;

/*
 * Systems at the edges of what the audit accepts, each small enough to check by hand:
 * nothing to audit, a core whose pinning cannot be made, and a one-step profile where
 * every depth is a candidate for a test cut.
 */
describe('the audit at its edges', () => {
  test('a system with no keys and no cores has nothing to report and no top master to expose (common practice)', () => {
    const findings = auditSystem(sfic6, { control: '135791', keys: [], cores: [] });
    expect(findings.filter((f) => f.code === 'rights-amplification')).toEqual([]);
  });

  test('a core whose only key has the wrong number of cuts is not searched for releasing keys, and the audit still answers (common practice)', () => {
    const findings = auditSystem(sfic6, {
      control: '135791',
      topMaster: 'm',
      keys: [
        { id: 'm', symbol: 'A', bitting: '444444', level: 'grand-master', opens: ['ok'] },
        { id: 'short', symbol: 'AA1', bitting: '44444', level: 'change', opens: ['bad'] },
        { id: 'k', symbol: 'AA2', bitting: '224444', level: 'change', opens: ['ok'] },
      ],
      cores: [
        { id: 'bad', operating: ['short'] },
        { id: 'ok', operating: ['k', 'm'] },
      ],
    });
    expect(findings.length).toBeGreaterThan(0);
    // The control key releases the good core only: no finding names the unpinnable core as released by a key.
    const releases = findings.filter((f) => f.code.startsWith('control') || f.code.includes('release'));
    for (const f of releases) expect(f.cores ?? []).not.toContain('bad');
  });

  test('one-step progression: every other depth of a position is a test cut (M. Blaze, IEEE S&P 2003; by hand: 9 per position)', () => {
    const oneStep: Profile = { ...sfic6, step: 1 };
    const findings = auditSystem(oneStep, {
      control: '135791',
      topMaster: 'a',
      keys: [
        { id: 'a', symbol: 'A', bitting: '444444', level: 'grand-master', opens: [] },
        { id: 'a1', symbol: 'A1', bitting: '344444', level: 'change', opens: [] },
      ],
      cores: [],
    });
    const ra = findings.find((f) => f.code === 'rights-amplification');
    expect(ra).toMatchObject({ chambers: [1], data: { positionsMastered: 1, chambers: 6, testCuts: 9, testCutsAllPositions: 54 } });
  });
});
