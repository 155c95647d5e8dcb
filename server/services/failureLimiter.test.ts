import { describe, expect, test } from 'vitest';
import { failureLimiter } from './failureLimiter';

describe('failureLimiter', () => {
  test('locks after the limit of failures and opens when the window ends (OWASP Authentication Cheat Sheet)', () => {
    let t = 1_000_000;
    const l = failureLimiter(3, 60_000, () => t);
    for (let i = 0; i < 3; i++) {
      expect(l.lockedFor('a')).toBe(0);
      l.fail('a');
    }
    expect(l.lockedFor('a')).toBe(60);
    expect(l.lockedFor('b')).toBe(0); // common practice: one key's failures never lock another
    t += 60_000;
    expect(l.lockedFor('a')).toBe(0);
  });

  test('successes never count, and a success clears the failures (common practice)', () => {
    const l = failureLimiter(2, 60_000);
    l.fail('a');
    l.succeed('a');
    l.fail('a');
    expect(l.lockedFor('a')).toBe(0);
  });
});
