/**
 * The vault record kept under the key "vault": everything needed to unlock offline, and
 * nothing that opens a record without the passphrase or the server's escrow key.
 */
import { z } from 'zod';
import type { Bytes } from './crypto';

const isBytes = (v: unknown): v is Bytes => v instanceof Uint8Array || Object.prototype.toString.call(v) === '[object Uint8Array]';
const BytesField = z.custom<Bytes>(isBytes, { error: 'expected bytes' });
export const SealedField = z.object({ iv: BytesField, ct: BytesField });

export const WipeReason = z.enum(['lockout', 'forgotten', 'revoked']);
export type WipeReason = z.infer<typeof WipeReason>;

export const VaultRecord = z.object({
  v: z.literal(1),
  userId: z.string(),
  deviceId: z.string(),
  salt: BytesField,
  iterations: z.number().int().min(1),
  /** A fixed marker sealed under the passphrase key: tells a wrong passphrase from a damaged record. */
  verifier: SealedField,
  /** null once packets were wiped: a new one is made when the vault is set up again. */
  wrappedPacketKey: SealedField.nullable(),
  wrappedOutboxKeyByPass: SealedField,
  /** The same outbox key under the device's escrow key, which only the server holds. */
  wrappedOutboxKeyByServer: SealedField,
  failedAttempts: z.number().int().min(0),
  wiped: z.object({ reason: WipeReason, at: z.string() }).nullable(),
});
export type VaultRecord = z.infer<typeof VaultRecord>;

/** Brings an older stored shape up to the current one; today only v1 exists. */
export function up(stored: unknown): VaultRecord | null {
  const parsed = VaultRecord.safeParse(stored);
  return parsed.success ? parsed.data : null;
}

export const AAD = {
  verifier: 'vault#verifier',
  packetKey: 'vault#packet-key',
  outboxKey: 'vault#outbox-key',
  escrow: (deviceId: string) => `vault#outbox-key@escrow:${deviceId}`,
} as const;
