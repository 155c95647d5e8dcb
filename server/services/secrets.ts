/**
 * Encryption at rest for bittings and device escrow keys: AES-256-GCM (node:crypto) under
 * the data key from config, a fresh 96-bit IV per value, and the row it belongs to bound
 * as additional data, so a ciphertext copied onto another row does not decrypt.
 * Stored form: `v1.<iv>.<tag>.<ciphertext>` (base64url).
 */
import { createCipheriv, createDecipheriv, randomBytes } from 'node:crypto';

export interface Sealer {
  seal(plain: string, context: string): string;
  open(sealed: string, context: string): string;
}

export function createSealer(dataKey: Buffer): Sealer {
  if (dataKey.length !== 32) throw new Error('the data key must be 32 bytes');
  return {
    seal(plain, context) {
      const iv = randomBytes(12);
      const cipher = createCipheriv('aes-256-gcm', dataKey, iv);
      cipher.setAAD(Buffer.from(context, 'utf8'));
      const body = Buffer.concat([cipher.update(plain, 'utf8'), cipher.final()]);
      return ['v1', iv.toString('base64url'), cipher.getAuthTag().toString('base64url'), body.toString('base64url')].join('.');
    },
    open(sealed, context) {
      const [v, iv, tag, body] = sealed.split('.');
      if (v !== 'v1' || !iv || !tag || body === undefined) throw new Error('not a sealed value');
      const decipher = createDecipheriv('aes-256-gcm', dataKey, Buffer.from(iv, 'base64url'));
      decipher.setAAD(Buffer.from(context, 'utf8'));
      decipher.setAuthTag(Buffer.from(tag, 'base64url'));
      return Buffer.concat([decipher.update(Buffer.from(body, 'base64url')), decipher.final()]).toString('utf8');
    },
  };
}
