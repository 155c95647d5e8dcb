import { describe, expect, test } from 'vitest';
import { hashPassword, verifyPassword } from './passwords';

describe('password hashes (node:crypto scrypt; OWASP password storage cheat sheet parameters)', () => {
  test('the right password verifies, a wrong one does not', async () => {
    const hash = await hashPassword('corewright-demo');
    expect(hash).toMatch(/^scrypt\$32768\$8\$1\$/);
    expect(await verifyPassword('corewright-demo', hash)).toBe(true);
    expect(await verifyPassword('corewright-demO', hash)).toBe(false);
  });

  test('each hash has its own salt', async () => {
    expect(await hashPassword('same')).not.toBe(await hashPassword('same'));
  });

  test('no stored hash (an invited user, an unknown account) never verifies', async () => {
    expect(await verifyPassword('', null)).toBe(false);
    expect(await verifyPassword('anything', undefined)).toBe(false);
    expect(await verifyPassword('anything', 'plain-text')).toBe(false);
  });
});
