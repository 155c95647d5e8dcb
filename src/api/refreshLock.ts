/**
 * One refresh at a time across every tab of the origin (Web Locks): a tab that waited finds
 * the pair another tab already got and uses it, instead of presenting the same rotated
 * refresh token again (RFC 9700 4.14.2: the server treats a later replay as theft).
 */
import type { LockManagerLike } from '@/offline';

export const REFRESH_LOCK = 'cw.auth.refresh';

export interface RefreshDeps<T extends { refreshToken: string; accessToken: string }> {
  locks: LockManagerLike;
  /** The pair as every tab sees it now (localStorage). */
  read(): T | null;
  /** Asks the server for a new pair and stores it; null when the session is over. */
  rotate(current: T): Promise<T | null>;
}

/** The fresh access token, or null: `usedToken` is the refresh token this tab last saw fail. */
export function refreshAcrossTabs<T extends { refreshToken: string; accessToken: string }>(deps: RefreshDeps<T>, usedToken: string): Promise<string | null> {
  return deps.locks.request(REFRESH_LOCK, {}, async () => {
    const current = deps.read();
    if (!current) return null;
    // Another tab refreshed while this one waited: its pair is already stored.
    if (current.refreshToken !== usedToken) return current.accessToken;
    return (await deps.rotate(current))?.accessToken ?? null;
  });
}
