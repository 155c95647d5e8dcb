/** The completion log: what synced from the tablets, its detail per core, and the CSV export. */
import { z } from 'zod';
import { CompletionPage, CompletionRow, type CompletionQuery } from '@shared/schemas/completions';
import { Attempt } from '@shared/schemas/sync';
import { KeyLevel } from '@shared/schemas/records';
import { request } from './http';
import { toQuery } from './doors';
import { authorizedFetch, errorOf } from './http';

export type CompletionFilter = Partial<CompletionQuery>;

export const CompletionInstall = z.object({
  id: z.uuid(),
  doorLabel: z.string(),
  installedAt: z.string(),
  installedBy: z.string(),
  removedCoreTag: z.string().nullable(),
  notes: z.string().nullable(),
  doorMismatch: z.boolean(),
  mismatchReason: z.string().nullable(),
  plannedDoorLabel: z.string().nullable(),
  reviewedAt: z.string().nullable(),
  reviewedBy: z.string().nullable(),
});
export const CompletionDetail = CompletionRow.extend({
  attempts: z.array(Attempt),
  notes: z.string().nullable(),
  deviceId: z.string().nullable(),
  install: CompletionInstall.nullable(),
  /** The per-part sizes are sealed; they come back only on an audited reveal. */
  hasPinSizes: z.boolean(),
  /** Each key symbol of the core's system with its level, to name a master by its level. */
  keyLevels: z.record(z.string(), KeyLevel).default({}),
});
export type CompletionDetail = z.infer<typeof CompletionDetail>;

// Whole-day filters are read in this browser's time zone.
export const listCompletions = (filter: CompletionFilter) => request('GET', `/api/completions${toQuery({ ...filter, tz: new Date().getTimezoneOffset() })}`, { schema: CompletionPage });
export const getCompletion = async (id: string, reveal = false) => (await request('GET', `/api/completions/${id}${reveal ? '?reveal=1' : ''}`, { schema: z.object({ completion: CompletionDetail }) })).completion;

export const InstallMismatch = z.object({
  id: z.uuid(),
  coreId: z.uuid(),
  coreTag: z.string(),
  doorId: z.uuid(),
  doorLabel: z.string(),
  plannedDoorLabel: z.string().nullable(),
  reason: z.string().nullable(),
  installedAt: z.string(),
  installedBy: z.string(),
  completionId: z.uuid().nullable(),
});
export type InstallMismatch = z.infer<typeof InstallMismatch>;
/** Installs into another door than the planned one that no supervisor has reviewed yet. */
export const listMismatches = async () => (await request('GET', '/api/installs/mismatches', { schema: z.object({ mismatches: z.array(InstallMismatch) }) })).mismatches;
/** Marks an install into another door reviewed (audited on the server). */
export const reviewMismatch = (installId: string) => request('POST', `/api/installs/${installId}/review`, { schema: z.object({ review: z.object({ id: z.uuid(), reviewedAt: z.union([z.string(), z.date()]).nullable(), reviewedBy: z.string().nullable() }) }) });

/** The export needs the Authorization header, so it is fetched and handed over as a Blob (the server audits it). */
export async function exportCompletionsCsv(filter: CompletionFilter): Promise<{ blob: Blob; filename: string }> {
  const { page: _p, pageSize: _s, ...rest } = filter;
  const res = await authorizedFetch(`/api/completions.csv${toQuery({ ...rest, tz: new Date().getTimezoneOffset() })}`, { headers: { Accept: 'text/csv' } });
  if (!res.ok) throw await errorOf(res);
  const name = /filename="([^"]+)"/.exec(res.headers.get('Content-Disposition') ?? '')?.[1] ?? 'completion-log.csv';
  return { blob: await res.blob(), filename: name };
}
