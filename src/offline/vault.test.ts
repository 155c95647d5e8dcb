import { beforeEach, describe, expect, it } from 'vitest';
import { useTokenSource } from '@/api/http';
import * as bench from './bench';
import { PBKDF2_ITERATIONS } from './crypto';
import { KEY, readOne } from './db';
import { isUnlocked } from './keyring';
import * as outbox from './outbox';
import * as packets from './packets';
import { recordFinished } from './recordFinished';
import * as vault from './vault';
import type { FakeServer } from './testing/fakeServer';
import { PASSPHRASE, TEST_ITERATIONS, completion, packet, progress, who } from './testing/fixtures';
import { allKeys, resetOffline, setUpVault } from './testing/harness';
import type { VaultRecord } from './vaultRecord';

let server: FakeServer;
beforeEach(async () => {
  server = await resetOffline();
});

/** A packet, one core's Bench progress and two finished records, as after a morning's work. */
async function morningsWork() {
  const p = packet();
  const coreId = p.cores[0]!.id;
  expect((await packets.save(p)).failed).toEqual([]);
  expect((await bench.saveProgress(coreId, progress(coreId, p.workOrder.id))).failed).toEqual([]);
  const records = [completion({ workOrderId: p.workOrder.id }), completion({ workOrderId: p.workOrder.id })];
  for (const r of records) expect((await recordFinished({ coreId: r.coreId, progress: null }, r)).failed).toEqual([]);
  return { p, coreId, records };
}

describe('setting up', () => {
  it('stores at least 600,000 PBKDF2 iterations by default', async () => {
    // OWASP Password Storage Cheat Sheet: PBKDF2-HMAC-SHA-256 at 600,000 iterations
    expect(await vault.setup(PASSPHRASE, who)).toEqual({ ok: true });
    const record = await readOne<VaultRecord>(KEY.vault);
    expect(record!.iterations).toBe(PBKDF2_ITERATIONS);
    expect(record!.iterations).toBeGreaterThanOrEqual(600_000);
  });

  it('refuses a PIN and writes nothing', async () => {
    // the issue: a 4-6 digit PIN alone is not strong enough
    const result = await vault.setup('482913', who, { iterations: TEST_ITERATIONS });
    expect(result).toMatchObject({ ok: false, code: 'policy' });
    expect(await allKeys()).toEqual([]);
  });

  it('needs the server once, so the outbox key is wrapped for recovery before any work exists', async () => {
    // the issue: "a forgotten secret or a lockout never loses finished work"
    server.offline = true;
    expect(await vault.setup(PASSPHRASE, who, { iterations: TEST_ITERATIONS })).toMatchObject({ ok: false, code: 'offline' });
    expect((await vault.status()).state).toBe('needs-setup');
  });
});

