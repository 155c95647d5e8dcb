import 'fake-indexeddb/auto';
import { describe, expect, it, vi } from 'vitest';
import { createFakeServer } from './testing/fakeServer';
import { PASSPHRASE, TEST_ITERATIONS, completion, who } from './testing/fixtures';

describe('S8: a shift offline', () => {
  it('keeps 500 finished records across a restart, then sends them in batches of 50, each exactly once', async () => {
    // reliability.md S8 (Workbox keeps 7 days by default; ours: no expiry); CouchDB replication (checkpoint after commit)
    const server = createFakeServer();
    vi.stubGlobal('fetch', vi.fn(server.fetch));
    const first = await import('./index');
    expect(await first.vault.setup(PASSPHRASE, who, { iterations: TEST_ITERATIONS })).toEqual({ ok: true });
    server.offline = true; // the basement
    const sent = new Set<string>();
    for (let i = 0; i < 500; i++) {
      const r = completion();
      sent.add(r.clientId);
      expect((await first.recordFinished({ coreId: r.coreId, progress: null }, r)).failed).toEqual([]);
    }
    expect(await first.sync.syncNow()).toMatchObject({ outcome: 'retry' });
    first.vault.lock();

    // The restart: fresh module instances, nothing in memory, the same IndexedDB underneath.
    vi.resetModules();
    const second = await import('./index');
    expect(second).not.toBe(first);
    expect(await second.outbox.count()).toEqual({ waiting: 500, flagged: 0 });
    expect(await second.vault.unlock(PASSPHRASE)).toEqual({ ok: true });
    server.offline = false;
    expect(await second.sync.syncNow()).toMatchObject({ outcome: 'sent', confirmed: 500, requests: 10 });
    expect(server.syncRequests.map((r) => r.length)).toEqual(Array(10).fill(50));
    expect(server.received).toHaveLength(500);
    expect(new Set(server.received)).toEqual(sent);
    expect(await second.outbox.count()).toEqual({ waiting: 0, flagged: 0 });
  }, 60_000);
});
