import { describe, expect, test } from 'vitest';
import { keyingIssueCodes } from './codes';
import { builtInProfiles, chambersBackToFront } from './profiles';
import type { Profile } from './types';
import { validateProfile } from './validateProfile';

const sfic6 = builtInProfiles['sfic-6'] as Profile;
const sfic7 = builtInProfiles['sfic-7'] as Profile;

describe('built-in profiles', () => {
  test.each([['sfic-6', 6], ['sfic-7', 7]] as const)('%s has the usual SFIC figures', (id, chambers) => {
    const profile = builtInProfiles[id] as Profile;
    expect(profile.chambers).toBe(chambers);
    // Stack of 23 and a 10-unit sleeve for .0125 in SFIC: common practice, no source.
    expect(profile.stackUnits).toBe(23);
    expect(profile.sleeveUnits).toBe(10);
    // Depths 0..9 for .0125 in steps: common practice.
    expect([profile.minDepth, profile.maxDepth]).toEqual([0, 9]);
    // Two-step progression and a 2-unit thinnest wafer (ALOA Keynotes, Sept 2016, on the missing one-step wafer).
    expect(profile.step).toBe(2);
    expect(profile.minWaferUnits).toBe(2);
    expect(profile.maxAdjacentCut).toBe(9);
    expect(profile.chamberOneAt).toBe('back');
    expect(validateProfile(profile)).toEqual([]);
  });

  test('descriptive labels, no maker codes', () => {
    expect(sfic6.label).toBe('SFIC 6-pin, .0125 in steps, stack 23');
    expect(sfic7.label).toBe('SFIC 7-pin, .0125 in steps, stack 23');
  });

  // Top pins cover 13 - control for every control depth 0..9 (the formula, common practice).
  test('stocks a top pin for every control depth and a bottom pin for every depth', () => {
    for (let c = 0; c <= 9; c++) expect(sfic7.topPins).toContain(13 - c);
    for (let d = 0; d <= 9; d++) expect(sfic7.bottomPins).toContain(d);
    expect(sfic7.wafers).not.toContain(1);
  });

  // The primer's usual kit (common practice): bottom pins 0-9, wafers 2-19, so every master
  // wafer (at most 9) and every build-up (at most control 9 + sleeve 10 - depth 0 = 19) is one part.
  test('stocks the usual kit: bottom pins 0-9, wafers 2-19, top pins 4-13', () => {
    for (const p of [sfic6, sfic7]) {
      expect(p.bottomPins).toEqual([0, 1, 2, 3, 4, 5, 6, 7, 8, 9]);
      expect(p.wafers).toEqual([2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 14, 15, 16, 17, 18, 19]);
      expect(p.topPins).toEqual([4, 5, 6, 7, 8, 9, 10, 11, 12, 13]);
    }
  });

  test('loading order runs back to front whichever end chamber 1 is', () => {
    expect(chambersBackToFront(sfic6)).toEqual([1, 2, 3, 4, 5, 6]);
    expect(chambersBackToFront({ ...sfic6, chamberOneAt: 'front' })).toEqual([6, 5, 4, 3, 2, 1]);
  });
});

describe('validateProfile', () => {
  test.each<[string, Partial<Profile>, string, string]>([
    ['too few chambers', { chambers: 4 }, 'profile-chambers', 'Chambers is 4; a core has 5 to 8 chambers.'],
    ['too many chambers', { chambers: 9 }, 'profile-chambers', 'Chambers is 9; a core has 5 to 8 chambers.'],
    ['a fraction of a chamber', { chambers: 6.5 }, 'profile-chambers', 'Chambers is 6.5; a core has 5 to 8 chambers.'],
    ['depths reversed', { minDepth: 5, maxDepth: 2 }, 'profile-depths', 'Depths 5..2: bittings are one digit per chamber, so depths lie within 0..9, shallowest first.'],
    ['sleeve too thin', { sleeveUnits: 9 }, 'profile-stack', 'Sleeve of 9 units: it must be more than the depth span (9) so the control shear line sits above every operating depth.'],
    ['stack too short', { stackUnits: 19 }, 'profile-stack', 'Stack of 19 units: with depth 9 and a 10-unit sleeve it must be at least 20 to leave room for a top pin.'],
    ['zero wafer', { minWaferUnits: 0 }, 'profile-wafer', 'The thinnest wafer must be a whole number of units, 1 or more.'],
    ['step 3', { step: 3 }, 'profile-step', 'Step 3: use 2 for two-step progression (parity kept per position) or 1.'],
    ['MACS 0', { maxAdjacentCut: 0 }, 'profile-macs', 'The maximum adjacent cut must be a whole number, 1 or more; use the depth span for no limit.'],
    ['no wafers', { wafers: [] }, 'profile-stock', 'No wafers are stocked; list the sizes the kit holds.'],
    ['fractional top pin', { topPins: [3.5] }, 'profile-stock', 'Stocked top pins must be whole numbers of units, 0 or more.'],
  ])('%s', (_, change, code, message) => {
    const problems = validateProfile({ ...sfic7, ...change });
    expect(problems).toEqual([expect.objectContaining({ code, message })]);
  });

  // The profile type says 5..8 chambers (6 and 7 usual; common practice): both ends are accepted.
  test.each([5, 8])('%i chambers is accepted', (chambers) => {
    expect(validateProfile({ ...sfic7, chambers })).toEqual([]);
  });

  test('every profile code has a meaning for the UI', () => {
    for (const code of ['profile-chambers', 'profile-depths', 'profile-stack', 'profile-wafer', 'profile-step', 'profile-macs', 'profile-stock'] as const) {
      expect(keyingIssueCodes[code].meaning.length).toBeGreaterThan(10);
    }
  });
});
