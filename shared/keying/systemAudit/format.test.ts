import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import { builtInProfiles } from '../profiles';
import { systemAuditFindingCodes, type SystemAuditFindingCode } from '../codes';
import type { Profile } from '../types';
import { buildContext } from './context';
import { coreIds, coreName, finding, grouped, keyRefs, nameList, plural, sortFindings, type Ranked } from './format';

/*
 * The audit's wording helpers. grouped() is checked against the reference formatter it
 * replaces, Intl's toLocaleString('en-US') (ECMA-402), over every safe integer fast-check
 * tries; the rest against plain English list and plural rules (common practice).
 */
describe('grouped writes thousands as toLocaleString("en-US") does', () => {
  test.each([0, 1, -1, 999, -999, 1000, -1000, 9999, 12345, 100000, 999999, 1000000, -1234567, 2 ** 31, Number.MAX_SAFE_INTEGER, -Number.MAX_SAFE_INTEGER])('%d', (n) => {
    expect(grouped(n)).toBe(n.toLocaleString('en-US'));
  });

  test('non-integers and unsafe integers go to the reference formatter', () => {
    for (const n of [1.5, 1234.5, -0.25, 2 ** 60, -(2 ** 60)]) expect(grouped(n)).toBe(n.toLocaleString('en-US'));
  });

  test('every safe integer (fast-check)', () => {
    fc.assert(fc.property(fc.integer({ min: -Number.MAX_SAFE_INTEGER, max: Number.MAX_SAFE_INTEGER }), (n) => grouped(n) === n.toLocaleString('en-US')), { seed: 20261202, numRuns: 500 });
    fc.assert(fc.property(fc.integer({ min: -100_000, max: 100_000 }), (n) => grouped(n) === n.toLocaleString('en-US')), { seed: 20261202, numRuns: 500 });
  });
});

describe('plural and nameList', () => {
  test('one, many, and a word with its own plural', () => {
    expect(plural(0, 'core')).toBe('0 cores');
    expect(plural(1, 'core')).toBe('1 core');
    expect(plural(2, 'core')).toBe('2 cores');
    expect(plural(1234, 'key')).toBe('1,234 keys');
    expect(plural(1, 'bitting')).toBe('1 bitting');
    expect(plural(3, 'key copy', 'key copies')).toBe('3 key copies');
  });

  test('short lists are written out with "and", long ones end in "and N more"', () => {
    expect(nameList([])).toBe('');
    expect(nameList(['AA1'])).toBe('AA1');
    expect(nameList(['AA1', 'AA2'])).toBe('AA1 and AA2');
    expect(nameList(['AA1', 'AA2', 'AA3'])).toBe('AA1, AA2 and AA3');
    expect(nameList(['A', 'B', 'C', 'D', 'E'])).toBe('A, B, C, D and E');
    expect(nameList(['A', 'B', 'C', 'D', 'E', 'F'])).toBe('A, B, C, D, E and 1 more');
    expect(nameList(['A', 'B', 'C', 'D', 'E', 'F', 'G'], 3)).toBe('A, B, C and 4 more');
  });

  test('only the first names passed, with the length of the whole list', () => {
    expect(nameList(['A', 'B', 'C'], 3, 10)).toBe('A, B, C and 7 more');
    expect(nameList(['A', 'B'], 5, 2)).toBe('A and B');
    expect(nameList(['A', 'B', 'C'], 5, 1)).toBe('A');
    expect(nameList(['A', 'B', 'C', 'D', 'E'], 5, 5)).toBe('A, B, C, D and E');
    expect(nameList(['A', 'B', 'C', 'D', 'E', 'F'], 5, 6)).toBe('A, B, C, D, E and 1 more');
  });
});

describe('finding order: errors, warnings, information; then by code, system order and wording', () => {
  const codes = Object.keys(systemAuditFindingCodes) as SystemAuditFindingCode[];
  const ofSeverity = (s: string) => codes.filter((c) => systemAuditFindingCodes[c].severity === s);
  const [error1, error2] = ofSeverity('error');
  const [warning1] = ofSeverity('warning');
  const [info1] = ofSeverity('info');
  const make = (code: SystemAuditFindingCode | undefined, order: number, message: string): Ranked =>
    finding(code as SystemAuditFindingCode, order, { message, advice: '' });

  test('finding() takes its severity from the code table', () => {
    for (const code of codes) expect(make(code, 0, 'm').finding.severity).toBe(systemAuditFindingCodes[code].severity);
    expect(make(error1, 7, 'm')).toMatchObject({ order: 7, finding: { code: error1, message: 'm', advice: '' } });
  });

  test('a shuffled list always comes out the same, in rank order', () => {
    const expected = [
      make(error1, 0, 'a'), make(error1, 0, 'b'), make(error1, 1, 'a'), make(error1, 2, 'a'),
      make(error2, 0, 'a'),
      make(warning1, 0, 'a'), make(warning1, 3, 'a'),
      make(info1, 0, 'a'), make(info1, 0, 'z'),
    ].filter((r) => r.finding.code !== undefined);
    const want = expected.map((r) => r.finding);
    fc.assert(
      fc.property(fc.shuffledSubarray(expected, { minLength: expected.length, maxLength: expected.length }), (shuffled) => {
        const got = sortFindings([...shuffled]);
        return got.every((f, i) => f === want[i]);
      }),
      { seed: 20261202, numRuns: 200 },
    );
  });

  test('two findings alike in rank and wording keep either order without a fault', () => {
    const a = make(error1, 1, 'same');
    const b = make(error1, 1, 'same');
    expect(sortFindings([a, b])).toHaveLength(2);
  });
});

describe('names and ids of keys and cores by index', () => {
  // Built inside the test, so mutation testing counts it for buildContext and the names.
  const built = () => buildContext(builtInProfiles['sfic-6'] as Profile, {
    control: '999999',
    keys: [
      { id: 'k-a', symbol: 'AA1', bitting: '123456', opens: ['c-1'] },
      { id: 'k-b', symbol: 'AA2', bitting: '223456', opens: ['c-2'] },
    ],
    cores: [{ id: 'c-1', label: 'Room 101', operating: ['k-a'] }, { id: 'c-2', operating: ['k-b'] }],
  });
  test('symbols and ids in the order asked; a core without a label is named by its id', () => {
    const ctx = built();
    if (!ctx) throw new Error('readable control bitting');
    expect(keyRefs(ctx, [1, 0])).toEqual({ keys: ['AA2', 'AA1'], keyIds: ['k-b', 'k-a'] });
    expect(keyRefs(ctx, [5])).toEqual({ keys: [''], keyIds: [''] });
    expect(coreName(ctx, 0)).toBe('Room 101');
    expect(coreName(ctx, 1)).toBe('c-2');
    expect(coreName(ctx, 9)).toBe('');
    expect(coreIds(ctx, [1, 0, 4])).toEqual(['c-2', 'c-1', '']);
  });
});
