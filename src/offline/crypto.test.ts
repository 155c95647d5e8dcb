import { describe, expect, it } from 'vitest';
import { PBKDF2_ITERATIONS, deriveKek, importDataKey, newDataKey, open, randomBytes, seal, sealJson, openJson, unwrapDataKey } from './crypto';
import { IntegrityError } from './errors';

const enc = (s: string) => new TextEncoder().encode(s);

describe('sealed records (AES-256-GCM)', () => {
  it('opens what it sealed', async () => {
    // common practice: a round trip restores the exact value
    const key = await importDataKey(newDataKey());
    const value = { a: 1, text: 'core C-101', nested: [1, 2, 3] };
    expect(await openJson(key, 'packet:1', await sealJson(key, 'packet:1', value))).toEqual(value);
  });

  it('never repeats an IV over 1,000 seals under one key', async () => {
    // NIST SP 800-38D 8.2 (IV uniqueness); OWASP ASVS 5 11.3.4: a repeated IV under one GCM key breaks secrecy and integrity
    const key = await importDataKey(newDataKey());
    const ivs = new Set<string>();
    for (let i = 0; i < 1000; i++) {
      const { iv } = await seal(key, 'outbox:x', enc('same plaintext every time'));
      expect(iv.byteLength).toBe(12); // NIST SP 800-38D 5.2.1.1: 96-bit IVs
      ivs.add(Array.from(iv).join(','));
    }
    expect(ivs.size).toBe(1000);
  });

  it('binds the record id: a ciphertext moved to another id does not open', async () => {
    // NIST SP 800-38D (additional authenticated data); OWASP ASVS 5 11.3.3 (authenticated encryption)
    const key = await importDataKey(newDataKey());
    const sealed = await seal(key, 'packet:work-order-A', enc('secret'));
    await expect(open(key, 'packet:work-order-B', sealed)).rejects.toBeInstanceOf(IntegrityError);
    expect(new TextDecoder().decode(await open(key, 'packet:work-order-A', sealed))).toBe('secret');
  });

  it.each([
    ['a flipped ciphertext bit', (s: { iv: Uint8Array; ct: Uint8Array }) => (s.ct[0]! ^= 1)],
    ['a flipped tag bit', (s: { iv: Uint8Array; ct: Uint8Array }) => (s.ct[s.ct.length - 1]! ^= 0x80)],
    ['a changed IV', (s: { iv: Uint8Array; ct: Uint8Array }) => (s.iv[3]! ^= 1)],
  ])('refuses %s', async (_name, tamper) => {
    // NIST SP 800-38D 7.2 (tag verification); OWASP ASVS 5 11.3.3; reliability.md A9
    const key = await importDataKey(newDataKey());
    const sealed = await seal(key, 'bench:c', enc('pin sizes'));
    tamper(sealed);
    await expect(open(key, 'bench:c', sealed)).rejects.toBeInstanceOf(IntegrityError);
  });

  it('refuses a ciphertext sealed under another key', async () => {
    // NIST SP 800-38D 7.2: the tag depends on the key
    const a = await importDataKey(newDataKey());
    const b = await importDataKey(newDataKey());
    await expect(open(b, 'k', await seal(a, 'k', enc('x')))).rejects.toBeInstanceOf(IntegrityError);
  });
});

describe('keys', () => {
  it('defaults PBKDF2-SHA-256 to at least 600,000 iterations', () => {
    // OWASP Password Storage Cheat Sheet / ASVS 5 appendix: PBKDF2-HMAC-SHA-256, 600,000 iterations
    expect(PBKDF2_ITERATIONS).toBeGreaterThanOrEqual(600_000);
  });

  it('keeps data keys and the passphrase key non-extractable', async () => {
    // W3C Web Cryptography API (extractable = false): script cannot read the key bytes back
    const kek = await deriveKek('brass tray shear line', randomBytes(16), 1000);
    const data = await importDataKey(newDataKey());
    expect(kek.extractable).toBe(false);
    expect(data.extractable).toBe(false);
    await expect(globalThis.crypto.subtle.exportKey('raw', data)).rejects.toThrow();
    const raw = newDataKey();
    const unwrapped = await unwrapDataKey(kek, 'vault#packet-key', await seal(kek, 'vault#packet-key', raw));
    expect(unwrapped.extractable).toBe(false);
  });

  it('derives different keys from the same passphrase with different salts', async () => {
    // NIST SP 800-132 5.1 (random salt per derivation)
    const a = await deriveKek('brass tray shear line', randomBytes(16), 1000);
    const b = await deriveKek('brass tray shear line', randomBytes(16), 1000);
    await expect(open(b, 'k', await seal(a, 'k', enc('x')))).rejects.toBeInstanceOf(IntegrityError);
  });

  it('derives the same key from the same passphrase typed in another Unicode form', async () => {
    // NIST SP 800-63B 5.1.1.2 (normalise with NFKC or NFKD before hashing)
    const salt = randomBytes(16);
    const composed = await deriveKek('sch\u00e4rfe bohrung zylinder', salt, 1000);
    const decomposed = await deriveKek('scha\u0308rfe bohrung zylinder', salt, 1000);
    expect(new TextDecoder().decode(await open(decomposed, 'k', await seal(composed, 'k', enc('same'))))).toBe('same');
  });
});
