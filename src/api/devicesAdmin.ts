/** Tablets as the office sees them: who uses each, when it last synced, and revoking one. */
import { z } from 'zod';
import { request } from './http';

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

export const listDevices = async () => (await request('GET', '/api/devices', { schema: z.object({ devices: z.array(AdminDevice) }) })).devices;
export const revokeDevice = (id: string) => request('POST', `/api/devices/${id}/revoke`, { schema: z.object({ ok: z.boolean() }) });
