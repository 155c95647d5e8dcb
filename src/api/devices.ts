/**
 * Device escrow: the server keeps one random 32-byte key per tablet and hands it only to
 * the device's own user, so finished work wrapped under it survives a forgotten passphrase.
 */
import { EscrowResponse, type EscrowRequest } from '@shared/schemas/devices';
import { request } from './http';

export const fetchEscrow = (input: EscrowRequest) => request('POST', '/api/devices/escrow', { body: input, schema: EscrowResponse });
