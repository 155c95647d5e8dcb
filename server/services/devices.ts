/**
 * Tablets. Each one registers on first contact and gets an escrow key, kept here sealed,
 * that wraps its outbox key: after a forgotten passphrase or a lockout, a fresh online
 * sign-in fetches it so finished work still syncs. A revoked device is told to wipe itself.
 */
import { randomBytes } from 'node:crypto';
import type { Knex } from 'knex';
import type { AdminDevice } from '../../shared/schemas/devices';
import { isoOrNull } from './dates';
import { HttpError } from '../errors';
import type { Sealer } from './secrets';

export const DEVICE_REVOKED_MESSAGE = 'This tablet was revoked by an administrator; its packets are wiped. Finished work stays in its outbox.';

const escrowContext = (deviceId: string) => `device-escrow:${deviceId}`;

export async function touchDevice(db: Knex, sealer: Sealer, userId: string, deviceId: string, label?: string): Promise<{ revoked: boolean; escrowKey: string }> {
  const existing = await db('devices').where({ id: deviceId }).first();
  if (existing && existing.user_id !== userId) throw new HttpError('forbidden', 'This tablet is registered to another user; sign in as that user, or ask an administrator to revoke it.');
  if (existing) {
    await db('devices').where({ id: deviceId }).update({ last_seen_at: db.fn.now(), ...(label ? { label } : {}) });
    return { revoked: !!existing.revoked_at, escrowKey: sealer.open(existing.escrow_key_enc, escrowContext(deviceId)) };
  }
  const escrowKey = randomBytes(32).toString('base64');
  await db('devices').insert({ id: deviceId, user_id: userId, label: label ?? null, escrow_key_enc: sealer.seal(escrowKey, escrowContext(deviceId)) }).onConflict('id').ignore();
  return touchDevice(db, sealer, userId, deviceId, label);
}

export async function listDevices(db: Knex): Promise<AdminDevice[]> {
  const rows = await db('devices as v')
    .join('users as u', 'u.id', 'v.user_id')
    .orderBy('v.last_seen_at', 'desc')
    .select('v.id', 'v.label', 'u.id as userId', 'u.name as userName', 'u.email as userEmail', 'v.first_seen_at as firstSeenAt', 'v.last_seen_at as lastSeenAt', 'v.last_sync_at as lastSyncAt', 'v.last_sync_waiting as waiting', 'v.revoked_at as revokedAt');
  return rows.map((d) => ({ ...d, firstSeenAt: isoOrNull(d.firstSeenAt), lastSeenAt: isoOrNull(d.lastSeenAt), lastSyncAt: isoOrNull(d.lastSyncAt), revokedAt: isoOrNull(d.revokedAt) }));
}

export async function revokeDevice(db: Knex, deviceId: string, by: string): Promise<void> {
  const n = await db('devices').where({ id: deviceId }).whereNull('revoked_at').update({ revoked_at: db.fn.now(), revoked_by: by });
  if (!n && !(await db('devices').where({ id: deviceId }).first('id'))) throw new HttpError('not-found', 'That device was not found.');
  await db('sessions').where({ device_id: deviceId }).whereNull('revoked_at').update({ revoked_at: db.fn.now(), revoked_reason: 'device-revoked' });
}

/** When the tablet last synced and what it still holds; logged on failure, never thrown (the batch has committed: T10). */
export async function recordSyncQuietly(db: Knex, deviceId: string, waiting: number): Promise<void> {
  try {
    await db('devices').where({ id: deviceId }).update({ last_sync_at: db.fn.now(), last_sync_waiting: waiting });
  } catch (err) {
    console.error('[sync] could not record the device\'s last sync:', (err as Error).message);
  }
}

/** True when an administrator revoked this device. */
export async function isRevoked(db: Knex, deviceId: string): Promise<boolean> {
  return !!(await db('devices').where({ id: deviceId }).whereNotNull('revoked_at').first('id'));
}
