/**
 * Doors (openings): list, history and the CSV import. This module also holds the two
 * non-JSON transfers the console needs (a multipart upload and a file download), because
 * http.ts only speaks JSON; both send the bearer token the same way request() does.
 */
import { z } from 'zod';
import { Door } from '@shared/schemas/records';
import { CoreState } from '@shared/schemas/records';
import type { ApiErrorBody } from '@shared/errors';
import { ApiError, request } from './http';
import { useSessionStore } from '@/stores/session';

/** Query string from a filter object; empty values are left out so links stay short. */
export function toQuery(filter: Record<string, string | number | boolean | null | undefined>): string {
  const params = new URLSearchParams();
  for (const [k, v] of Object.entries(filter)) if (v !== undefined && v !== null && v !== '') params.set(k, String(v));
  const s = params.toString();
  return s ? `?${s}` : '';
}

/**
 * fetch with the signed-in user's token for uploads and downloads. http.ts keeps its token
 * source private, so this asks the session store for a fresh access token each time
 * (one refresh per transfer; transfers are rare and user-initiated).
 */
export async function authorizedFetch(path: string, init: RequestInit = {}): Promise<Response> {
  const token = await useSessionStore().refreshTokens();
  if (!token) throw new ApiError('unauthenticated', 'Your sign-in has ended; sign in again.', 401);
  try {
    return await fetch(path, { ...init, cache: 'no-store', headers: { ...(init.headers as Record<string, string> | undefined), Authorization: `Bearer ${token}` } });
  } catch {
    throw new ApiError('network', 'The server cannot be reached; check the connection. Nothing was lost.', 0);
  }
}

export async function errorFrom(res: Response): Promise<ApiError> {
  try {
    const body = (await res.json()) as ApiErrorBody;
    if (body?.error?.code) return new ApiError(body.error.code, body.error.message, res.status, body.error.details ?? []);
  } catch {
    // not our JSON shape
  }
  return new ApiError('unknown', `The server answered ${res.status} ${res.statusText}.`, res.status);
}

export const ImportRowError = z.object({ row: z.number(), column: z.string().nullable(), message: z.string() });
export type ImportRowError = z.infer<typeof ImportRowError>;
export const ImportResult = z.object({
  rows: z.number(),
  errors: z.array(ImportRowError),
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
  throw await errorFrom(res);
}

export interface DoorFilter {
  q?: string;
  building?: string;
  fireRated?: '0' | '1';
  keySystemId?: string;
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
});
export type DoorHistoryEntry = z.infer<typeof DoorHistoryEntry>;

export const listDoors = async (filter: DoorFilter = {}) =>
  (await request('GET', `/api/doors${toQuery({ ...filter })}`, { schema: z.object({ doors: z.array(Door) }) })).doors;
export const getDoor = async (id: string) => (await request('GET', `/api/doors/${id}`, { schema: z.object({ door: Door }) })).door;
export const doorHistory = async (id: string) => (await request('GET', `/api/doors/${id}/history`, { schema: z.object({ history: z.array(DoorHistoryEntry) }) })).history;
export const importDoors = (file: File, commit: boolean) => uploadCsv('/api/doors/import', file, commit);
