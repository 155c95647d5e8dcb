/**
 * Owns the tablet's IndexedDB database "corewright", object store "kv". One store on
 * purpose: a Bench progress change and its outbox entry must commit in one transaction.
 *
 *   vault                 the vault record: salt, iteration count, wrapped keys, attempts (no plaintext secret)
 *   device                the device id (device.ts; the vault record's once it exists)
 *   packet:<workOrderId>  a work order's packet, sealed with the packet key
 *   bench:<coreId>        Bench progress of one core, sealed with the outbox key (escrowed; older: packet key)
 *   outbox:<clientId>     one finished record waiting for Sync, sealed with the outbox key
 *   sync                  when the last sync succeeded (holds no record)
 *
 * Sealed values carry their IndexedDB key as AES-GCM additional data, so a ciphertext
 * copied onto another key does not open.
 */
import { createStore, get, promisifyRequest, type UseStore } from 'idb-keyval';

export const KEY = {
  vault: 'vault',
  device: 'device',
  sync: 'sync',
  packet: (workOrderId: string) => `packet:${workOrderId}`,
  bench: (coreId: string) => `bench:${coreId}`,
  outbox: (clientId: string) => `outbox:${clientId}`,
} as const;

let kv: UseStore | null = null;

export function kvStore(): UseStore {
  return (kv ??= createStore('corewright', 'kv'));
}

/** Tests wrap the store to make a write fail part-way; null goes back to the real one. */
export function useKvStore(store: UseStore | null): void {
  kv = store;
}

export function readOne<T>(key: string): Promise<T | undefined> {
  return get<T>(key, kvStore());
}

/** Every [key, value] whose key starts with prefix, in one read transaction. */
export function readPrefix<T>(prefix: string): Promise<[string, T][]> {
  const range = IDBKeyRange.bound(prefix, `${prefix}\uffff`);
  return kvStore()('readonly', async (os) => {
    const [keys, values] = await Promise.all([promisifyRequest(os.getAllKeys(range)), promisifyRequest(os.getAll(range))]);
    // Every store here is keyed by strings.
    return keys.map((k, i) => [k as string, values[i] as T] as [string, T]);
  });
}

export function keysWithPrefix(prefix: string): Promise<string[]> {
  const range = IDBKeyRange.bound(prefix, `${prefix}\uffff`);
  return kvStore()('readonly', async (os) => (await promisifyRequest(os.getAllKeys(range))).map(String));
}

/**
 * Puts and deletes in one transaction: all of them land or none does. A put that throws
 * synchronously (quota, a value that cannot be cloned) aborts the transaction explicitly;
 * otherwise the puts queued before it would commit on their own.
 */
export function commit(puts: [string, unknown][], deletes: string[] = []): Promise<void> {
  return kvStore()('readwrite', (os) => {
    const done = promisifyRequest(os.transaction);
    try {
      for (const [key, value] of puts) os.put(value, key);
      for (const key of deletes) os.delete(key);
    } catch (err) {
      done.catch(() => undefined);
      try {
        os.transaction.abort();
      } catch {
        // already aborted (the error itself may have come from an aborted transaction)
      }
      throw err;
    }
    // An abort we did not cause (quota at commit time) rejects with the transaction's error.
    return done.catch((err: unknown) => {
      throw (err ?? os.transaction.error ?? new Error('The storage transaction was aborted.')) as Error;
    });
  });
}
