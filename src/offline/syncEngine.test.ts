import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { useTokenSource } from '@/api/http';
import type { SyncRecord } from '@shared/schemas/sync';
import { BACKOFF_CAP_MS, backoffDelay } from './backoff';
import { createLocalLocks, type LockManagerLike } from './locks';
import * as outbox from './outbox';
import * as packets from './packets';
import { recordFinished } from './recordFinished';
import { createSyncEngine, type SyncDeps, type SyncEngine } from './syncEngine';
import * as vault from './vault';
import type { FakeServer } from './testing/fakeServer';
import { completion, packet, who } from './testing/fixtures';
import { resetOffline, setUpVault } from './testing/harness';

let server: FakeServer;
const engines: SyncEngine[] = [];
let timers: { fn: () => void; ms: number }[];

function engine(extra: Partial<SyncDeps> = {}): SyncEngine {
  const e = createSyncEngine({
    deviceId: () => Promise.resolve(who.deviceId),
    onRevoked: vault.revoke,
    locks: createLocalLocks(),
    random: () => 1,
    setTimer: (fn, ms) => timers.push({ fn, ms }) - 1,
    clearTimer: () => undefined,
    ...extra,
  });
  engines.push(e);
  return e;
}

async function finish(n: number): Promise<SyncRecord[]> {
  const out: SyncRecord[] = [];
  for (let i = 0; i < n; i++) {
    const r = completion({ finishedAt: new Date(Date.UTC(2026, 11, 1, 9, 0, i)).toISOString() });
    expect((await recordFinished({ coreId: r.coreId, progress: null }, r)).failed).toEqual([]);
    out.push(r);
  }
  return out;
}

beforeEach(async () => {
  timers = [];
  server = await resetOffline();
  await setUpVault();
});
afterEach(() => {
  engines.splice(0).forEach((e) => e.stop());
});

describe('what leaves the outbox', () => {
  it('removes only what the server confirmed as accepted or duplicate', async () => {
    // CouchDB replication protocol (checkpoint after commit); reliability.md S4
    const [a, b, c] = await finish(3);
    server.rows.set(b!.clientId, b!); // already stored: a duplicate
    server.queue.push({ status: 200, body: { accepted: [a!.clientId], duplicates: [b!.clientId], rejected: [] } });
    const result = await engine().syncNow();
    expect(result).toMatchObject({ confirmed: 2, requests: 1 });
    expect((await outbox.list()).map((e) => e.clientId)).toEqual([c!.clientId]);
  });

  it('S5: record 4 of 10 refused → 9 removed, 1 flagged with the message; only a retry resends it, and nothing twice', async () => {
    // reliability.md S5; PouchDB replication tests (#4963)
    const records = await finish(10);
    const bad = records[3]!;
    server.reject = (r) => (r.clientId === bad.clientId ? { code: 'validation', message: 'attempts.0.steps.0.size is out of range' } : null);
    const e = engine();
    expect(await e.syncNow()).toMatchObject({ confirmed: 9, flagged: 1 });
    const left = await outbox.list();
    expect(left).toHaveLength(1);
    expect(left[0]).toMatchObject({ clientId: bad.clientId, state: 'flagged', flag: { code: 'validation', message: 'attempts.0.steps.0.size is out of range' } });
    expect(e.status()).toMatchObject({ waiting: 1, flagged: 1 });

    expect(await e.syncNow()).toMatchObject({ outcome: 'nothing', requests: 0 }); // not resent by itself
    server.reject = () => null;
    await e.retry(bad.clientId);
    expect(server.syncRequests.at(-1)!.map((r) => r.clientId)).toEqual([bad.clientId]);
    expect(await outbox.count()).toEqual({ waiting: 0, flagged: 0 });
    expect(server.rows.size).toBe(10);
    expect(new Set(server.received).size).toBe(server.received.length - 1); // only the refused one arrived twice
  });

  it('matches a refusal without a client id by its index in the batch', async () => {
    // shared/schemas/sync.ts: SyncRejection.clientId is nullable, index is always set
    await finish(3);
    server.anonymousRejections = true;
    server.reject = (_r, index) => (index === 1 ? { code: 'validation', message: 'clientId must be a UUID' } : null);
    await engine().syncNow();
    expect((await outbox.flagged()).map((x) => x.clientId)).toEqual([server.syncRequests[0]![1]!.clientId]);
    expect(await outbox.count()).toEqual({ waiting: 1, flagged: 1 });
  });
});

