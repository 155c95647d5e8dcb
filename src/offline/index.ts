/**
 * The offline layer's public face for the Bench UI and the stores. Storage, keys and the
 * Sync protocol stay behind it; see db.ts for what is stored where.
 */
import type { SyncRecord } from '@shared/schemas/sync';
import * as benchStore from './bench';
import * as outboxStore from './outbox';
import * as packetStore from './packets';
import * as vaultStore from './vault';
import { createSyncEngine } from './syncEngine';
import { recordFinished as recordFinishedTogether, type ProgressUpdate } from './recordFinished';
import type { WriteResult } from './errors';

export const vault = {
  status: vaultStore.status,
  setup: vaultStore.setup,
  unlock: vaultStore.unlock,
  lock: vaultStore.lock,
  forgotPassphrase: vaultStore.forgotPassphrase,
  recoverWithServer: vaultStore.recoverWithServer,
  changePassphrase: vaultStore.changePassphrase,
  revoke: vaultStore.revoke,
  wipeLocal: vaultStore.wipeLocal,
} as const;

export const packets = {
  save: packetStore.save,
  get: packetStore.get,
  list: packetStore.list,
  remove: packetStore.remove,
  purgeExpired: packetStore.purgeExpired,
} as const;

export const bench = {
  getProgress: benchStore.getProgress,
  saveProgress: benchStore.saveProgress,
  clearProgress: benchStore.clearProgress,
  /** Counts only (works while locked): what a forgotten passphrase keeps and loses. */
  summary: benchStore.progressSummary,
} as const;

export const sync = createSyncEngine({
  deviceId: async () => (await vaultStore.status()).deviceId,
  onRevoked: vaultStore.revoke,
});

/** After a write, sends it at once when online (nudge); else the waiting count on screen goes up and the loop sends it later. */
async function counted(write: Promise<WriteResult>): Promise<WriteResult> {
  const result = await write;
  if (result.saved.length && !sync.nudge()) void sync.refresh().catch(() => undefined);
  return result;
}

/** The Bench progress change and its outbox entry, in one transaction (reliability.md S10). */
export function recordFinished(update: ProgressUpdate, record: SyncRecord): Promise<WriteResult> {
  return counted(recordFinishedTogether(update, record));
}

export const outbox = {
  list: outboxStore.list,
  count: outboxStore.count,
  flagged: outboxStore.flagged,
  /** An entry with no Bench progress behind it; prefer recordFinished when there is one. */
  add: (record: SyncRecord) => counted(outboxStore.add(record)),
  /** Clears the flag and sends the entry in a pass of its own. */
  retry: (clientId: string) => sync.retry(clientId),
} as const;

export type { ProgressUpdate } from './recordFinished';
export { requestPersistence, type Persistence } from './storage';
export { BenchProgress, type ProgressSummary } from './bench';
export { checkPassphrase, PASSPHRASE_RULE, type PassphraseCheck } from './passphrase';
export { deviceId, LEGACY_DEVICE_KEY } from './device';
export { UNLOCK_ATTEMPT_LIMIT, type VaultState, type VaultStatus, type VaultResult, type VaultErrorCode, type Who, type KdfOptions } from './vault';
export { PBKDF2_ITERATIONS } from './crypto';
export { onProblem, QUOTA_MESSAGE, type Problem, type WriteResult, type WriteFailure, VaultLockedError, IntegrityError } from './errors';
export type { OutboxEntry, OutboxCount, Flag } from './outbox';
export type { PacketSummary } from './packets';
export type { SyncState, PassResult, PassOutcome, SyncEngine } from './syncEngine';
export { createSyncEngine } from './syncEngine';
export { createLocalLocks, lockManager, type LockManagerLike } from './locks';
