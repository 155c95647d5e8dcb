/** The completion log: what synced from the tablets, its detail per core, and the CSV export. */
import { z } from 'zod';
import { CompletionPage, CompletionRow, type CompletionQuery } from '@shared/schemas/completions';
import { Attempt } from '@shared/schemas/sync';
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
});
export const CompletionDetail = CompletionRow.extend({
  attempts: z.array(Attempt),
  notes: z.string().nullable(),
  deviceId: z.string().nullable(),
  install: CompletionInstall.nullable(),
});
export type CompletionDetail = z.infer<typeof CompletionDetail>;

// Whole-day filters are read in this browser's time zone.
export const listCompletions = (filter: CompletionFilter) => request('GET', `/api/completions${toQuery({ ...filter, tz: new Date().getTimezoneOffset() })}`, { schema: CompletionPage });
export const getCompletion = async (id: string) => (await request('GET', `/api/completions/${id}`, { schema: z.object({ completion: CompletionDetail }) })).completion;

/** The export needs the Authorization header, so it is fetched and handed over as a Blob (the server audits it). */
export async function exportCompletionsCsv(filter: CompletionFilter): Promise<{ blob: Blob; filename: string }> {
  const { page: _p, pageSize: _s, ...rest } = filter;
  const res = await authorizedFetch(`/api/completions.csv${toQuery({ ...rest, tz: new Date().getTimezoneOffset() })}`, { headers: { Accept: 'text/csv' } });
  if (!res.ok) throw await errorOf(res);
  const name = /filename="([^"]+)"/.exec(res.headers.get('Content-Disposition') ?? '')?.[1] ?? 'completion-log.csv';
  return { blob: await res.blob(), filename: name };
}
