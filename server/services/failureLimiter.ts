/**
 * Counts failed attempts per key (address and e-mail) in a fixed window. Only failures
 * count, after they happen, so parallel correct sign-ins never lock anyone out (OWASP
 * Authentication Cheat Sheet: lock out on failed attempts). Kept in memory: one process.
 */
export interface FailureLimiter {
  /** Seconds until the key may try again, or 0 when it may try now. */
  lockedFor(key: string): number;
  fail(key: string): void;
  succeed(key: string): void;
}

/** Keys kept at most; past it, expired windows are dropped first, then the oldest. */
const MAX_KEYS = 50_000;

export function failureLimiter(limit: number, windowMs: number, now: () => number = Date.now): FailureLimiter {
  const windows = new Map<string, { count: number; resetAt: number }>();
  const live = (key: string) => {
    const w = windows.get(key);
    if (w && w.resetAt <= now()) {
      windows.delete(key);
      return undefined;
    }
    return w;
  };
  function prune(): void {
    for (const [key, w] of windows) if (w.resetAt <= now()) windows.delete(key);
    for (const key of windows.keys()) {
      if (windows.size < MAX_KEYS) break;
      windows.delete(key);
    }
  }
  return {
    lockedFor(key) {
      const w = live(key);
      return w && w.count >= limit ? Math.max(1, Math.ceil((w.resetAt - now()) / 1000)) : 0;
    },
    fail(key) {
      const w = live(key);
      if (w) w.count++;
      else {
        if (windows.size >= MAX_KEYS) prune();
        windows.set(key, { count: 1, resetAt: now() + windowMs });
      }
    },
    succeed(key) {
      windows.delete(key);
    },
  };
}
