/**
 * Owns the tablet's vault: setting up a passphrase, unlocking offline, counting wrong
 * attempts, and wiping packets (never the outbox) after a lockout, a forgotten passphrase,
 * a revocation or a sign-out. Two data keys live behind it: the packet key (packets) and
 * the outbox key (finished work and Bench progress). The outbox key is wrapped twice,
 * under the passphrase and under the device's escrow key kept by the server, so finished
 * work and half-built cores survive a lost passphrase: a fresh online sign-in fetches the
 * escrow key again.
 */
import { ApiError } from '@/api/http';
import { fetchEscrow } from '@/api/devices';
import { PBKDF2_ITERATIONS, deriveKek, fromBase64, importDataKey, importEscrowKey, newDataKey, open, randomBytes, seal, unwrapDataKey, type Bytes } from './crypto';
import { KEY, commit, keysWithPrefix, readOne } from './db';
import { IntegrityError } from './errors';
import { dropKeys, holdKeys, isUnlocked } from './keyring';
import { lockManager } from './locks';
import { unescrowedKeys } from './bench';
import { checkPassphrase } from './passphrase';
import { AAD, up, type VaultRecord, type WipeReason } from './vaultRecord';

export const UNLOCK_ATTEMPT_LIMIT = 5;
const MARKER = 'corewright vault v1';

export type VaultState = 'needs-setup' | 'locked' | 'unlocked' | 'wiped' | 'revoked' | 'damaged';
export interface VaultStatus {
  state: VaultState;
  remainingAttempts: number;
  userId: string | null;
  deviceId: string | null;
  wipeReason: WipeReason | null;
  wipedAt: string | null;
}
export type VaultResult = { ok: true } | { ok: false; code: VaultErrorCode; message: string; remainingAttempts?: number };
export type VaultErrorCode = 'policy' | 'wrong' | 'wiped' | 'revoked' | 'state' | 'offline' | 'server' | 'forbidden' | 'damaged';
export interface Who {
  userId: string;
  deviceId: string;
  label?: string;
}
export interface KdfOptions {
  /** Only tests lower this; the default is PBKDF2_ITERATIONS. */
  iterations?: number;
}

const fail = (code: VaultErrorCode, message: string, remainingAttempts?: number): Failure => ({
  ok: false,
  code,
  message,
  ...(remainingAttempts === undefined ? {} : { remainingAttempts }),
});

/** Vault changes run one at a time across tabs, so two unlocks cannot both miss a count. */
function exclusive<T>(fn: () => Promise<T>): Promise<T> {
  return lockManager().request('corewright-vault', {}, fn);
}

async function load(): Promise<{ raw: unknown; record: VaultRecord | null }> {
  const raw = await readOne<unknown>(KEY.vault);
  return { raw, record: raw === undefined ? null : up(raw) };
}

function stateOf(raw: unknown, record: VaultRecord | null): VaultState {
  if (raw === undefined) return 'needs-setup';
  if (!record) return 'damaged';
  if (record.wiped?.reason === 'revoked') return 'revoked';
  if (record.wiped) return 'wiped';
  return isUnlocked() ? 'unlocked' : 'locked';
}

export async function status(): Promise<VaultStatus> {
  const { raw, record } = await load();
  return {
    state: stateOf(raw, record),
    remainingAttempts: record ? Math.max(0, UNLOCK_ATTEMPT_LIMIT - record.failedAttempts) : UNLOCK_ATTEMPT_LIMIT,
    userId: record?.userId ?? null,
    deviceId: record?.deviceId ?? null,
    wipeReason: record?.wiped?.reason ?? null,
    wipedAt: record?.wiped?.at ?? null,
  };
}

type Failure = Extract<VaultResult, { ok: false }>;

async function escrowKeyFor(who: Who): Promise<{ ok: true; key: CryptoKey } | Failure> {
  try {
    const res = await fetchEscrow({ deviceId: who.deviceId, ...(who.label ? { label: who.label } : {}) });
    return { ok: true, key: await importEscrowKey(fromBase64(res.escrowKey)) };
  } catch (err) {
    if (!(err instanceof ApiError)) throw err;
    if (err.isNetwork) return fail('offline', 'Connect to the network once: the server keeps a backup key so finished work is never lost with a passphrase.');
    if (err.code === 'device-revoked') return fail('revoked', 'An administrator revoked this tablet.');
    if (err.status === 401) return fail('server', 'Your session ended; sign in again, then try once more.');
    if (err.status === 403) return fail('forbidden', 'This tablet is registered to another user. Sign in as that user to keep their finished work.');
    return fail('server', err.message);
  }
}

