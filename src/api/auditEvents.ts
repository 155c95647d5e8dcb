/** The audit trail (admin): its audit events in names and words from the server; the CSV export is audited there. */
import { AuditPage } from '@shared/schemas/auditEvents';
import { authorizedFetch, errorOf, request } from './http';
import { toQuery } from './doors';

export type { AuditEvent } from '@shared/schemas/auditEvents';

export interface AuditFilter {
  action?: string;
  actorId?: string;
  from?: string;
  to?: string;
  page?: number;
  pageSize?: number;
}
const tz = () => new Date().getTimezoneOffset();
export const listAuditEvents = (filter: AuditFilter) => request('GET', `/api/audit-events${toQuery({ ...filter, tz: tz() })}`, { schema: AuditPage });

/** The filtered log as a CSV file (the download itself is logged). */
export async function exportAuditEvents(filter: AuditFilter): Promise<Blob> {
  const { page: _p, pageSize: _s, ...rest } = filter;
  const res = await authorizedFetch(`/api/audit-events.csv${toQuery({ ...rest, tz: tz() })}`, { headers: { Accept: 'text/csv' } });
  if (!res.ok) throw await errorOf(res);
  return res.blob();
}
