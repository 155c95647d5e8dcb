/**
 * Owns the sealed-record format: AES-256-GCM, a fresh random 96-bit IV per seal, a 128-bit
 * tag, and the record's IndexedDB key as additional data. Also the passphrase key (PBKDF2-
 * SHA-256) and the data keys, which exist as raw bytes only while being wrapped and are
 * used as non-extractable CryptoKeys.
 */
import { IntegrityError } from './errors';

export type Bytes = Uint8Array<ArrayBuffer>;
export interface Sealed {
  iv: Bytes;
  ct: Bytes;
}

/** OWASP's password storage figure for PBKDF2-HMAC-SHA-256; tests pass a lower count explicitly. */
export const PBKDF2_ITERATIONS = 600_000;
const IV_BYTES = 12;
const GCM = (iv: Bytes, aad: string): AesGcmParams => ({ name: 'AES-GCM', iv, additionalData: utf8(aad), tagLength: 128 });

const encoder = new TextEncoder();
const decoder = new TextDecoder();
const utf8 = (text: string): Bytes => encoder.encode(text);
const subtle = (): SubtleCrypto => globalThis.crypto.subtle;

export function randomBytes(n: number): Bytes {
  return globalThis.crypto.getRandomValues(new Uint8Array(n));
}

/** NFKC first, so the same passphrase typed on two keyboards derives the same key. */
export async function deriveKek(passphrase: string, salt: Bytes, iterations: number): Promise<CryptoKey> {
  const base = await subtle().importKey('raw', utf8(passphrase.normalize('NFKC')), 'PBKDF2', false, ['deriveKey']);
  return subtle().deriveKey({ name: 'PBKDF2', salt, iterations, hash: 'SHA-256' }, base, { name: 'AES-GCM', length: 256 }, false, [
    'encrypt',
    'decrypt',
    'unwrapKey',
  ]);
}

/** The escrow key the server keeps for this device: it only ever seals and opens the outbox key. */
export function importEscrowKey(raw: Bytes): Promise<CryptoKey> {
  return subtle().importKey('raw', raw, 'AES-GCM', false, ['encrypt', 'decrypt']);
}

/** GCM reports a failed tag check as OperationError; anything else is a bug and is not hidden. */
function integrity(err: unknown, aad: string): never {
  if ((err as { name?: string } | null)?.name === 'OperationError') throw new IntegrityError(aad);
  throw err;
}

export async function seal(key: CryptoKey, aad: string, data: Bytes): Promise<Sealed> {
  const iv = randomBytes(IV_BYTES);
  const ct = new Uint8Array(await subtle().encrypt(GCM(iv, aad), key, data));
  return { iv, ct };
}

export async function open(key: CryptoKey, aad: string, sealed: Sealed): Promise<Bytes> {
  try {
    return new Uint8Array(await subtle().decrypt(GCM(sealed.iv, aad), key, sealed.ct));
  } catch (err) {
    integrity(err, aad);
  }
}

export function sealJson(key: CryptoKey, aad: string, value: unknown): Promise<Sealed> {
  return seal(key, aad, utf8(JSON.stringify(value)));
}

export async function openJson<T>(key: CryptoKey, aad: string, sealed: Sealed): Promise<T> {
  return JSON.parse(decoder.decode(await open(key, aad, sealed))) as T;
}

/** A new AES-256 data key as raw bytes; the caller wraps it, imports it, then zeroes it. */
export function newDataKey(): Bytes {
  return randomBytes(32);
}

export function importDataKey(raw: Bytes): Promise<CryptoKey> {
  return subtle().importKey('raw', raw, 'AES-GCM', false, ['encrypt', 'decrypt']);
}

/** Unwraps straight into a non-extractable key: the raw bytes never reach script. */
export async function unwrapDataKey(kek: CryptoKey, aad: string, wrapped: Sealed): Promise<CryptoKey> {
  try {
    return await subtle().unwrapKey('raw', wrapped.ct, kek, GCM(wrapped.iv, aad), 'AES-GCM', false, ['encrypt', 'decrypt']);
  } catch (err) {
    integrity(err, aad);
  }
}

export function toBase64(bytes: Bytes): string {
  let text = '';
  for (const b of bytes) text += String.fromCharCode(b);
  return btoa(text);
}

export function fromBase64(text: string): Bytes {
  const raw = atob(text);
  const out = new Uint8Array(raw.length);
  for (let i = 0; i < raw.length; i++) out[i] = raw.charCodeAt(i);
  return out;
}