describe('a core finished online', () => {
  it('is sent at once by a nudge, not at the next one-minute period', async () => {
    // common practice (a write-behind queue flushes on a new write when the link is up); reliability.md S4
    const e = engine();
    e.start();
    await vi.waitFor(() => expect(timers).toHaveLength(1)); // the first, empty pass scheduled the period
    const [a] = await finish(1);
    expect(e.nudge()).toBe(true); // no timer is fired by the test: only the nudge can send
    await vi.waitFor(async () => expect(await outbox.count()).toEqual({ waiting: 0, flagged: 0 }));
    expect(server.syncRequests.map((r) => r.map((x) => x.clientId))).toEqual([[a!.clientId]]);
  });

  it('waits out a failure’s backoff instead of hammering the server', async () => {
    // AWS Architecture Blog "Exponential backoff and jitter": a new write does not reset the backoff
    await finish(1);
    server.queue.push({ status: 500, body: { error: { code: 'internal', message: 'Something went wrong on the server' } } });
    const e = engine();
    e.start();
    await vi.waitFor(() => expect(e.status().nextRetryAt).not.toBeNull());
    const requestsBefore = server.syncRequests.length;
    await finish(1);
    expect(e.nudge()).toBe(false);
    expect(server.syncRequests.length).toBe(requestsBefore);
  });
});

describe('S7: server errors', () => {
  it('keeps everything on a 500 and backs off 2 s, 4 s, 8 s…, capped at 5 minutes', async () => {
    // reliability.md S7; Workbox background-sync issue #2599; AWS Architecture Blog "Exponential backoff and jitter"
    await finish(3);
    server.queue.push(...Array.from({ length: 3 }, () => ({ status: 500, body: { error: { code: 'internal', message: 'Something went wrong on the server' } } })));
    const e = engine();
    e.start();
    await vi.waitFor(() => expect(timers).toHaveLength(1));
    await e.syncNow();
    await e.syncNow();
    expect(timers.map((t) => t.ms)).toEqual([2000, 4000, 8000]);
    expect(e.status()).toMatchObject({ waiting: 3, lastError: 'Something went wrong on the server' });
    expect(e.status().nextRetryAt).not.toBeNull();
    expect(await outbox.count()).toEqual({ waiting: 3, flagged: 0 });
    await e.syncNow(); // the server is back
    expect(await outbox.count()).toEqual({ waiting: 0, flagged: 0 });
    expect(timers.at(-1)!.ms).toBe(60_000); // back to the periodic pace
    expect(e.status().lastSyncAt).not.toBeNull();
  });

  it('keeps everything when the network is gone', async () => {
    // reliability.md S7: a network failure is a retry, never a loss
    await finish(2);
    server.offline = true;
    expect(await engine().syncNow()).toMatchObject({ outcome: 'retry' });
    expect(await outbox.count()).toEqual({ waiting: 2, flagged: 0 });
  });

  it('caps the delay and keeps jitter within the upper half', () => {
    // AWS Architecture Blog "Exponential backoff and jitter" (equal jitter)
    expect(backoffDelay(30, () => 1)).toBe(BACKOFF_CAP_MS);
    expect(backoffDelay(1, () => 0)).toBe(1000);
    for (let n = 1; n < 12; n++) expect(backoffDelay(n + 1, () => 1)).toBeGreaterThanOrEqual(backoffDelay(n, () => 1));
  });

  it('flags the whole batch with the server’s message on a 422 and keeps it', async () => {
    // reliability.md S7: a 4xx is kept and shown to the user
    await finish(3);
    server.queue.push({ status: 422, body: { error: { code: 'unprocessable', message: 'The work order is closed; ask the supervisor to reopen it.' } } });
    const e = engine();
    await e.syncNow();
    const flagged = await outbox.flagged();
    expect(flagged).toHaveLength(3);
    expect(flagged.every((f) => f.flag?.message === 'The work order is closed; ask the supervisor to reopen it.')).toBe(true);
    expect(e.status()).toMatchObject({ waiting: 3, flagged: 3 });
  });

  it('splits a batch the server finds too large instead of flagging it', async () => {
    // RFC 9110 15.5.14 (413 Content Too Large); DEVELOPERS.md: JSON bodies are limited to 100 KB
    await finish(4);
    server.queue.push({ status: 413, body: { error: { code: 'payload-too-large', message: 'The request is too large' } } });
    await engine().syncNow();
    expect(server.syncRequests.map((r) => r.length)).toEqual([4, 2, 2]);
    expect(server.rows.size).toBe(4);
    expect(await outbox.count()).toEqual({ waiting: 0, flagged: 0 });
  });
});

