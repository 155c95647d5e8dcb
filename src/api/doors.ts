/** Doors (openings): list, history and the CSV import (a multipart upload through http.ts's authorizedFetch). */
import { DoorAnswer, DoorHistory, DoorList } from '@shared/schemas/doors';
import { ImportResult } from '@shared/schemas/imports';
import type { DoorInput, DoorUpdate } from '@shared/schemas/records';
import { ApiError, authorizedFetch, errorOf, request } from './http';

/** Query string from a filter object; empty values are left out so links stay short. */
export function toQuery(filter: Record<string, string | number | boolean | null | undefined>): string {
  const params = new URLSearchParams();
  for (const [k, v] of Object.entries(filter)) if (v !== undefined && v !== null && v !== '') params.set(k, String(v));
  const s = params.toString();
  return s ? `?${s}` : '';
}

/** Posts a CSV as multipart field "file". A 422 still carries the per-row result, so it is returned, not thrown. */
export async function uploadCsv(path: string, file: File, commit: boolean): Promise<ImportResult> {
  const form = new FormData();
  form.append('file', file, file.name);
  const res = await authorizedFetch(`${path}${commit ? '?commit=1' : ''}`, { method: 'POST', body: form, headers: { Accept: 'application/json' } });
  if (res.ok || res.status === 422) {
    const parsed = ImportResult.safeParse(await res.json());
    if (parsed.success) return parsed.data;
    throw new ApiError('bad-response', 'The import answer was not understood.', res.status);
  }
  throw await errorOf(res);
}

export type { DoorHistoryEntry } from '@shared/schemas/doors';
export type { ImportResult, ImportRowError } from '@shared/schemas/imports';

export interface DoorFilter {
  q?: string;
  building?: string;
  fireRated?: '0' | '1';
  keySystemId?: string;
  retired?: 'only' | 'all';
}

export const listDoors = async (filter: DoorFilter = {}) =>
  (await request('GET', `/api/doors${toQuery({ ...filter })}`, { schema: DoorList })).doors;
export const getDoor = async (id: string) => (await request('GET', `/api/doors/${id}`, { schema: DoorAnswer })).door;
export const createDoor = async (input: DoorInput) => (await request('POST', '/api/doors', { body: input, schema: DoorAnswer })).door;
export const updateDoor = async (id: string, patch: DoorUpdate) => (await request('PATCH', `/api/doors/${id}`, { body: patch, schema: DoorAnswer })).door;
export const doorHistory = async (id: string) => (await request('GET', `/api/doors/${id}/history`, { schema: DoorHistory })).history;
export const importDoors = (file: File, commit: boolean) => uploadCsv('/api/doors/import', file, commit);