describe('unlocking', () => {
  beforeEach(() => setUpVault());

  it('locks by dropping the keys, keeps Bench progress, and unlocks offline', async () => {
    // the issue: lock drops the key from memory; Bench progress must survive locking; unlock works offline
    const { coreId } = await morningsWork();
    vault.lock();
    expect(isUnlocked()).toBe(false);
    await expect(bench.getProgress(coreId)).rejects.toThrow(/locked/);
    server.offline = true;
    expect(await vault.unlock(PASSPHRASE)).toEqual({ ok: true });
    expect(await bench.getProgress(coreId)).toMatchObject({ coreId, step: 3 });
  });

  it('counts wrong passphrases and resets the count on success', async () => {
    // OWASP ASVS 5 6.3.1 (limit failed attempts); common practice: a success clears the count
    vault.lock();
    expect(await vault.unlock('wrong wrong wrong')).toMatchObject({ ok: false, code: 'wrong', remainingAttempts: 4 });
    expect(await vault.unlock('still wrong here')).toMatchObject({ ok: false, remainingAttempts: 3 });
    expect((await vault.status()).remainingAttempts).toBe(3);
    expect(await vault.unlock(PASSPHRASE)).toEqual({ ok: true });
    expect((await vault.status()).remainingAttempts).toBe(5);
  });

  it('after 5 wrong passphrases wipes packets but keeps the outbox and the escrowed Bench progress', async () => {
    // the issue: repeated wrong attempts wipe the packets; never lose finished work (nor a half-built core)
    const { p, coreId, records } = await morningsWork();
    vault.lock();
    for (const left of [4, 3, 2, 1]) expect(await vault.unlock(`wrong guess ${left}x`)).toMatchObject({ code: 'wrong', remainingAttempts: left });
    expect(await vault.unlock('wrong guess 0x')).toMatchObject({ ok: false, code: 'wiped' });
    const keys = await allKeys();
    expect(keys.filter((k) => k.startsWith('packet:'))).toEqual([]);
    expect(keys.filter((k) => k.startsWith('bench:'))).toEqual([KEY.bench(coreId)]);
    expect(keys.filter((k) => k.startsWith('outbox:')).sort()).toEqual(records.map((r) => KEY.outbox(r.clientId)).sort());
    expect(await vault.status()).toMatchObject({ state: 'wiped', wipeReason: 'lockout' });
    // Even the right passphrase no longer opens the tablet: recovery goes through the server.
    expect(await vault.unlock(PASSPHRASE)).toMatchObject({ ok: false, code: 'wiped' });
    expect(await readOne(KEY.packet(p.workOrder.id))).toBeUndefined();
  });

  it('refuses a vault record whose wrapped key was changed, without counting it as a wrong passphrase', async () => {
    // NIST SP 800-38D 7.2 (tag check); the issue: a tampered ciphertext is reported, not a crash
    const record = (await readOne<VaultRecord>(KEY.vault))!;
    record.wrappedOutboxKeyByPass.ct[0]! ^= 1;
    const { commit } = await import('./db');
    await commit([[KEY.vault, record]]);
    vault.lock();
    expect(await vault.unlock(PASSPHRASE)).toMatchObject({ ok: false, code: 'damaged' });
    expect(isUnlocked()).toBe(false);
  });
});

