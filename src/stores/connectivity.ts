/**
 * Online or offline, as the technician needs to know it: the browser's own flag, and
 * whether the Corewright server actually answered (a basement can have Wi-Fi but no route).
 */
import { defineStore } from 'pinia';
import { computed, readonly, ref } from 'vue';
import { health } from '@/api/auth';

export const useConnectivityStore = defineStore('connectivity', () => {
  const browserOnline = ref(typeof navigator === 'undefined' ? true : navigator.onLine);
  const serverReachable = ref<boolean | null>(null);
  const lastContactAt = ref<Date | null>(null);

  const online = computed(() => browserOnline.value && serverReachable.value !== false);

  async function check(): Promise<boolean> {
    if (!browserOnline.value) {
      serverReachable.value = false;
      return false;
    }
    const abort = new AbortController();
    const timer = setTimeout(() => abort.abort(), 5000);
    try {
      await health(abort.signal);
      serverReachable.value = true;
      lastContactAt.value = new Date();
    } catch {
      serverReachable.value = false;
    } finally {
      clearTimeout(timer);
    }
    return serverReachable.value;
  }

  let timer: ReturnType<typeof setInterval> | undefined;
  function watch(intervalMs = 30_000): void {
    if (timer) return;
    window.addEventListener('online', () => {
      browserOnline.value = true;
      void check();
    });
    window.addEventListener('offline', () => {
      browserOnline.value = false;
      serverReachable.value = false;
    });
    void check();
    timer = setInterval(() => void check(), intervalMs);
  }

  return { online, browserOnline: readonly(browserOnline), serverReachable: readonly(serverReachable), lastContactAt: readonly(lastContactAt), check, watch };
});
