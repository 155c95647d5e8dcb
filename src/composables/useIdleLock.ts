/**
 * Locks the vault after a few idle minutes (default 5; localStorage "cw.idleMinutes"
 * overrides it, for tests and for a supervisor's choice). Activity is judged by time
 * stamps, not one long timer, because a sleeping tablet or a background tab delays timers.
 */
import { onBeforeUnmount, onMounted, ref, type Ref } from 'vue';
import { useRoute, useRouter } from 'vue-router';
import { useVaultStore } from '@/stores/vault';

export const DEFAULT_IDLE_MINUTES = 5;
const EVENTS = ['pointerdown', 'keydown', 'wheel', 'touchstart'] as const;

export function idleMinutes(): number {
  const stored = Number(typeof localStorage === 'undefined' ? NaN : localStorage.getItem('cw.idleMinutes'));
  return Number.isFinite(stored) && stored > 0 ? stored : DEFAULT_IDLE_MINUTES;
}

export interface IdleLockOptions {
  minutes?: number;
  /** What locking does; by default the vault locks and the unlock page opens. */
  onLock?: () => void;
}

export function useIdleLock(options: IdleLockOptions = {}): { lastActivity: Ref<number>; touch: () => void } {
  const vault = useVaultStore();
  const router = useRouter();
  const route = useRoute();
  const lastActivity = ref(Date.now());
  const idleMs = () => (options.minutes ?? idleMinutes()) * 60_000;
  let timer: ReturnType<typeof setInterval> | undefined;

  const touch = () => {
    lastActivity.value = Date.now();
  };

  function lockNow(): void {
    if (options.onLock) return options.onLock();
    vault.lock(options.minutes ?? idleMinutes());
    // Bench progress is already saved step by step; the Bench reopens where it was.
    void router.replace({ name: 'unlock', query: { next: route.fullPath } });
  }

  function check(): void {
    if (vault.state === 'unlocked' && Date.now() - lastActivity.value >= idleMs()) lockNow();
  }

  const onVisible = () => {
    if (document.visibilityState === 'visible') check();
  };

  onMounted(() => {
    for (const name of EVENTS) window.addEventListener(name, touch, { passive: true });
    document.addEventListener('visibilitychange', onVisible);
    timer = setInterval(check, Math.min(15_000, idleMs() / 4));
  });
  onBeforeUnmount(() => {
    for (const name of EVENTS) window.removeEventListener(name, touch);
    document.removeEventListener('visibilitychange', onVisible);
    clearInterval(timer);
  });

  return { lastActivity, touch };
}