/** A fresh salt, a new packet key and a passphrase wrapping of the given outbox key. */
async function sealUnderPassphrase(passphrase: string, outboxRaw: Bytes, iterations: number) {
  const salt = randomBytes(16);
  const kek = await deriveKek(passphrase, salt, iterations);
  const packetRaw = newDataKey();
  const record = {
    salt,
    iterations,
    verifier: await seal(kek, AAD.verifier, new TextEncoder().encode(MARKER)),
    wrappedPacketKey: await seal(kek, AAD.packetKey, packetRaw),
    wrappedOutboxKeyByPass: await seal(kek, AAD.outboxKey, outboxRaw),
  };
  const keys = { packet: await importDataKey(packetRaw), outbox: await importDataKey(outboxRaw) };
  packetRaw.fill(0);
  return { record, keys };
}

async function localDataKeys(): Promise<string[]> {
  return [...(await keysWithPrefix('packet:')), ...(await keysWithPrefix('bench:'))];
}

/** What a recoverable wipe removes: packets and the progress the escrow key cannot open. */
async function unrecoverableKeys(): Promise<string[]> {
  return [...(await keysWithPrefix('packet:')), ...(await unescrowedKeys())];
}

export function setup(passphrase: string, who: Who, opts: KdfOptions = {}): Promise<VaultResult> {
  return exclusive(async () => {
    const policy = checkPassphrase(passphrase);
    if (!policy.ok) return fail('policy', policy.message);
    const { raw } = await load();
    if (raw !== undefined) return fail('state', 'This tablet already has a passphrase.');
    const escrow = await escrowKeyFor(who);
    if (!escrow.ok) return escrow;
    const outboxRaw = newDataKey();
    const sealed = await sealUnderPassphrase(passphrase, outboxRaw, opts.iterations ?? PBKDF2_ITERATIONS);
    const byServer = await seal(escrow.key, AAD.escrow(who.deviceId), outboxRaw);
    outboxRaw.fill(0);
    const record: VaultRecord = { v: 1, userId: who.userId, deviceId: who.deviceId, ...sealed.record, wrappedOutboxKeyByServer: byServer, failedAttempts: 0, wiped: null };
    await commit([[KEY.vault, record]]);
    holdKeys(sealed.keys);
    return { ok: true };
  });
}

/**
 * Packets go, with the packet key; the outbox and its wrappings stay. Escrowed Bench
 * progress stays too, except on revocation: the tablet is no longer trusted with it.
 */
async function wipe(record: VaultRecord, reason: WipeReason): Promise<void> {
  dropKeys();
  const next: VaultRecord = { ...record, wrappedPacketKey: null, wiped: { reason, at: new Date().toISOString() } };
  await commit([[KEY.vault, next]], reason === 'revoked' ? await localDataKeys() : await unrecoverableKeys());
}

export function unlock(passphrase: string): Promise<VaultResult> {
  return exclusive(async () => {
    const { raw, record } = await load();
    const state = stateOf(raw, record);
    if (!record || state === 'needs-setup' || state === 'damaged') return fail('state', 'Set up a passphrase first.');
    if (record.wiped) return fail(record.wiped.reason === 'revoked' ? 'revoked' : 'wiped', 'Packets on this tablet were wiped; sign in to recover finished work.');
    // Counted before the slow check, so closing the tab mid-check does not give a free try.
    const counted = { ...record, failedAttempts: record.failedAttempts + 1 };
    await commit([[KEY.vault, counted]]);
    const kek = await deriveKek(passphrase, record.salt, record.iterations);
    try {
      await open(kek, AAD.verifier, record.verifier);
    } catch {
      if (counted.failedAttempts >= UNLOCK_ATTEMPT_LIMIT) {
        await wipe(counted, 'lockout');
        return fail('wiped', 'Too many wrong passphrases: packets were wiped for safety. Finished work is kept and will sync after you sign in again.');
      }
      const left = UNLOCK_ATTEMPT_LIMIT - counted.failedAttempts;
      return fail('wrong', `Wrong passphrase. ${left} ${left === 1 ? 'try' : 'tries'} left before packets are wiped.`, left);
    }
    try {
      const outbox = await unwrapDataKey(kek, AAD.outboxKey, record.wrappedOutboxKeyByPass);
      const packet = record.wrappedPacketKey ? await unwrapDataKey(kek, AAD.packetKey, record.wrappedPacketKey) : undefined;
      await commit([[KEY.vault, { ...record, failedAttempts: 0 }]]);
      holdKeys(packet ? { packet, outbox } : { outbox });
      return { ok: true };
    } catch (err) {
      if (err instanceof IntegrityError) return fail('damaged', 'The passphrase is right but a stored key failed its integrity check. Sign in to recover finished work.');
      throw err;
    }
  });
}

