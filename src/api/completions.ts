/** The completion log: what synced from the tablets, its detail per core, and the CSV export. */
import { CompletionAnswer, CompletionPage, type CompletionQuery } from '@shared/schemas/completions';
import { InstallMismatchList, InstallReview } from '@shared/schemas/installs';
import { request } from './http';
import { toQuery } from './doors';
import { authorizedFetch, errorOf } from './http';

export type { CompletionDetail } from '@shared/schemas/completions';
export type { InstallMismatch } from '@shared/schemas/installs';
export type CompletionFilter = Partial<CompletionQuery>;

// Whole-day filters are read in this browser's time zone.
export const listCompletions = (filter: CompletionFilter) => request('GET', `/api/completions${toQuery({ ...filter, tz: new Date().getTimezoneOffset() })}`, { schema: CompletionPage });
export const getCompletion = async (id: string, reveal = false) => (await request('GET', `/api/completions/${id}${reveal ? '?reveal=1' : ''}`, { schema: CompletionAnswer })).completion;

/** Installs into another door than the planned one that no supervisor has reviewed yet. */
export const listMismatches = async () => (await request('GET', '/api/installs/mismatches', { schema: InstallMismatchList })).mismatches;
/** Marks an install into another door reviewed (audited on the server). */
export const reviewMismatch = (installId: string) => request('POST', `/api/installs/${installId}/review`, { schema: InstallReview });

/** The export needs the Authorization header, so it is fetched and handed over as a Blob (the server audits it). */
export async function exportCompletionsCsv(filter: CompletionFilter): Promise<{ blob: Blob; filename: string }> {
  const { page: _p, pageSize: _s, ...rest } = filter;
  const res = await authorizedFetch(`/api/completions.csv${toQuery({ ...rest, tz: new Date().getTimezoneOffset() })}`, { headers: { Accept: 'text/csv' } });
  if (!res.ok) throw await errorOf(res);
  const name = /filename="([^"]+)"/.exec(res.headers.get('Content-Disposition') ?? '')?.[1] ?? 'completion-log.csv';
  return { blob: await res.blob(), filename: name };
}
