import { describe, expect, test } from 'vitest';
import { createLocalLocks } from '@/offline/locks';
import { refreshAcrossTabs } from './refreshLock';

interface Pair {
  accessToken: string;
  refreshToken: string;
}

describe('refreshAcrossTabs (T8)', () => {
  test('ten tabs refreshing at once rotate the token once; every tab gets the new access token (RFC 9700 4.14.2; W3C Web Locks)', async () => {
    let stored: Pair = { accessToken: 'a0', refreshToken: 'r0' };
    const presented: string[] = [];
    const locks = createLocalLocks(); // shared by the "tabs", as navigator.locks is by an origin's tabs
    const deps = {
      locks,
      read: () => stored,
      rotate: async (current: Pair) => {
        presented.push(current.refreshToken);
        await new Promise((r) => setTimeout(r, 5));
        const n = presented.length;
        stored = { accessToken: `a${n}`, refreshToken: `r${n}` };
        return stored;
      },
    };
    const got = await Promise.all(Array.from({ length: 10 }, () => refreshAcrossTabs(deps, 'r0')));
    expect(presented).toEqual(['r0']);
    expect(got).toEqual(Array(10).fill('a1'));
  });

  test('a tab whose token is still the stored one rotates it; a signed-out store gives null (common practice)', async () => {
    const locks = createLocalLocks();
    let stored: Pair | null = { accessToken: 'a0', refreshToken: 'r0' };
    expect(await refreshAcrossTabs({ locks, read: () => stored, rotate: () => Promise.resolve({ accessToken: 'a1', refreshToken: 'r1' }) }, 'r0')).toBe('a1');
    stored = null;
    expect(await refreshAcrossTabs({ locks, read: () => stored, rotate: () => Promise.resolve(null) }, 'r0')).toBeNull();
  });
});
