/**
 * The outbox and Sync as the screen sees them: how many records wait, which need the
 * technician, when the last sync succeeded, and whether a sign-in, storage space or an
 * administrator is needed. The loop itself lives in src/offline (one per browser).
 */
import { defineStore } from 'pinia';
import { computed, readonly, ref, watch } from 'vue';
import { onProblem, outbox, requestPersistence, sync, type OutboxEntry, type Persistence, type SyncState } from '@/offline';
import { useSessionStore } from './session';

export const useOutboxStore = defineStore('outbox', () => {
  const session = useSessionStore();
  const state = ref<SyncState>(sync.status());
  const flaggedEntries = ref<OutboxEntry[]>([]);
  const storageQuotaError = ref<string | null>(null);
  const persistence = ref<Persistence | null>(null);

  const waiting = computed(() => state.value.waiting);
  const flagged = computed(() => state.value.flagged);
  const lastSyncAt = computed(() => (state.value.lastSyncAt ? new Date(state.value.lastSyncAt) : null));
  const syncing = computed(() => state.value.syncing);
  const needsSignIn = computed(() => state.value.needsSignIn || session.expired);
  const revoked = computed(() => state.value.revoked);
  const lastError = computed(() => state.value.lastError);
  const quotaError = computed(() => storageQuotaError.value ?? state.value.quotaError);

  sync.subscribe((next) => {
    state.value = { ...next };
  });
  onProblem((problem) => {
    if (problem.kind === 'quota') storageQuotaError.value = problem.message;
  });

  /** Opens the flagged entries to list them; needs the vault unlocked. */
  async function loadFlagged(): Promise<OutboxEntry[]> {
    try {
      flaggedEntries.value = await outbox.flagged();
    } catch {
      flaggedEntries.value = []; // locked: the count still shows
    }
    return flaggedEntries.value;
  }

  async function syncNow(): Promise<void> {
    await sync.syncNow();
    await loadFlagged();
  }

  async function retry(clientId: string): Promise<void> {
    await outbox.retry(clientId);
    await loadFlagged();
  }

  function dismissQuotaError(): void {
    storageQuotaError.value = null;
    sync.clearQuotaError();
  }

  /** After sign-in: ask to keep storage, start the loop (leader election decides who runs it). */
  async function start(): Promise<void> {
    persistence.value = await requestPersistence();
    sync.start();
    await sync.refresh();
  }

  // Back from an ended session: the loop may send again.
  watch(
    () => session.signedIn && !session.expired,
    (ok, was) => {
      if (ok && !was) sync.signedIn();
    },
  );

  return {
    waiting,
    flagged,
    lastSyncAt,
    syncing,
    needsSignIn,
    revoked,
    lastError,
    quotaError,
    flaggedEntries: readonly(flaggedEntries),
    persistence: readonly(persistence),
    loadFlagged,
    syncNow,
    retry,
    dismissQuotaError,
    start,
  };
});
