/**
 * Owns the Sync protocol on the tablet: sends waiting outbox entries to POST /api/sync in
 * batches of 50, removes only what the server confirmed (accepted or duplicate), flags what
 * it refused with the server's message, and keeps everything else for a retry with backoff.
 * One loop per browser: the tab holding the "corewright-sync-leader" Web Lock runs the
 * periodic and on-reconnect passes; every pass, from any tab, runs under
 * "corewright-sync-pass", so two passes never read the same entries at once.
 */
import { ApiError } from '@/api/http';
import { sendSync, type SyncBatch } from '@/api/sync';
import type { SyncResponse } from '@shared/schemas/sync';
import { backoffDelay } from './backoff';
import { KEY, commit, readOne } from './db';
import { QUOTA_MESSAGE } from './errors';
import { isUnlocked, onKeysChanged } from './keyring';
import { lockManager, type LockManagerLike } from './locks';
import * as outbox from './outbox';

export const BATCH_SIZE = 50;
const PERIOD_MS = 60_000;

export interface SyncDeps {
  deviceId: () => Promise<string | null>;
  send?: (batch: SyncBatch) => Promise<SyncResponse>;
  onRevoked?: () => Promise<void>;
  locks?: LockManagerLike;
  random?: () => number;
  now?: () => Date;
  setTimer?: (fn: () => void, ms: number) => unknown;
  clearTimer?: (handle: unknown) => void;
  periodMs?: number;
}

export interface SyncState {
  waiting: number;
  flagged: number;
  lastSyncAt: string | null;
  lastError: string | null;
  syncing: boolean;
  needsSignIn: boolean;
  revoked: boolean;
  quotaError: string | null;
  nextRetryAt: string | null;
  leader: boolean;
}

export type PassOutcome = 'sent' | 'nothing' | 'locked' | 'retry' | 'sign-in' | 'revoked';
export interface PassResult {
  outcome: PassOutcome;
  requests: number;
  confirmed: number;
  flagged: number;
}

type Entry = { clientId: string; record: SyncBatch['records'][number] };
type ChunkOutcome = 'ok' | 'retry' | 'sign-in' | 'revoked';

export type SyncEngine = ReturnType<typeof createSyncEngine>;