export function lock(): void {
  dropKeys();
}

/** The technician forgot the passphrase: packets go now; finished work is recovered after sign-in. */
export function forgotPassphrase(): Promise<void> {
  return exclusive(async () => {
    const { record } = await load();
    if (record && !record.wiped) await wipe(record, 'forgotten');
  });
}

/** An administrator revoked this tablet: packets and Bench progress go; finished work stays sealed. */
export function revoke(): Promise<void> {
  return exclusive(async () => {
    const { record } = await load();
    if (record) await wipe(record, 'revoked');
    else await commit([], await localDataKeys());
  });
}

/**
 * Sign-out: packets and Bench progress go; the passphrase, the keys and the outbox stay.
 * While the vault waits for recovery (a forgotten passphrase, a lockout), escrowed progress
 * stays: that sign-out is the way to the recovery, not a choice to drop the work.
 */
export function wipeLocal(): Promise<void> {
  return exclusive(async () => {
    dropKeys();
    const { record } = await load();
    const recovering = record?.wiped && record.wiped.reason !== 'revoked';
    await commit([], recovering ? await unrecoverableKeys() : await localDataKeys());
  });
}

/**
 * After a fresh online sign-in: fetch the escrow key, open the outbox key with it, and
 * set a new passphrase. Packets sealed under the old packet key are wiped; the outbox and
 * escrowed Bench progress stay (a packet kept again brings the half-built core back).
 */
export function recoverWithServer(newPassphrase: string, opts: KdfOptions = {}): Promise<VaultResult> {
  return exclusive(async () => {
    const policy = checkPassphrase(newPassphrase);
    if (!policy.ok) return fail('policy', policy.message);
    const { record } = await load();
    if (!record) return fail('state', 'There is nothing to recover on this tablet.');
    if (!record.wiped) return fail('state', 'Choose “Forgot the passphrase” first; packets on this tablet will be wiped.');
    const escrow = await escrowKeyFor({ userId: record.userId, deviceId: record.deviceId });
    if (!escrow.ok) {
      if (escrow.code === 'revoked' && record.wiped.reason !== 'revoked') await wipe(record, 'revoked');
      return escrow;
    }
    let outboxRaw: Bytes;
    try {
      outboxRaw = await open(escrow.key, AAD.escrow(record.deviceId), record.wrappedOutboxKeyByServer);
    } catch {
      return fail('damaged', 'The server’s backup key does not open this tablet’s finished work. Do not sign out; ask an administrator.');
    }
    const sealed = await sealUnderPassphrase(newPassphrase, outboxRaw, opts.iterations ?? PBKDF2_ITERATIONS);
    outboxRaw.fill(0);
    const next: VaultRecord = { ...record, ...sealed.record, failedAttempts: 0, wiped: null };
    await commit([[KEY.vault, next]], await unrecoverableKeys());
    holdKeys(sealed.keys);
    return { ok: true };
  });
}

/** Re-wraps both data keys under a new passphrase; the records themselves are not touched. */
export function changePassphrase(current: string, next: string, opts: KdfOptions = {}): Promise<VaultResult> {
  return exclusive(async () => {
    const policy = checkPassphrase(next);
    if (!policy.ok) return fail('policy', policy.message);
    const { record } = await load();
    if (!record || record.wiped || !record.wrappedPacketKey || !isUnlocked()) return fail('state', 'Unlock the tablet first.');
    const oldKek = await deriveKek(current, record.salt, record.iterations);
    let packetRaw: Bytes, outboxRaw: Bytes;
    try {
      await open(oldKek, AAD.verifier, record.verifier);
      packetRaw = await open(oldKek, AAD.packetKey, record.wrappedPacketKey);
      outboxRaw = await open(oldKek, AAD.outboxKey, record.wrappedOutboxKeyByPass);
    } catch {
      // Not counted: the tablet is unlocked, so whoever holds it can already read its records.
      return fail('wrong', 'The current passphrase is wrong.');
    }
    const salt = randomBytes(16);
    const iterations = opts.iterations ?? PBKDF2_ITERATIONS;
    const kek = await deriveKek(next, salt, iterations);
    const updated: VaultRecord = {
      ...record,
      salt,
      iterations,
      verifier: await seal(kek, AAD.verifier, new TextEncoder().encode(MARKER)),
      wrappedPacketKey: await seal(kek, AAD.packetKey, packetRaw),
      wrappedOutboxKeyByPass: await seal(kek, AAD.outboxKey, outboxRaw),
      failedAttempts: 0,
    };
    packetRaw.fill(0);
    outboxRaw.fill(0);
    await commit([[KEY.vault, updated]]);
    return { ok: true };
  });
}
