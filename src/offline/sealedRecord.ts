/**
 * The shape of every sealed value in the kv store: version, IV, ciphertext, and a little
 * plain metadata the tablet needs while locked (an expiry, a count). The metadata never
 * holds a bitting, a door or a record; the IndexedDB key is the additional data.
 */
import { openJson, sealJson, type Bytes } from './crypto';
import { keyFor, type KeyName } from './keyring';

export interface SealedRecord<M> {
  v: 1;
  iv: Bytes;
  ct: Bytes;
  meta: M;
}

export async function sealRecord<M>(keyName: KeyName, idbKey: string, value: unknown, meta: M): Promise<SealedRecord<M>> {
  const { iv, ct } = await sealJson(keyFor(keyName), idbKey, value);
  return { v: 1, iv, ct, meta };
}

/** Throws VaultLockedError when locked, IntegrityError when the ciphertext was changed or moved. */
export function openRecord<T>(keyName: KeyName, idbKey: string, stored: SealedRecord<unknown>): Promise<T> {
  return openJson<T>(keyFor(keyName), idbKey, stored);
}