export function createSyncEngine(deps: SyncDeps) {
  const send = deps.send ?? sendSync;
  const locks = deps.locks ?? lockManager();
  const now = deps.now ?? (() => new Date());
  const setTimer = deps.setTimer ?? ((fn, ms) => setTimeout(fn, ms));
  const clearTimer = deps.clearTimer ?? ((h) => clearTimeout(h as ReturnType<typeof setTimeout>));
  const periodMs = deps.periodMs ?? PERIOD_MS;

  const state: SyncState = { waiting: 0, flagged: 0, lastSyncAt: null, lastError: null, syncing: false, needsSignIn: false, revoked: false, quotaError: null, nextRetryAt: null, leader: false };
  const listeners = new Set<(s: Readonly<SyncState>) => void>();
  const emit = () => listeners.forEach((fn) => fn({ ...state }));
  let failures = 0;
  let nudgeQueued = false;

  async function refresh(): Promise<Readonly<SyncState>> {
    const counts = await outbox.count();
    state.waiting = counts.waiting;
    state.flagged = counts.flagged;
    state.lastSyncAt = (await readOne<{ lastSyncAt: string }>(KEY.sync))?.lastSyncAt ?? state.lastSyncAt;
    emit();
    return { ...state };
  }

  async function succeeded(): Promise<void> {
    state.lastSyncAt = now().toISOString();
    state.lastError = null;
    await commit([[KEY.sync, { v: 1, lastSyncAt: state.lastSyncAt }]]);
  }

  async function flagAll(chunk: Entry[], code: string, message: string): Promise<number> {
    const at = now().toISOString();
    return applyFlags(new Map(chunk.map((e) => [e.clientId, { code, message, at }])));
  }

  async function applyFlags(flags: Map<string, outbox.Flag>): Promise<number> {
    if (!flags.size) return 0;
    const result = await outbox.flag(flags);
    // A flag that could not be written leaves the entry waiting: resent later, never lost.
    if (result.failed.some((f) => f.reason === 'quota')) state.quotaError = QUOTA_MESSAGE;
    return result.saved.length;
  }

  async function sendChunk(deviceId: string, chunk: Entry[], tally: PassResult, holding = chunk.length): Promise<ChunkOutcome> {
    let res: SyncResponse;
    tally.requests++;
    try {
      res = await send({ deviceId, records: chunk.map((e) => e.record), outbox: { waiting: holding } });
    } catch (err) {
      const e = err instanceof ApiError ? err : new ApiError('network', 'Sync failed unexpectedly; nothing was lost.', 0);
      if (e.isNetwork || e.status >= 500 || e.status === 408 || e.status === 429 || e.code === 'bad-response') {
        state.lastError = e.message;
        return 'retry';
      }
      // Checked before 401: a session ended by a revocation should say so, and then the tablet wipes.
      if (e.code === 'device-revoked') return 'revoked';
      if (e.status === 401) return 'sign-in';
      // Too large for one request: halve it; only a single record that is still too large is flagged.
      if (e.status === 413 && chunk.length > 1) {
        const half = Math.ceil(chunk.length / 2);
        const first = await sendChunk(deviceId, chunk.slice(0, half), tally);
        return first === 'ok' ? sendChunk(deviceId, chunk.slice(half), tally) : first;
      }
      // The server read the request and refused all of it: show why on every entry, keep them all.
      tally.flagged += await flagAll(chunk, e.code, e.message);
      state.lastError = e.message;
      return 'ok';
    }
    const ids = new Set(chunk.map((e) => e.clientId));
    const confirmed = [...res.accepted, ...res.duplicates].filter((id) => ids.has(id));
    await outbox.confirm(confirmed);
    tally.confirmed += confirmed.length;
    const done = new Set(confirmed);
    const flags = new Map<string, outbox.Flag>();
    for (const r of res.rejected) {
      // A revoked tablet's records were not refused for what they hold: they stay waiting, unflagged.
      if (res.deviceRevoked && r.error.code === 'device-revoked') continue;
      const id = r.clientId && ids.has(r.clientId) ? r.clientId : chunk[r.index]?.clientId;
      if (id && !done.has(id)) flags.set(id, { code: r.error.code, message: r.error.message, at: now().toISOString() });
    }
    tally.flagged += await applyFlags(flags);
    await succeeded();
    return res.deviceRevoked ? 'revoked' : 'ok';
  }

  async function runPass(): Promise<PassResult> {
    const tally: PassResult = { outcome: 'nothing', requests: 0, confirmed: 0, flagged: 0 };
    if (state.revoked) return { ...tally, outcome: 'revoked' };
    if (!isUnlocked()) return { ...tally, outcome: 'locked' };
    const deviceId = await deps.deviceId();
    if (!deviceId) return { ...tally, outcome: 'locked' };
    const entries = await outbox.pending();
    const flaggedNow = (await outbox.count()).flagged;
    for (let i = 0; i < entries.length; i += BATCH_SIZE) {
      const outcome = await sendChunk(deviceId, entries.slice(i, i + BATCH_SIZE), tally, entries.length - i + flaggedNow);
      if (outcome !== 'ok') return { ...tally, outcome };
    }
    return { ...tally, outcome: entries.length ? 'sent' : 'nothing' };
  }

  async function settle(result: PassResult): Promise<void> {
    if (result.outcome === 'retry') failures++;
    else if (result.outcome === 'sent' || result.outcome === 'nothing') failures = 0;
    if (result.outcome === 'sign-in') {
      state.needsSignIn = true;
      state.lastError = 'Your session ended. Sign in again; finished work stays in the outbox.';
    }
    if (result.outcome === 'revoked' && !state.revoked) {
      state.revoked = true;
      state.lastError = 'An administrator revoked this tablet. Finished work is kept on it but cannot sync from this device.';
      await deps.onRevoked?.();
    }
  }

  /** One pass now, from any tab; waits while another tab's pass runs. */
  async function syncNow(): Promise<PassResult> {
    const result = await locks.request('corewright-sync-pass', {}, async () => {
      // This pass reads the outbox from here on, so a later write needs a pass of its own.
      nudgeQueued = false;
      state.syncing = true;
      emit();
      try {
        const r = await runPass();
        await settle(r);
        return r;
      } catch {
        state.lastError = 'Sync stopped unexpectedly; nothing was lost. It will try again.';
        failures++;
        return { outcome: 'retry', requests: 0, confirmed: 0, flagged: 0 } satisfies PassResult;
      } finally {
        state.syncing = false;
        await refresh().catch(() => emit());
      }
    });
    if (state.leader) scheduleNext(result);
    return result;
  }

  // ---- the leader's loop --------------------------------------------------------------
  let timer: unknown = null;
  let started = false;
  let campaign: AbortController | null = null;
  let releaseLeadership: (() => void) | null = null;
  let unsubscribeKeys: (() => void) | null = null;
  const onOnline = () => void syncNow();

  function scheduleNext(result: PassResult): void {
    if (timer !== null) clearTimer(timer);
    timer = null;
    state.nextRetryAt = null;
    if (!state.leader || state.needsSignIn || state.revoked || result.outcome === 'locked') return emit();
    const delay = result.outcome === 'retry' ? backoffDelay(failures, deps.random) : periodMs;
    if (result.outcome === 'retry') state.nextRetryAt = new Date(now().getTime() + delay).toISOString();
    timer = setTimer(() => {
      timer = null;
      void syncNow();
    }, delay);
    emit();
  }

  function lead(): Promise<void> {
    return new Promise<void>((release) => {
      releaseLeadership = release;
      state.leader = true;
      if (typeof window !== 'undefined') window.addEventListener('online', onOnline);
      void syncNow();
    });
  }

  function runForLeader(): void {
    if (campaign || state.revoked) return;
    const mine = new AbortController();
    campaign = mine;
    locks.request('corewright-sync-leader', { signal: mine.signal }, lead).catch(() => {
      // aborted: this tab locked or stopped before it became the leader
    });
  }

  /** A locked tab cannot open the outbox, so it hands the loop to another tab. */
  function resign(): void {
    campaign?.abort();
    campaign = null;
    if (timer !== null) clearTimer(timer);
    timer = null;
    if (typeof window !== 'undefined') window.removeEventListener('online', onOnline);
    state.leader = false;
    releaseLeadership?.();
    releaseLeadership = null;
    emit();
  }

  function start(): void {
    if (started) return;
    started = true;
    unsubscribeKeys = onKeysChanged((unlocked) => (unlocked ? runForLeader() : resign()));
    if (isUnlocked()) runForLeader();
    void refresh();
  }

  function stop(): void {
    started = false;
    unsubscribeKeys?.();
    unsubscribeKeys = null;
    resign();
  }

  /** Called after a fresh sign-in: the session is back, so the loop may send again. */
  function signedIn(): void {
    state.needsSignIn = false;
    state.lastError = null;
    failures = 0;
    if (started && state.leader) void syncNow();
    else emit();
  }

  /** The vault was set up again after a revocation was lifted. */
  function reinstated(): void {
    state.revoked = false;
    emit();
    if (started && isUnlocked()) runForLeader();
  }

  /**
   * New work just reached the outbox: send it now rather than at the next period, unless the
   * browser is offline, the session or tablet needs attention, or the last pass failed (its
   * backoff decides when to try again). Nudges coalesce: one pass waits at most.
   */
  function nudge(): boolean {
    if (state.needsSignIn || state.revoked || failures > 0) return false;
    if (typeof navigator !== 'undefined' && navigator.onLine === false) return false;
    if (!nudgeQueued) {
      nudgeQueued = true;
      void syncNow();
    }
    return true;
  }

  async function retry(clientId: string) {
    const result = await outbox.unflag(clientId);
    if (result.failed.some((f) => f.reason === 'quota')) state.quotaError = QUOTA_MESSAGE;
    if (result.saved.length) await syncNow();
    else await refresh();
    return result;
  }

  function subscribe(fn: (s: Readonly<SyncState>) => void): () => void {
    listeners.add(fn);
    fn({ ...state });
    return () => listeners.delete(fn);
  }

  return { syncNow, nudge, start, stop, refresh, signedIn, reinstated, retry, subscribe, status: (): Readonly<SyncState> => ({ ...state }), clearQuotaError: () => ((state.quotaError = null), emit()) };
}
