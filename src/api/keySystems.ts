/** Key systems and keys. Bittings come only with reveal=1, which the server audits. */
import { z } from 'zod';
import { Key, KeyOperatesRow, KeySystem, ProgressionPreview, type KeyInput, type KeyReplace, type KeySystemCreate, type KeyUpdate, type ProgressionInput } from '@shared/schemas/records';
import { auditFindingCodes } from '@shared/keying';
import { request } from './http';
import { uploadCsv } from './doors';

const reveal = (yes: boolean) => (yes ? '?reveal=1' : '');

export type { HeldKey, ProgressedKey, ProgressionInput } from '@shared/schemas/records';

const codes = Object.keys(auditFindingCodes) as [keyof typeof auditFindingCodes, ...(keyof typeof auditFindingCodes)[]];
export const AuditFinding = z.object({
  code: z.enum(codes),
  severity: z.enum(['error', 'warning', 'info']),
  message: z.string(),
  advice: z.string(),
  keys: z.array(z.string()).optional(),
  keyIds: z.array(z.string()).optional(),
  cores: z.array(z.string()).optional(),
  chambers: z.array(z.number()).optional(),
  data: z.record(z.string(), z.number()).optional(),
  details: z.array(z.string()).optional(),
  fingerprint: z.string(),
  acknowledged: z.object({ note: z.string(), by: z.string(), at: z.string() }).nullable(),
});
export type AuditFinding = z.infer<typeof AuditFinding>;
export const SystemAudit = z.object({ findings: z.array(AuditFinding), keys: z.number(), cores: z.number() });
export type SystemAudit = z.infer<typeof SystemAudit>;

export const listKeySystems = async () => (await request('GET', '/api/key-systems', { schema: z.object({ keySystems: z.array(KeySystem) }) })).keySystems;
export const createKeySystem = async (input: KeySystemCreate) => (await request('POST', '/api/key-systems', { body: input, schema: z.object({ keySystem: KeySystem }) })).keySystem;
export const getKeySystem = async (id: string, show = false) => (await request('GET', `/api/key-systems/${id}${reveal(show)}`, { schema: z.object({ keySystem: KeySystem }) })).keySystem;
export const listKeys = async (id: string, show = false) => (await request('GET', `/api/key-systems/${id}/keys${reveal(show)}`, { schema: z.object({ keys: z.array(Key) }) })).keys;
export const addKeys = async (id: string, keys: KeyInput[]) => (await request('POST', `/api/key-systems/${id}/keys`, { body: { keys }, schema: z.object({ ids: z.array(z.uuid()) }) })).ids;
export const addKey = async (id: string, key: KeyInput) => (await request('POST', `/api/key-systems/${id}/keys`, { body: key, schema: z.object({ ids: z.array(z.uuid()) }) })).ids;
export const updateKey = (id: string, keyId: string, patch: KeyUpdate) => request('PATCH', `/api/key-systems/${id}/keys/${keyId}`, { body: patch, schema: z.object({ ok: z.boolean() }) });
/** A preview only: nothing is saved. It lists bittings, so the server audits it. */
export const previewProgression = (id: string, input: ProgressionInput) =>
  request('POST', `/api/key-systems/${id}/progression`, { body: input, schema: ProgressionPreview });
export const importKeys = (id: string, file: File, commit: boolean) => uploadCsv(`/api/key-systems/${id}/import`, file, commit);
export const auditKeySystem = (id: string) => request('GET', `/api/key-systems/${id}/audit`, { schema: SystemAudit });
/** Administrators only; the server audits it. */
export const acknowledgeFinding = (id: string, fingerprint: string, note: string) =>
  request('POST', `/api/key-systems/${id}/audit/acknowledgements`, { body: { fingerprint, note }, schema: z.object({ fingerprint: z.string() }) });

export const ReplaceResult = z.object({ id: z.uuid(), symbol: z.string(), doors: z.array(z.string()), coresToRekey: z.array(z.string()) });
export type ReplaceResult = z.infer<typeof ReplaceResult>;
/** The cores a key turns, intended or incidental (the engine's keyOperates); no bitting in the answer. */
export const keyOperates = async (id: string, keyId: string) => (await request('GET', `/api/key-systems/${id}/keys/${keyId}/operates`, { schema: z.object({ cores: z.array(KeyOperatesRow) }) })).cores;
export const replaceKey = (id: string, keyId: string, input: Partial<KeyReplace> & Pick<KeyReplace, 'symbol' | 'bitting'>) => request('POST', `/api/key-systems/${id}/keys/${keyId}/replace`, { body: input, schema: ReplaceResult });
