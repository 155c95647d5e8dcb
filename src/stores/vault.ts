/**
 * The vault as the screen sees it: needs a passphrase, locked, unlocked, or wiped (after a
 * lockout, a forgotten passphrase or a revocation). A lockout and a forgotten passphrase
 * also end the local session, so recovering finished work takes a fresh online sign-in.
 */
import { defineStore } from 'pinia';
import { computed, readonly, ref } from 'vue';
import { deviceId, onProblem, packets, sync, vault, type Problem, type VaultResult, type VaultStatus } from '@/offline';
import { useSessionStore } from './session';

/** Why the vault is locked, for the unlock screen; null: the app was (re)started, so the keys left memory. */
export type LockReason = { kind: 'idle'; minutes: number } | { kind: 'signed-in' } | null;

export const useVaultStore = defineStore('vault', () => {
  const session = useSessionStore();
  const status = ref<VaultStatus | null>(null);
  const busy = ref(false);
  const damaged = ref<Problem[]>([]);
  const lockReason = ref<LockReason>(null);

  const state = computed(() => status.value?.state ?? 'locked');
  const locked = computed(() => state.value !== 'unlocked');
  const needsSetup = computed(() => state.value === 'needs-setup');
  const remainingAttempts = computed(() => status.value?.remainingAttempts ?? 0);
  /** What the unlock page says after a wipe; empty when nothing was wiped. */
  const wipedMessage = computed(() => {
    switch (status.value?.wipeReason) {
      case 'lockout':
        return 'Too many wrong passphrases: the packets on this tablet were wiped for safety. Finished work is kept and will sync after you sign in again and choose a new passphrase.';
      case 'forgotten':
        return 'The packets on this tablet were wiped. Finished work is kept; sign in again and choose a new passphrase to sync it.';
      case 'revoked':
        return 'An administrator revoked this tablet. Its packets were wiped. Finished work is kept on it, sealed, but cannot sync from this device until an administrator restores it.';
      default:
        return '';
    }
  });

  async function refresh(): Promise<VaultStatus> {
    status.value = await vault.status();
    return status.value;
  }

  async function run(action: () => Promise<VaultResult>): Promise<VaultResult> {
    busy.value = true;
    try {
      return await action();
    } finally {
      await refresh();
      busy.value = false;
    }
  }

  async function afterOpen(result: VaultResult): Promise<VaultResult> {
    if (result.ok) {
      await packets.purgeExpired();
      void sync.refresh();
    }
    return result;
  }

  function setup(passphrase: string): Promise<VaultResult> {
    const user = session.user;
    if (!user) return Promise.resolve({ ok: false, code: 'state', message: 'Sign in first.' });
    return run(async () => afterOpen(await vault.setup(passphrase, { userId: user.id, deviceId: await deviceId(), label: `${user.name}’s tablet` })));
  }

  function unlock(passphrase: string): Promise<VaultResult> {
    return run(async () => {
      const result = await vault.unlock(passphrase);
      // The lockout is only worth something if guessing cannot go on: a fresh sign-in is needed now.
      if (!result.ok && result.code === 'wiped') await session.signOut();
      return afterOpen(result);
    });
  }

  /** The idle lock passes how many idle minutes it waited, so the unlock screen can say so. */
  function lock(idleMinutes?: number): void {
    vault.lock();
    lockReason.value = idleMinutes === undefined ? null : { kind: 'idle', minutes: idleMinutes };
    void refresh();
  }

  async function forgotPassphrase(): Promise<void> {
    busy.value = true;
    try {
      await vault.forgotPassphrase();
      await session.signOut();
    } finally {
      await refresh();
      busy.value = false;
    }
  }

  function recover(newPassphrase: string): Promise<VaultResult> {
    return run(async () => {
      const result = await afterOpen(await vault.recoverWithServer(newPassphrase));
      if (result.ok) {
        sync.reinstated();
        sync.signedIn();
      }
      return result;
    });
  }

  function changePassphrase(current: string, next: string): Promise<VaultResult> {
    return run(() => vault.changePassphrase(current, next));
  }

  // Sign-out wipes packets and Bench progress; the outbox and the passphrase stay.
  session.$onAction(({ name, after }) => {
    if (name === 'signOut') after(() => void vault.wipeLocal().then(refresh));
    if (name === 'signIn') after(() => void (lockReason.value = { kind: 'signed-in' }));
  });
  onProblem((problem) => {
    if (problem.kind === 'damaged' && !damaged.value.some((p) => p.key === problem.key)) damaged.value.push(problem);
  });

  return {
    status: readonly(status),
    lockReason: readonly(lockReason),
    state,
    locked,
    needsSetup,
    remainingAttempts,
    wipedMessage,
    busy: readonly(busy),
    damaged: readonly(damaged),
    refresh,
    setup,
    unlock,
    lock,
    forgotPassphrase,
    recover,
    changePassphrase,
  };
});