describe('an ended session and a revoked tablet', () => {
  it('keeps the outbox on a 401 after the refresh fails, asks for sign-in, and sends after it', async () => {
    // the issue: an expired session keeps the outbox and asks for sign-in
    await finish(2);
    const refresh = vi.fn(() => Promise.resolve(null));
    useTokenSource({ accessToken: () => 'expired', refresh });
    server.queue.push({ status: 401, body: { error: { code: 'unauthenticated', message: 'Please sign in again' } } });
    const e = engine();
    e.start();
    await vi.waitFor(() => expect(e.status().needsSignIn).toBe(true));
    expect(refresh).toHaveBeenCalledOnce();
    expect(await outbox.count()).toEqual({ waiting: 2, flagged: 0 });
    expect(timers).toEqual([]); // no retry loop against an ended session
    e.signedIn();
    await vi.waitFor(() => expect(server.rows.size).toBe(2));
    await vi.waitFor(() => expect(e.status()).toMatchObject({ needsSignIn: false, waiting: 0 }));
  });

  it('wipes packets when the sync answer says the tablet was revoked, keeps the outbox, and stops', async () => {
    // the issue: a device revoked by an admin wipes itself on its next contact; never drop finished work
    await packets.save(packet());
    await finish(2);
    server.revoked = true;
    const e = engine();
    expect(await e.syncNow()).toMatchObject({ outcome: 'revoked' });
    expect(await vault.status()).toMatchObject({ state: 'revoked' });
    expect(await packets.purgeExpired()).toEqual([]);
    expect(await outbox.count()).toEqual({ waiting: 2, flagged: 0 }); // waiting, not flagged: the records themselves are fine
    expect(e.status()).toMatchObject({ revoked: true });
    const before = server.syncRequests.length;
    expect(await e.syncNow()).toMatchObject({ outcome: 'revoked', requests: 0 });
    expect(server.syncRequests.length).toBe(before);
  });

  it('treats a device-revoked error on the whole request as a revocation, even as a 401', async () => {
    // the brief: revocation wipes packets on the next contact; the code decides, not the status
    await packets.save(packet());
    await finish(1);
    server.queue.push({ status: 401, body: { error: { code: 'device-revoked', message: 'This tablet was revoked by an administrator.' } } });
    expect(await engine().syncNow()).toMatchObject({ outcome: 'revoked' });
    expect(await vault.status()).toMatchObject({ state: 'revoked' });
    expect(await outbox.count()).toEqual({ waiting: 1, flagged: 0 });
  });

  it('does not send while the tablet is locked', async () => {
    // the issue: the key is dropped from memory on lock, so nothing can be opened to send
    await finish(1);
    vault.lock();
    expect(await engine().syncNow()).toMatchObject({ outcome: 'locked', requests: 0 });
    expect(server.syncRequests).toEqual([]);
  });
});

describe('S9: two tabs', () => {
  it('runs one loop: one leader, one request, and the other tab takes over when the leader goes', async () => {
    // reliability.md S9; Web Locks API (W3C): one holder per exclusive lock name; RxDB leader election
    const locks: LockManagerLike = createLocalLocks(); // one lock manager, as the tabs of one browser share
    await finish(3);
    const tabA = engine({ locks });
    const tabB = engine({ locks });
    tabA.start();
    tabB.start();
    await vi.waitFor(() => expect(server.rows.size).toBe(3));
    await new Promise((r) => setTimeout(r, 20));
    expect(server.syncRequests).toHaveLength(1);
    expect([tabA.status().leader, tabB.status().leader]).toEqual([true, false]);
    // Both periodic timers would fire now; only the leader's was set.
    expect(timers).toHaveLength(1);

    await finish(2);
    tabA.stop();
    await vi.waitFor(() => expect(tabB.status().leader).toBe(true));
    await vi.waitFor(() => expect(server.rows.size).toBe(5));
    expect(server.syncRequests).toHaveLength(2);
  });

  it('sends each record once when both tabs press Sync now at the same moment', async () => {
    // reliability.md S9; Web Locks API (W3C): the pass lock serialises passes across tabs
    const locks = createLocalLocks();
    await finish(60);
    const [a, b] = [engine({ locks }), engine({ locks })];
    await Promise.all([a.syncNow(), b.syncNow(), a.syncNow()]);
    expect(server.syncRequests.map((r) => r.length)).toEqual([50, 10]);
    expect(server.received).toHaveLength(60);
    expect(new Set(server.received).size).toBe(60);
  });
});
