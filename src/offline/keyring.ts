/**
 * Owns the unlocked data keys, in memory only. Locking drops the references; the keys are
 * non-extractable CryptoKeys, so script never held their bytes in the first place.
 */
import { VaultLockedError } from './errors';

export type KeyName = 'packet' | 'outbox';
type Keys = Partial<Record<KeyName, CryptoKey>>;

let keys: Keys | null = null;
const listeners = new Set<(unlocked: boolean) => void>();

export function holdKeys(next: Keys): void {
  keys = { ...next };
  for (const fn of listeners) fn(true);
}

export function dropKeys(): void {
  const was = keys !== null;
  keys = null;
  if (was) for (const fn of listeners) fn(false);
}

export function isUnlocked(): boolean {
  return keys !== null;
}

export function keyFor(name: KeyName): CryptoKey {
  const key = keys?.[name];
  if (!key) throw new VaultLockedError();
  return key;
}

/** The sync loop listens so it releases leadership while this tab is locked. */
export function onKeysChanged(fn: (unlocked: boolean) => void): () => void {
  listeners.add(fn);
  return () => listeners.delete(fn);
}
