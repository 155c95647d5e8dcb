/** Tablets as the office sees them: who uses each, when it last synced, and revoking one. */
import { Ok } from '@shared/schemas/common';
import { AdminDeviceList } from '@shared/schemas/devices';
import { request } from './http';

export type { AdminDevice } from '@shared/schemas/devices';

export const listDevices = async () => (await request('GET', '/api/devices', { schema: AdminDeviceList })).devices;
export const revokeDevice = (id: string) => request('POST', `/api/devices/${id}/revoke`, { schema: Ok });
