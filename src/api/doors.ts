/** Doors (openings): list, history and the CSV import (a multipart upload through http.ts's authorizedFetch). */
import { z } from 'zod';
import { Door, type DoorInput, type DoorUpdate } from '@shared/schemas/records';
import { CoreState } from '@shared/schemas/records';
import { ApiError, authorizedFetch, errorOf, request } from './http';

/** Query string from a filter object; empty values are left out so links stay short. */
export function toQuery(filter: Record<string, string | number | boolean | null | undefined>): string {
  const params = new URLSearchParams();
  for (const [k, v] of Object.entries(filter)) if (v !== undefined && v !== null && v !== '') params.set(k, String(v));
  const s = params.toString();
  return s ? `?${s}` : '';
}

export const ImportRowError = z.object({ row: z.number(), column: z.string().nullable(), message: z.string() });
export type ImportRowError = z.infer<typeof ImportRowError>;
export const ImportResult = z.object({
  rows: z.number(),
  errors: z.array(ImportRowError),
  warnings: z.array(ImportRowError).default([]),
  preview: z.array(z.record(z.string(), z.union([z.string(), z.boolean(), z.null()]))),
  committed: z.boolean(),
  created: z.number(),
});
export type ImportResult = z.infer<typeof ImportResult>;

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

export interface DoorFilter {
  q?: string;
  building?: string;
  fireRated?: '0' | '1';
  keySystemId?: string;
  retired?: 'only' | 'all';
}

export const DoorHistoryEntry = z.object({
  id: z.uuid(),
  coreId: z.uuid(),
  coreTag: z.string(),
  coreState: CoreState,
  installedAt: z.string(),
  installedBy: z.string(),
  removedCoreTag: z.string().nullable(),
  notes: z.string().nullable(),
  builtBy: z.string().nullable(),
  builtAt: z.string().nullable(),
  /** Installed here although planned for another door (plannedDoorLabel), for the reason given. */
  doorMismatch: z.boolean(),
  mismatchReason: z.string().nullable(),
  mismatchReviewedAt: z.string().nullable(),
  plannedDoorLabel: z.string().nullable(),
});
export type DoorHistoryEntry = z.infer<typeof DoorHistoryEntry>;

export const listDoors = async (filter: DoorFilter = {}) =>
  (await request('GET', `/api/doors${toQuery({ ...filter })}`, { schema: z.object({ doors: z.array(Door) }) })).doors;
export const getDoor = async (id: string) => (await request('GET', `/api/doors/${id}`, { schema: z.object({ door: Door }) })).door;
const One = z.object({ door: Door });
export const createDoor = async (input: DoorInput) => (await request('POST', '/api/doors', { body: input, schema: One })).door;
export const updateDoor = async (id: string, patch: DoorUpdate) => (await request('PATCH', `/api/doors/${id}`, { body: patch, schema: One })).door;
export const doorHistory = async (id: string) => (await request('GET', `/api/doors/${id}/history`, { schema: z.object({ history: z.array(DoorHistoryEntry) }) })).history;
export const importDoors = (file: File, commit: boolean) => uploadCsv('/api/doors/import', file, commit);
