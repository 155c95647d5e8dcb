/**
 * The lock manager the offline layer coordinates with: the browser's Web Locks (shared by
 * every tab of the origin), or, where a browser lacks them, an in-tab stand-in. The
 * stand-in keeps one tab's work in order but cannot see other tabs; there the server's
 * idempotent client ids keep a record sent twice to one row (reliability.md S1).
 */
export interface LockOptions {
  ifAvailable?: boolean;
  signal?: AbortSignal;
}
/** The part of the W3C LockManager we use: exclusive locks, ifAvailable, abort. */
export interface LockManagerLike {
  request<T>(name: string, options: LockOptions, callback: (lock: { name: string } | null) => Promise<T> | T): Promise<T>;
}

function abortError(): Error {
  const err = new Error('The lock request was aborted.');
  err.name = 'AbortError';
  return err;
}

/** One queue per name; a holder keeps the lock until its callback's promise settles. */
export function createLocalLocks(): LockManagerLike {
  const queues = new Map<string, Promise<unknown>>();
  const held = new Set<string>();
  return {
    request<T>(name: string, options: LockOptions, callback: (lock: { name: string } | null) => Promise<T> | T): Promise<T> {
      if (options.ifAvailable && (held.has(name) || queues.has(name))) return Promise.resolve().then(() => callback(null));
      if (options.signal?.aborted) return Promise.reject(abortError());
      const before = queues.get(name) ?? Promise.resolve();
      let settle!: { resolve: (v: T) => void; reject: (e: unknown) => void };
      const result = new Promise<T>((resolve, reject) => (settle = { resolve, reject }));
      // A waiting request that is aborted rejects at once and never runs, as with Web Locks.
      const onAbort = () => settle.reject(abortError());
      options.signal?.addEventListener('abort', onAbort, { once: true });
      const turn = before.then(async () => {
        if (options.signal?.aborted) return;
        options.signal?.removeEventListener('abort', onAbort);
        held.add(name);
        try {
          settle.resolve(await callback({ name }));
        } catch (err) {
          settle.reject(err);
        } finally {
          held.delete(name);
        }
      });
      queues.set(name, turn);
      void turn.then(() => {
        if (queues.get(name) === turn) queues.delete(name);
      });
      return result;
    },
  };
}

let fallback: LockManagerLike | null = null;

export function lockManager(): LockManagerLike {
  const native = typeof navigator !== 'undefined' ? (navigator as Navigator & { locks?: LockManagerLike }).locks : undefined;
  return native ?? (fallback ??= createLocalLocks());
}
