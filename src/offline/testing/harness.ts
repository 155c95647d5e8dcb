/** Shared set-up for the offline tests: a clean fake IndexedDB, a locked keyring, the fake server as fetch. */
import 'fake-indexeddb/auto';
import { clear, type UseStore } from 'idb-keyval';
import { expect, vi } from 'vitest';
import { useTokenSource } from '@/api/http';
import { kvStore, useKvStore } from '../db';
import { dropKeys } from '../keyring';
import * as vault from '../vault';
import { createFakeServer, type FakeServer } from './fakeServer';
import { PASSPHRASE, TEST_ITERATIONS, who } from './fixtures';

export async function resetOffline(): Promise<FakeServer> {
  useKvStore(null);
  dropKeys();
  await clear(kvStore());
  useTokenSource(null);
  const server = createFakeServer();
  vi.stubGlobal('fetch', vi.fn(server.fetch));
  return server;
}

export async function setUpVault(passphrase = PASSPHRASE): Promise<void> {
  expect(await vault.setup(passphrase, who, { iterations: TEST_ITERATIONS })).toEqual({ ok: true });
}

/** Everything in the database as one string: bytes read as Latin-1 and as UTF-8, the rest as JSON. */
export async function rawDump(): Promise<string> {
  const parts: string[] = [];
  const walk = (v: unknown): void => {
    if (v instanceof Uint8Array) {
      parts.push(String.fromCharCode(...v), new TextDecoder('utf-8', { fatal: false }).decode(v));
    } else if (v && typeof v === 'object') {
      for (const [k, x] of Object.entries(v)) {
        parts.push(k);
        walk(x);
      }
    } else parts.push(String(v));
  };
  const store = kvStore();
  await store('readonly', async (os) => {
    const req = os.openCursor();
    await new Promise<void>((resolve, reject) => {
      req.onsuccess = () => {
        const cursor = req.result;
        if (!cursor) return resolve();
        parts.push(cursor.key as string);
        walk(cursor.value);
        cursor.continue();
      };
      req.onerror = () => reject(req.error ?? new Error('the cursor failed'));
    });
  });
  return parts.join('\n');
}

export async function allKeys(): Promise<string[]> {
  return kvStore()('readonly', (os) => new Promise<string[]>((resolve, reject) => {
    const req = os.getAllKeys();
    req.onsuccess = () => resolve(req.result as string[]);
    req.onerror = () => reject(req.error ?? new Error('reading the keys failed'));
  }));
}

/**
 * Wraps the real store so the nth put of every transaction misbehaves: 'throw' throws the
 * given error as the put is made; 'abort' lets the put through, then aborts the
 * transaction as a closed tab would.
 */
export function misbehavingStore(nthPut: number, how: 'throw' | 'abort', error: () => Error = () => new DOMException('The quota has been exceeded.', 'QuotaExceededError')): UseStore {
  const real = kvStore();
  return (mode, callback) =>
    real(mode, (os) => {
      let puts = 0;
      const put = os.put.bind(os);
      os.put = (value: unknown, key?: IDBValidKey) => {
        puts++;
        if (puts === nthPut && how === 'throw') throw error();
        const req = put(value, key);
        if (puts === nthPut && how === 'abort') os.transaction.abort();
        return req;
      };
      return callback(os);
    });
}

/** localStorage for the store tests (Node has none). */
export function memoryStorage(): Storage {
  const map = new Map<string, string>();
  return {
    get length() {
      return map.size;
    },
    clear: () => map.clear(),
    getItem: (k) => map.get(k) ?? null,
    key: (i) => [...map.keys()][i] ?? null,
    removeItem: (k) => void map.delete(k),
    setItem: (k, v) => void map.set(k, String(v)),
  };
}