describe('recovering finished work through the server', () => {
  beforeEach(() => setUpVault());

  it('opens the outbox with the escrow key after a lockout and sets a new passphrase', async () => {
    // the issue: wrap the outbox key for the server, unwrap it after a fresh online sign-in
    const { records } = await morningsWork();
    vault.lock();
    for (let i = 0; i < 5; i++) await vault.unlock(`not the passphrase ${i}`);
    const before = server.escrowRequests;
    expect(await vault.recoverWithServer('new copper wafer stack', { iterations: TEST_ITERATIONS })).toEqual({ ok: true });
    expect(server.escrowRequests).toBe(before + 1);
    expect((await outbox.list()).map((e) => e.record?.clientId).sort()).toEqual(records.map((r) => r.clientId).sort());
    expect(await packets.list()).toEqual([]);
    vault.lock();
    expect(await vault.unlock(PASSPHRASE)).toMatchObject({ ok: false, code: 'wrong' });
    expect(await vault.unlock('new copper wafer stack')).toEqual({ ok: true });
    expect(await outbox.count()).toEqual({ waiting: 2, flagged: 0 });
  });

  it('recovers after a forgotten passphrase the same way', async () => {
    // the issue: a forgotten secret never loses finished work
    await morningsWork();
    vault.lock();
    await vault.forgotPassphrase();
    expect(await vault.status()).toMatchObject({ state: 'wiped', wipeReason: 'forgotten' });
    expect(await vault.recoverWithServer('fresh tray of pins', { iterations: TEST_ITERATIONS })).toEqual({ ok: true });
    expect(await outbox.count()).toEqual({ waiting: 2, flagged: 0 });
  });

  it('brings a half-built core back after a forgotten passphrase, through the sign-out that recovery needs', async () => {
    // the issue: "Forgot the passphrase?" must not silently discard a half-built core
    const { coreId } = await morningsWork();
    vault.lock();
    expect(await bench.progressSummary()).toEqual({ kept: 1, lost: 0, workOrders: 1, packets: 1 });
    await vault.forgotPassphrase();
    await vault.wipeLocal(); // the sign-out that sends the technician to a fresh online sign-in
    expect(await bench.progressSummary()).toEqual({ kept: 1, lost: 0, workOrders: 1, packets: 0 });
    expect(await vault.recoverWithServer('fresh tray of pins', { iterations: TEST_ITERATIONS })).toEqual({ ok: true });
    expect(await bench.getProgress(coreId)).toMatchObject({ coreId, step: 3 });
  });

  it('still drops Bench progress on an ordinary sign-out and on a revocation', async () => {
    // README threat model: sign-out wipes what the tablet holds; a revoked tablet is no longer trusted
    const { coreId } = await morningsWork();
    await vault.wipeLocal();
    expect(await readOne(KEY.bench(coreId))).toBeUndefined();
    await vault.unlock(PASSPHRASE);
    await bench.saveProgress(coreId, progress(coreId, 'wo-1'));
    await vault.revoke();
    expect(await readOne(KEY.bench(coreId))).toBeUndefined();
  });

  it('sends the bearer token of the fresh sign-in with the escrow request', async () => {
    // DEVELOPERS.md: everything after sign-in passes requireAuth
    useTokenSource({ accessToken: () => 'fresh-token', refresh: () => Promise.resolve(null) });
    vault.lock();
    await vault.forgotPassphrase();
    await vault.recoverWithServer('fresh tray of pins', { iterations: TEST_ITERATIONS });
    const [, init] = (globalThis.fetch as unknown as { mock: { calls: [string, RequestInit][] } }).mock.calls.at(-1)!;
    expect((init.headers as Record<string, string>).Authorization).toBe('Bearer fresh-token');
  });

  it('keeps everything when the server says the tablet belongs to another user', async () => {
    // OWASP ASVS 5 8.2.2 (object-level access): the server refuses another user's device key
    await morningsWork();
    vault.lock();
    await vault.forgotPassphrase();
    server.escrowReply = { status: 403, body: { error: { code: 'forbidden', message: 'Not your device.' } } };
    expect(await vault.recoverWithServer('fresh tray of pins', { iterations: TEST_ITERATIONS })).toMatchObject({ ok: false, code: 'forbidden' });
    expect(await outbox.count()).toEqual({ waiting: 2, flagged: 0 });
    expect((await vault.status()).state).toBe('wiped');
  });

  it('marks the tablet revoked when the escrow answer says so, and keeps the outbox', async () => {
    // the brief: a 403 device-revoked from /api/devices/escrow wipes packets; finished work is kept
    await morningsWork();
    vault.lock();
    await vault.forgotPassphrase();
    server.escrowReply = { status: 403, body: { error: { code: 'device-revoked', message: 'This device was revoked.' } } };
    expect(await vault.recoverWithServer('fresh tray of pins', { iterations: TEST_ITERATIONS })).toMatchObject({ ok: false, code: 'revoked' });
    expect(await vault.status()).toMatchObject({ state: 'revoked' });
    expect(await outbox.count()).toEqual({ waiting: 2, flagged: 0 });
  });

  it('changes the passphrase without touching the records', async () => {
    // common practice: re-wrap the data keys, not the data
    const { p } = await morningsWork();
    expect(await vault.changePassphrase('not it at all', 'another long phrase', { iterations: TEST_ITERATIONS })).toMatchObject({ ok: false, code: 'wrong' });
    expect(await vault.changePassphrase(PASSPHRASE, 'another long phrase', { iterations: TEST_ITERATIONS })).toEqual({ ok: true });
    vault.lock();
    expect(await vault.unlock(PASSPHRASE)).toMatchObject({ ok: false });
    expect(await vault.unlock('another long phrase')).toEqual({ ok: true });
    expect((await packets.get(p.workOrder.id))?.workOrder.title).toBe(p.workOrder.title);
  });
});

describe('sign-out and revocation', () => {
  beforeEach(() => setUpVault());

  it('sign-out wipes packets and Bench progress, keeps the outbox and the passphrase', async () => {
    // the issue: sign-out wipes packets; finished work is never dropped silently
    await morningsWork();
    await vault.wipeLocal();
    expect((await allKeys()).filter((k) => k.startsWith('packet:') || k.startsWith('bench:'))).toEqual([]);
    expect(await vault.unlock(PASSPHRASE)).toEqual({ ok: true });
    expect(await outbox.count()).toEqual({ waiting: 2, flagged: 0 });
  });

  it('revocation wipes packets and Bench progress and keeps the outbox sealed', async () => {
    // the issue: a device revoked by an admin wipes itself on its next contact
    await morningsWork();
    await vault.revoke();
    expect(isUnlocked()).toBe(false);
    expect((await allKeys()).filter((k) => k.startsWith('packet:') || k.startsWith('bench:'))).toEqual([]);
    expect(await outbox.count()).toEqual({ waiting: 2, flagged: 0 });
    expect(await vault.unlock(PASSPHRASE)).toMatchObject({ ok: false, code: 'revoked' });
  });
});
