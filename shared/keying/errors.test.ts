import { describe, expect, test } from 'vitest';
import { KeyingError, hasErrors } from './errors';

/* The engine's error type and the load rule (common practice: a chart with an error is never loaded). */
describe('KeyingError', () => {
  test('carries its code and the chamber it names', () => {
    const withChamber = new KeyingError('depth-out-of-range', 'Chamber 3 is cut too deep.', 3);
    expect(withChamber).toMatchObject({ name: 'KeyingError', code: 'depth-out-of-range', chamber: 3, message: 'Chamber 3 is cut too deep.' });
    const without = new KeyingError('bitting-length', 'Six cuts are needed.');
    expect(without.chamber).toBeUndefined();
    expect(JSON.parse(JSON.stringify({ ...without }))).toEqual({ name: 'KeyingError', code: 'bitting-length' });
    expect(without).toBeInstanceOf(Error);
  });
});

describe('hasErrors', () => {
  test('an error among the issues stops the load; warnings and information do not', () => {
    expect(hasErrors({ issues: [] })).toBe(false);
    expect(hasErrors({ issues: [{ severity: 'warning' }, { severity: 'info' }] } as never)).toBe(false);
    expect(hasErrors({ issues: [{ severity: 'warning' }, { severity: 'error' }] } as never)).toBe(true);
  });
});
