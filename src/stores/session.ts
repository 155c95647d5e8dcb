/**
 * Who is signed in. The user and tokens persist in localStorage (versioned), so the shell
 * knows its user after an offline reload; the access token lives 15 minutes and is
 * refreshed (rotating the refresh token) when the server says 401.
 */
import { defineStore } from 'pinia';
import { computed, readonly, ref } from 'vue';
import { roleRank, type Role, type SignInResponse, type User } from '@shared/schemas/auth';
import * as authApi from '@/api/auth';
import { ApiError, useTokenSource } from '@/api/http';
import { refreshAcrossTabs } from '@/api/refreshLock';
import { deviceId, lockManager } from '@/offline';

const KEY = 'cw.session';
interface Stored {
  v: 1;
  user: User;
  accessToken: string;
  refreshToken: string;
}

function load(): Stored | null {
  try {
    const raw = localStorage.getItem(KEY);
    const data = raw ? (JSON.parse(raw) as Stored) : null;
    return data?.v === 1 ? data : null;
  } catch {
    return null;
  }
}

export const useSessionStore = defineStore('session', () => {
  const stored = ref<Stored | null>(load());
  /** Set when the server ended the session: the user must sign in again (local work is kept). */
  const expired = ref(false);

  const user = computed(() => stored.value?.user ?? null);
  const signedIn = computed(() => stored.value !== null);

  function save(next: Stored | null): void {
    stored.value = next;
    if (next) localStorage.setItem(KEY, JSON.stringify(next));
    else localStorage.removeItem(KEY);
  }

  function accept(res: SignInResponse): void {
    save({ v: 1, user: res.user, accessToken: res.accessToken, refreshToken: res.refreshToken });
    expired.value = false;
  }

  async function signIn(email: string, password: string): Promise<void> {
    // Without IndexedDB (a locked-down office browser) the sign-in goes on without a device: no packets then.
    const device = await deviceId().catch(() => undefined);
    accept(await authApi.signIn({ email, password, ...(device ? { deviceId: device } : {}) }));
  }

  let refreshing: Promise<string | null> | null = null;
  /** One refresh per tab at a time, and one across tabs (refreshLock.ts): parallel 401s never replay a rotated token. */
  async function refreshTokens(): Promise<string | null> {
    const current = stored.value;
    if (!current) return null;
    refreshing ??= refreshAcrossTabs<Stored>(
      {
        locks: lockManager(),
        read: () => {
          // Another tab may have stored a newer pair; take it over.
          const latest = load();
          if (latest && latest.refreshToken !== stored.value?.refreshToken) stored.value = latest;
          return latest;
        },
        rotate: async (pair) => {
          try {
            accept(await authApi.refresh(pair.refreshToken));
            return stored.value;
          } catch (err) {
            if (err instanceof ApiError && err.status === 401) expired.value = true;
            return null;
          }
        },
      },
      current.refreshToken,
    )
      .catch(() => null)
      .finally(() => {
        refreshing = null;
      });
    return refreshing;
  }

  async function signOut(): Promise<void> {
    try {
      await authApi.signOut();
    } catch {
      // offline or already ended: the local session ends anyway
    }
    save(null);
  }

  function hasRole(...roles: Role[]): boolean {
    return !!user.value && roles.includes(user.value.role);
  }

  function atLeast(role: Role): boolean {
    return !!user.value && roleRank[user.value.role] >= roleRank[role];
  }

  useTokenSource({ accessToken: () => stored.value?.accessToken ?? null, refresh: refreshTokens });

  return { user, signedIn, expired: readonly(expired), signIn, signOut, refreshTokens, hasRole, atLeast };
});
