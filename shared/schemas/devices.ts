/**
 * Tablets. Escrow: the server keeps one random 32-byte key per tablet and hands it only to the
 * device's own user, so finished work wrapped under it survives a forgotten passphrase. The
 * office sees who uses each tablet, when it last synced, and may revoke one.
 */
import { z } from 'zod';

export const EscrowRequest = z.strictObject({ deviceId: z.uuid(), label: z.string().trim().max(80).optional() });
export type EscrowRequest = z.infer<typeof EscrowRequest>;
/** 32 bytes in base64 are 43 characters and one '=' of padding. */
export const EscrowResponse = z.object({
  deviceId: z.uuid(),
  escrowKey: z.base64().regex(/^[A-Za-z0-9+/]{43}=$/, { error: 'the escrow key is 32 bytes' }),
});
export type EscrowResponse = z.infer<typeof EscrowResponse>;
export const AdminDevice = z.object({
  id: z.uuid(),
  label: z.string().nullable(),
  userId: z.uuid(),
  userName: z.string(),
  userEmail: z.string(),
  firstSeenAt: z.string().nullable(),
  lastSeenAt: z.string().nullable(),
  lastSyncAt: z.string().nullable(),
  /** Records the last sync could not land; they wait on the tablet. */
  waiting: z.number().nullable(),
  revokedAt: z.string().nullable(),
});
export type AdminDevice = z.infer<typeof AdminDevice>;
export const AdminDeviceList = z.object({ devices: z.array(AdminDevice) });
export type AdminDeviceList = z.infer<typeof AdminDeviceList>;
