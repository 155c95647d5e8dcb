import { createPinia, setActivePinia } from 'pinia';
import { beforeEach, describe, expect, it, vi } from 'vitest';
import { useSessionStore } from '@/stores/session';
import { useVaultStore } from '@/stores/vault';
import { KEY } from './db';
import * as outbox from './outbox';
import * as packets from './packets';
import { completion, packet, who } from './testing/fixtures';
import { allKeys, memoryStorage, resetOffline } from './testing/harness';
import { recordFinished } from './recordFinished';

beforeEach(async () => {
  await resetOffline();
  const storage = memoryStorage();
  storage.setItem('cw.device', who.deviceId);
  storage.setItem('cw.session', JSON.stringify({ v: 1, user: { id: who.userId, email: 'tech@example.test', name: 'Test Tech', role: 'technician' }, accessToken: 'a', refreshToken: 'r' }));
  vi.stubGlobal('localStorage', storage);
  setActivePinia(createPinia());
});

describe('the vault store', () => {
  it('ends the local session after a lockout, so recovery needs a fresh sign-in', async () => {
    // OWASP ASVS 5 6.3.1 (brute-force controls); the issue: recover "after a fresh online sign-in"
    const vault = useVaultStore();
    const session = useSessionStore();
    expect(await vault.setup('brass tray shear line')).toEqual({ ok: true });
    const r = completion();
    await recordFinished({ coreId: r.coreId, progress: null }, r);
    vault.lock();
    for (let i = 0; i < 5; i++) await vault.unlock(`wrong guess number ${i}`);
    expect(vault.state).toBe('wiped');
    expect(vault.wipedMessage).toMatch(/Finished work is kept/);
    expect(session.signedIn).toBe(false);
    expect(await outbox.count()).toEqual({ waiting: 1, flagged: 0 });
  }, 30_000);

  it('wipes packets on sign-out and keeps the outbox', async () => {
    // the issue: sign-out wipes packets; finished work is never dropped
    const vault = useVaultStore();
    const session = useSessionStore();
    expect(await vault.setup('brass tray shear line')).toEqual({ ok: true });
    const p = packet();
    await packets.save(p);
    const r = completion();
    await recordFinished({ coreId: r.coreId, progress: null }, r);
    await session.signOut();
    await vi.waitFor(async () => expect(await allKeys()).not.toContain(KEY.packet(p.workOrder.id)));
    expect(await allKeys()).toContain(KEY.outbox(r.clientId));
    expect(vault.locked).toBe(true);
  }, 30_000);
});
