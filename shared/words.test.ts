import { describe, expect, test } from 'vitest';
import { levelNames, naturalCompare, naturally } from './words';

describe('naturalCompare', () => {
  // Common practice: key schedules list AA2 before AA10 (numbers read as numbers, not digit by digit).
  test.each([
    ['AA2', 'AA10', -1],
    ['AA10', 'AA2', 1],
    ['AA1', 'AB1', -1],
    ['CR-999', 'CR-1001', -1],
  ])('%s against %s (common practice)', (a, b, sign) => {
    expect(Math.sign(naturalCompare(a, b))).toBe(sign);
  });
  test('sorts a schedule of symbols (common practice)', () => {
    expect(naturally(['AA10', 'A', 'AA2', 'AB1', 'AA1'], (s) => s)).toEqual(['A', 'AA1', 'AA2', 'AA10', 'AB1']);
  });
  test('one trade name per level (from memory: the usual schedule headings)', () => {
    expect(Object.values(levelNames)).toEqual(['Great grand master', 'Grand master', 'Master', 'Change key']);
  });
});
