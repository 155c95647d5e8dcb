/** Key systems and keys. Bittings come only with reveal=1, which the server audits. */
import { ProgressionPreview, type KeyInput, type KeyReplace, type KeySystemCreate, type KeyUpdate, type ProgressionInput } from '@shared/schemas/records';
import { Ok } from '@shared/schemas/common';
import { KeyIds, KeyList, KeyOperatesList, KeyReplacement, KeySystemAnswer, KeySystemList } from '@shared/schemas/keySystems';
import { FindingAcknowledged, SystemAudit } from '@shared/schemas/systemAudit';
import { request } from './http';
import { uploadCsv } from './doors';

const reveal = (yes: boolean) => (yes ? '?reveal=1' : '');

export type { HeldKey, ProgressedKey, ProgressionInput } from '@shared/schemas/records';
export type { KeyReplacement as ReplaceResult } from '@shared/schemas/keySystems';
export type { SystemAudit, SystemAuditReportFinding } from '@shared/schemas/systemAudit';

export const listKeySystems = async () => (await request('GET', '/api/key-systems', { schema: KeySystemList })).keySystems;
export const createKeySystem = async (input: KeySystemCreate) => (await request('POST', '/api/key-systems', { body: input, schema: KeySystemAnswer })).keySystem;
export const getKeySystem = async (id: string, show = false) => (await request('GET', `/api/key-systems/${id}${reveal(show)}`, { schema: KeySystemAnswer })).keySystem;
export const listKeys = async (id: string, show = false) => (await request('GET', `/api/key-systems/${id}/keys${reveal(show)}`, { schema: KeyList })).keys;
export const addKeys = async (id: string, keys: KeyInput[]) => (await request('POST', `/api/key-systems/${id}/keys`, { body: { keys }, schema: KeyIds })).ids;
export const addKey = async (id: string, key: KeyInput) => (await request('POST', `/api/key-systems/${id}/keys`, { body: key, schema: KeyIds })).ids;
export const updateKey = (id: string, keyId: string, patch: KeyUpdate) => request('PATCH', `/api/key-systems/${id}/keys/${keyId}`, { body: patch, schema: Ok });
/** A preview only: nothing is saved. It lists bittings, so the server audits it. */
export const previewProgression = (id: string, input: ProgressionInput) =>
  request('POST', `/api/key-systems/${id}/progression`, { body: input, schema: ProgressionPreview });
export const importKeys = (id: string, file: File, commit: boolean) => uploadCsv(`/api/key-systems/${id}/import`, file, commit);
export const getSystemAudit = (id: string) => request('GET', `/api/key-systems/${id}/system-audit`, { schema: SystemAudit });
/** Administrators only; the server audits it. */
export const acknowledgeFinding = (id: string, fingerprint: string, note: string) =>
  request('POST', `/api/key-systems/${id}/system-audit/acknowledgements`, { body: { fingerprint, note }, schema: FindingAcknowledged });

/** The cores a key turns, intended or incidental (the engine's keyOperates); no bitting in the answer. */
export const keyOperates = async (id: string, keyId: string) => (await request('GET', `/api/key-systems/${id}/keys/${keyId}/operates`, { schema: KeyOperatesList })).cores;
export const replaceKey = (id: string, keyId: string, input: Partial<KeyReplace> & Pick<KeyReplace, 'symbol' | 'bitting'>) => request('POST', `/api/key-systems/${id}/keys/${keyId}/replace`, { body: input, schema: KeyReplacement });
