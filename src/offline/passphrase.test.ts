import { describe, expect, it } from 'vitest';
import { checkPassphrase } from './passphrase';

describe('passphrase policy', () => {
  it.each(['1234', '123456', '0000', '987654', '12345678901'])('refuses the PIN %s', (pin) => {
    // the issue: "a 4-6 digit PIN alone is not" enough against offline guessing; OWASP ASVS 4.0.3 2.1.1 (at least 12 characters)
    const check = checkPassphrase(pin);
    expect(check.ok).toBe(false);
    expect(!check.ok && check.message).toMatch(/PIN/);
  });

  it.each(['short pass', 'abc', 'eleven char', 'aaaaaaaaaaaaaaaa', 'password1234'])('refuses the weak secret %j', (secret) => {
    // OWASP ASVS 4.0.3 2.1.1 (at least 12 characters); NIST SP 800-63B 5.1.1.2 (refuse commonly used and repetitive values)
    expect(checkPassphrase(secret).ok).toBe(false);
  });

  it.each(['brass tray shear line', 'red cat run', 'a-long-unlock-secret', '739104628351', 'Zylinderkern7!'])('accepts %j', (secret) => {
    // the issue: at least 12 characters or three or more words
    expect(checkPassphrase(secret)).toEqual({ ok: true });
  });
});
