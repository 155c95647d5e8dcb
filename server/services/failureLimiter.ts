/**
 * Counts failed attempts per key (address and e-mail) in a fixed window. Only failures
 * count, after they happen, so parallel correct sign-ins never lock anyone out (OWASP
 * Authentication Cheat Sheet: lock out on failed attempts).
 *
 * `sharedFailureLimiter` keeps the count in PostgreSQL (`sign_in_failures`), so every API
 * process on one database shares one lockout. It also counts in memory, and while the
 * database cannot be reached the in-memory count still locks out: an outage never lifts the
 * lockout (T1). express-rate-limit's stores count every request before it runs and take
 * successes back afterwards, so parallel correct sign-ins past the limit would be refused;
 * hence this small table instead of a store package.
 */
import { createHash } from 'node:crypto';
import type { Knex } from 'knex';
import { isDatabaseUnavailable } from '../errors';

export interface FailureLimiter {
  /** Seconds until the key may try again, or 0 when it may try now. */
  lockedFor(key: string): number;
  fail(key: string): void;
  succeed(key: string): void;
}

export interface SharedFailureLimiter {
  lockedFor(key: string): Promise<number>;
  /** Never throws: a count that cannot be stored is logged and kept in memory. */
  fail(key: string): Promise<void>;
  succeed(key: string): Promise<void>;
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

const hashOf = (key: string) => createHash('sha256').update(key, 'utf8').digest('hex');

/** The database's clock decides windows, so processes on different machines agree. */
export function sharedFailureLimiter(db: Knex, limit: number, windowMs: number, log: (msg: string) => void = (m) => console.error(m)): SharedFailureLimiter {
  const local = failureLimiter(limit, windowMs);
  const quiet = async (what: string, work: () => Promise<unknown>) => {
    try {
      await work();
    } catch (err) {
      log(`[sign-in limit] ${what} kept in this process only: ${(err as Error).message}`);
    }
  };
  return {
    async lockedFor(key) {
      const here = local.lockedFor(key);
      let shared = 0;
      try {
        const row = await db('sign_in_failures')
          .where({ key_hash: hashOf(key) })
          .where('reset_at', '>', db.fn.now())
          .first<{ failures: number; seconds: number } | undefined>('failures', db.raw('ceil(extract(epoch from reset_at - now()))::int as seconds'));
        if (row && row.failures >= limit) shared = Math.max(1, row.seconds);
      } catch (err) {
        if (!isDatabaseUnavailable(err)) throw err;
      }
      return Math.max(here, shared);
    },
    async fail(key) {
      local.fail(key);
      await quiet('a failure', () =>
        db.raw(
          `INSERT INTO sign_in_failures (key_hash, failures, reset_at) VALUES (?, 1, now() + make_interval(secs => ?))
           ON CONFLICT (key_hash) DO UPDATE SET
             failures = CASE WHEN sign_in_failures.reset_at <= now() THEN 1 ELSE sign_in_failures.failures + 1 END,
             reset_at = CASE WHEN sign_in_failures.reset_at <= now() THEN EXCLUDED.reset_at ELSE sign_in_failures.reset_at END`,
          [hashOf(key), windowMs / 1000],
        ),
      );
    },
    async succeed(key) {
      local.succeed(key);
      await quiet('a success', () => db('sign_in_failures').where({ key_hash: hashOf(key) }).delete());
    },
  };
}

/** Drops windows that ended; the server runs it with the owed mail. */
export async function sweepFailures(db: Knex): Promise<number> {
  return db('sign_in_failures').where('reset_at', '<=', db.fn.now()).delete();
}
