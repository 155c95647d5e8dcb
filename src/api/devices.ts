/**
 * Device escrow: the server keeps one random 32-byte key per tablet and hands it only to
 * the device's own user, so finished work wrapped under it survives a forgotten passphrase.
 * The schema lives here until it moves to shared/schemas beside the server's route.
 */
import { z } from 'zod';
import { request } from './http';

export const EscrowRequest = z.strictObject({ deviceId: z.uuid(), label: z.string().trim().max(80).optional() });
export type EscrowRequest = z.infer<typeof EscrowRequest>;

export const EscrowResponse = z.object({
  deviceId: z.uuid(),
  escrowKey: z.base64().refine((b64) => atob(b64).length === 32, { error: 'the escrow key is 32 bytes' }),
});
export type EscrowResponse = z.infer<typeof EscrowResponse>;

export const fetchEscrow = (input: EscrowRequest) => request('POST', '/api/devices/escrow', { body: input, schema: EscrowResponse });
