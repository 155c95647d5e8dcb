/**
 * What the offline layer reports instead of throwing at the screen: writes answer
 * { saved, failed }, reads skip a damaged record and report it here.
 */

/** Asked for a key while the vault is locked: the caller shows the unlock page. */
export class VaultLockedError extends Error {
  constructor() {
    super('The tablet is locked; unlock it with your passphrase.');
    this.name = 'VaultLockedError';
  }
}

/** AES-GCM refused a ciphertext: it was changed, moved to another record, or sealed under another key. */
export class IntegrityError extends Error {
  constructor(readonly key: string) {
    super(`The record ${key} on this tablet failed its integrity check and was not used.`);
    this.name = 'IntegrityError';
  }
}

export type FailReason = 'quota' | 'locked' | 'storage';
export interface WriteFailure {
  key: string;
  reason: FailReason;
  message: string;
}
/** Partial failures are data, not exceptions: the caller keeps what failed and can try again. */
export interface WriteResult {
  saved: string[];
  failed: WriteFailure[];
}

export const QUOTA_MESSAGE =
  'This tablet’s storage is full, so the last change was not saved yet. Nothing already saved was lost. Sync finished work and remove work orders you no longer need, then try again.';

/** Browsers name a full disk differently; all of them mean the write did not happen. */
export function isQuotaError(err: unknown): boolean {
  const name = (err as { name?: string } | null)?.name;
  return name === 'QuotaExceededError' || name === 'NS_ERROR_DOM_QUOTA_REACHED';
}

export function failureOf(key: string, err: unknown): WriteFailure {
  if (err instanceof VaultLockedError) return { key, reason: 'locked', message: err.message };
  if (isQuotaError(err)) return { key, reason: 'quota', message: QUOTA_MESSAGE };
  return { key, reason: 'storage', message: 'The tablet could not save this change; nothing already saved was lost. Try again.' };
}

export function resultOf(keys: string[], err?: unknown): WriteResult {
  if (err === undefined) return { saved: keys, failed: [] };
  // A full disk concerns the whole screen, not just the caller: the stores show a banner.
  if (isQuotaError(err)) reportProblem({ key: keys[0] ?? '', kind: 'quota', message: QUOTA_MESSAGE });
  return { saved: [], failed: keys.map((k) => failureOf(k, err)) };
}

export interface Problem {
  key: string;
  kind: 'damaged' | 'quota';
  message: string;
}
type ProblemListener = (problem: Problem) => void;
const listeners = new Set<ProblemListener>();

/** The stores listen here so a damaged record or a full disk reaches the screen, never a crash. */
export function onProblem(listener: ProblemListener): () => void {
  listeners.add(listener);
  return () => listeners.delete(listener);
}

export function reportProblem(problem: Problem): void {
  for (const listener of listeners) listener(problem);
}
