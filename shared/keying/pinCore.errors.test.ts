import { describe, expect, test } from 'vitest';
import { keyingIssueCodes } from './codes';
import { hasErrors } from './errors';
import { pinCore } from './pinCore';
import { builtInProfiles } from './profiles';
import { smallKit } from './testing/arbitraries';
import type { CoreKeys, Profile } from './types';

// Every error pinCore can report, each with its message: the cases are our own.
const sfic6 = builtInProfiles['sfic-6'] as Profile;
/** A shop kit of wafers 2..10, where build-ups over 10 are two wafers. */
const kit6 = smallKit(sfic6);
const range = (a: number, b: number): number[] => Array.from({ length: b - a + 1 }, (_, i) => a + i);

function issue(profile: Profile, keys: CoreKeys, code: string) {
  const pinning = pinCore(profile, keys);
  expect(hasErrors(pinning)).toBe(true);
  const found = pinning.issues.find((i) => i.code === code);
  expect(found, `no ${code} among ${pinning.issues.map((i) => i.code).join(', ')}`).toBeDefined();
  return { pinning, found };
}

describe('pinCore: unreadable bittings leave the chart empty', () => {
  test('bitting-length names the operating key', () => {
    const { pinning, found } = issue(sfic6, { operating: ['024680', '22468'], control: '357913' }, 'bitting-length');
    expect(found).toEqual({
      code: 'bitting-length', severity: 'error', key: 1,
      message: 'Operating key 2: the bitting has 5 cuts; SFIC 6-pin, .0125 in steps, stack 23 takes 6, one digit per chamber, chamber 1 first.',
    });
    expect(pinning.chambers).toEqual([]);
    expect(pinning.openingsCount).toBe(0);
  });

  test('bitting-not-digit names the control key and the chamber', () => {
    const { found } = issue(sfic6, { operating: ['024680'], control: '35x913' }, 'bitting-not-digit');
    expect(found).toEqual({
      code: 'bitting-not-digit', severity: 'error', chamber: 3,
      message: 'Control key, chamber 3: “x” is not a depth; type one digit per chamber and nothing else.',
    });
  });

  test('depth-out-of-range for a cut the profile cannot take', () => {
    const { found } = issue({ ...sfic6, maxDepth: 8 }, { operating: ['024689'], control: '357813' }, 'depth-out-of-range');
    expect(found).toEqual({
      code: 'depth-out-of-range', severity: 'error', chamber: 6, key: 0,
      message: 'Operating key 1, chamber 6: depth 9 is outside this profile’s depths 0 to 8; choose a cut within that range.',
    });
  });

  test('an unreadable top master is reported too', () => {
    const { found } = issue(sfic6, { operating: ['024680'], control: '357913', topMaster: '0246' }, 'bitting-length');
    expect(found?.message).toMatch(/^Top master: the bitting has 4 cuts/);
  });

  test('no-operating-keys', () => {
    const { pinning, found } = issue(sfic6, { operating: [], control: '357913' }, 'no-operating-keys');
    expect(found?.message).toBe('No operating key was given — list the change key and every master that must turn this core.');
    expect(pinning.chambers).toEqual([]);
  });
});

