import { createPinia, setActivePinia } from 'pinia';
import { beforeEach, describe, expect, it, vi } from 'vitest';
import { useSessionStore } from '@/stores/session';
import { useVaultStore } from '@/stores/vault';
import { KEY, commit, readOne } from './db';
import { LEGACY_DEVICE_KEY, deviceId } from './device';
import { recordFinished } from './recordFinished';
import { sync } from './index';
import { pathOf, type FakeServer } from './testing/fakeServer';
import { completion, who } from './testing/fixtures';
import { memoryStorage, resetOffline, setUpVault } from './testing/harness';

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-4[0-9a-f]{3}-[89ab][0-9a-f]{3}-[0-9a-f]{12}$/;
let server: FakeServer;
let storage: Storage;

beforeEach(async () => {
  server = await resetOffline();
  storage = memoryStorage();
  vi.stubGlobal('localStorage', storage);
});

describe('the one device id', () => {
  it('moves an older tablet’s localStorage id into the offline store once, then stops reading it', async () => {
    // the issue: one device id; a tablet keeps its id over the update (its server device row must still match)
    storage.setItem(LEGACY_DEVICE_KEY, who.deviceId);
    expect(await deviceId()).toBe(who.deviceId);
    expect(await readOne(KEY.device)).toBe(who.deviceId);
    expect(storage.getItem(LEGACY_DEVICE_KEY)).toBeNull();
    // A value written there later (an old tab still open) no longer decides anything.
    storage.setItem(LEGACY_DEVICE_KEY, crypto.randomUUID());
    expect(await deviceId()).toBe(who.deviceId);
  });

  it('makes one random UUID on a new device and keeps it', async () => {
    // RFC 9562 section 5.4 (version 4 UUID layout); the server refuses a deviceId that is not a UUID
    const first = await deviceId();
    expect(first).toMatch(UUID);
    expect(await deviceId()).toBe(first);
  });

  it('gives two tabs asking at once the same id', async () => {
    // common practice: read and create in one IndexedDB transaction, so a race makes one id
    const [a, b, c] = await Promise.all([deviceId(), deviceId(), deviceId()]);
    expect(new Set([a, b, c]).size).toBe(1);
  });

  it('ignores a damaged old value rather than sending it', async () => {
    // common practice: a value the server would refuse (deviceId must be a UUID) is not migrated
    storage.setItem(LEGACY_DEVICE_KEY, 'not-a-device');
    const id = await deviceId();
    expect(id).toMatch(UUID);
    expect(storage.getItem(LEGACY_DEVICE_KEY)).toBeNull();
  });

  it('takes the vault’s id over any other, so the outbox escrow and sync keep matching', async () => {
    // the issue: the vault's device id is the one; its escrow wrapping is bound to it
    await setUpVault();
    await commit([[KEY.device, crypto.randomUUID()]]);
    storage.setItem(LEGACY_DEVICE_KEY, crypto.randomUUID());
    expect(await deviceId()).toBe(who.deviceId);
    expect(await readOne(KEY.device)).toBe(who.deviceId);
  });

  it('an updated tablet signs in, sets up its vault and syncs with the id it had before', async () => {
    // the issue: sign-in and sync carry the one id; an existing tablet keeps its server device row
    storage.setItem(LEGACY_DEVICE_KEY, who.deviceId);
    const signIns: unknown[] = [];
    const fake = server.fetch;
    vi.stubGlobal('fetch', vi.fn(async (input: RequestInfo | URL, init?: RequestInit) => {
      if (pathOf(input) !== '/api/auth/sign-in') return fake(input, init);
      signIns.push(JSON.parse(init?.body as string));
      const user = { id: who.userId, email: 'tech@example.test', name: 'Test Tech', role: 'technician' };
      return new Response(JSON.stringify({ accessToken: 'a', refreshToken: 'r', expiresIn: 900, user }), { status: 200, headers: { 'Content-Type': 'application/json' } });
    }));
    setActivePinia(createPinia());
    const session = useSessionStore();
    const vault = useVaultStore();
    await session.signIn('tech@example.test', 'a password of some length');
    expect(signIns).toEqual([expect.objectContaining({ deviceId: who.deviceId })]);
    expect(await vault.setup('brass tray shear line')).toEqual({ ok: true });
    const r = completion();
    await recordFinished({ coreId: r.coreId, progress: null }, r);
    const before = vi.mocked(fetch).mock.calls.length;
    expect((await sync.syncNow()).outcome).toBe('sent');
    const sent = vi.mocked(fetch).mock.calls.slice(before)
      .filter(([input]) => pathOf(input) === '/api/sync')
      .map(([, init]) => (JSON.parse(init?.body as string) as { deviceId: string }).deviceId);
    expect(sent).toEqual([who.deviceId]);
    expect(server.rows.has(r.clientId)).toBe(true);
    expect(storage.getItem(LEGACY_DEVICE_KEY)).toBeNull();
  }, 30_000);
});
