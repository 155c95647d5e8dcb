import { randomBytes } from 'node:crypto';
import { describe, expect, test } from 'vitest';
import { createSealer } from './secrets';

describe('sealed bittings (AES-256-GCM; NIST SP 800-38D)', () => {
  const sealer = createSealer(randomBytes(32));

  test('round trip, and the plain text is nowhere in the stored form', () => {
    const sealed = sealer.seal('246802', 'key:1');
    expect(sealed).not.toContain('246802');
    expect(sealer.open(sealed, 'key:1')).toBe('246802');
  });

  test('no IV repeats over 10,000 seals (SP 800-38D 8.2: IVs must not repeat under one key)', () => {
    const ivs = new Set(Array.from({ length: 10_000 }, () => sealer.seal('1', 'k').split('.')[1]));
    expect(ivs.size).toBe(10_000);
  });

  test('bound to its row: another context, a flipped byte or another key fails', () => {
    const sealed = sealer.seal('135791', 'key:a');
    expect(() => sealer.open(sealed, 'key:b')).toThrow();
    const [v, iv, tag, body] = sealed.split('.');
    const flipped = Buffer.from(body!, 'base64url');
    flipped[0] = flipped[0]! ^ 1;
    expect(() => sealer.open([v, iv, tag, flipped.toString('base64url')].join('.'), 'key:a')).toThrow();
    expect(() => createSealer(randomBytes(32)).open(sealed, 'key:a')).toThrow();
  });
});