describe('pinCore: charts that cannot be built', () => {
  test('wafer-too-thin: a one-unit master wafer', () => {
    const { found } = issue(sfic6, { operating: ['324680', '224680'], control: '557913' }, 'wafer-too-thin');
    expect(found).toEqual({
      code: 'wafer-too-thin', severity: 'error', chamber: 1,
      message: 'Chamber 1: depths 2 and 3 need a 1-unit master wafer, thinner than the 2-unit minimum — change one key’s cut in chamber 1 so the depths differ by 2 or more.',
    });
  });

  test('wafer-too-thin: a one-unit build-up (control 0 over depth 9)', () => {
    const { pinning, found } = issue(sfic6, { operating: ['024680', '924680'], control: '057913' }, 'wafer-too-thin');
    expect(found?.message).toBe('Chamber 1: the build-up would be 1 unit (control 0 + sleeve 10 − deepest cut 9), thinner than the 2-unit minimum — choose a control cut of 1 or deeper in chamber 1, or a shallower deepest operating cut.');
    // The chart is still drawn so the Core view can point at the chamber.
    expect(pinning.chambers[0]?.buildUp).toEqual([1]);
  });

  test('size-not-stocked: bottom pin', () => {
    const profile = { ...sfic6, bottomPins: range(1, 9) };
    const { found } = issue(profile, { operating: ['224680', '204680'], control: '357913' }, 'size-not-stocked');
    expect(found?.message).toBe('Chamber 2: no bottom pin of size 0 is stocked — add it to the kit, or change the shallowest cut in chamber 2.');
  });

  test('size-not-stocked: master wafer (never made from two, the seam would be a shear point)', () => {
    const profile = { ...sfic6, wafers: [2, 3, 4, 5, 6, 7, 8, 10] };
    const { found } = issue(profile, { operating: ['024680', '924680'], control: '357913' }, 'size-not-stocked');
    expect(found?.message).toBe('Chamber 1: a 9-unit master wafer (between depths 0 and 9) is not stocked, and two wafers would add a shear point — stock that size, or change one key’s cut in chamber 1.');
  });

  test('size-not-stocked: build-up that two stocked wafers cannot make safely', () => {
    // Kit of wafers 2..10. Depth 0 with control 1: 11 units. 10 + 1 needs a one-step wafer;
    // 9 + 2 puts the seam at depth 9, where a key cut 9 would turn the plug.
    const { found } = issue(kit6, { operating: ['024680', '224680'], control: '357911' }, 'size-not-stocked');
    expect(found).toEqual({
      code: 'size-not-stocked', severity: 'error', chamber: 6,
      message: 'Chamber 6: a build-up of 11 units cannot be made from stocked wafers (largest 10; two wafers must be stocked sizes with their seam above depth 9) — choose a control cut closer to the deepest operating cut (0) in chamber 6, or stock a wafer of 11 units.',
    });
  });

  test('size-not-stocked: top pin', () => {
    const profile = { ...sfic6, topPins: range(3, 12) };
    const { found } = issue(profile, { operating: ['024680', '224680'], control: '357910' }, 'size-not-stocked');
    expect(found?.message).toBe('Chamber 6: no top pin of size 13 is stocked (stack 23 − control 0 − sleeve 10) — add it to the kit, or choose another control cut in chamber 6.');
  });

  test('stack-mismatch: operating cut above the control line (profile with a thin sleeve)', () => {
    const profile = { ...sfic6, sleeveUnits: 5, topPins: range(0, 23) };
    const { pinning, found } = issue(profile, { operating: ['024680', '224689'], control: '357910' }, 'stack-mismatch');
    expect(found?.message).toBe('Chamber 5: the deepest operating cut 8 sits above the control shear line (control 1 + sleeve 5) — use a deeper control cut or a shallower operating cut in chamber 5.');
    // The chart shows the shortfall rather than a made-up part.
    expect(pinning.chambers[4]?.total).not.toBe(23);
  });

  test('stack-mismatch: control line above the stack (profile with a short stack)', () => {
    const profile = { ...sfic6, stackUnits: 15, topPins: range(0, 15) };
    const { found } = issue(profile, { operating: ['024680', '224680'], control: '357919' }, 'stack-mismatch');
    expect(found).toEqual({
      code: 'stack-mismatch', severity: 'error', chamber: 3,
      message: 'Chamber 3: control 7 + sleeve 10 is taller than the 15-unit stack, leaving no room for a top pin — choose a shallower control cut in chamber 3.',
    });
  });
});

describe('pinCore: control selectivity', () => {
  test('control-equals-operating', () => {
    const { found } = issue(sfic6, { operating: ['024680', '357913'], control: '357913' }, 'control-equals-operating');
    expect(found).toEqual({
      code: 'control-equals-operating', severity: 'error', key: 1,
      message: 'Operating key 2 is the control key — it would release the core from its housing; take it off the operating list or choose another control key.',
    });
  });

  test('control-turns-plug: every control cut is an operating depth, though no key equals it', () => {
    const { pinning, found } = issue(sfic6, { operating: ['024680', '242468'], control: '044688' }, 'control-turns-plug');
    expect(found?.message).toBe('The control key has an operating depth in every chamber, so it would turn the plug instead of the sleeve — change the control key so that in at least one chamber its cut is none of the operating depths (better: differ from the top master in every chamber).');
    expect(pinning.issues.some((i) => i.code === 'control-equals-operating')).toBe(false);
  });

  test('operating-releases-core: two-wafer seams at the key’s cuts in every chamber', () => {
    // One key of all 0s, control all 2s: every build-up is 12 = 10 + 2, the seam at 10
    // is the control line for depth 0, so the operating key releases the core.
    const { pinning, found } = issue(kit6, { operating: ['000000'], control: '222222' }, 'operating-releases-core');
    expect(pinning.chambers.map((c) => c.buildUp)).toEqual(Array(6).fill([10, 2]));
    expect(found?.message).toBe('Operating key 1 lines up the control shear line in every chamber (the seams of its two-wafer build-ups sit at its cuts), so it would release the core — stock each of those build-ups as one wafer, or choose a control key that, in at least one chamber where it differs from this key, is no deeper than that chamber’s deepest operating cut (one build-up wafer there leaves no seam).');
  });

  test('errors come before warnings', () => {
    const pinning = pinCore(sfic6, { operating: ['024680', '357913'], control: '357913' });
    const firstWarning = pinning.issues.findIndex((i) => i.severity === 'warning');
    const lastError = pinning.issues.map((i) => i.severity).lastIndexOf('error');
    expect(lastError).toBeLessThan(firstWarning);
  });
});

test('every pinCore code has a severity and a meaning the UI can show', () => {
  for (const [code, entry] of Object.entries(keyingIssueCodes)) {
    expect(entry.meaning, code).toMatch(/\.$/);
    expect(['error', 'warning']).toContain(entry.severity);
  }
});
