/** The audit trail (admin): who saw or exported bittings, downloaded packets, changed keys, signed in. */
import { z } from 'zod';
import { request } from './http';
import { toQuery } from './doors';

export const AuditEvent = z.object({
  id: z.union([z.string(), z.number()]),
  at: z.string(),
  actorId: z.string().nullable(),
  actorEmail: z.string().nullable(),
  action: z.string(),
  targetType: z.string().nullable(),
  targetId: z.string().nullable(),
  ip: z.string().nullable(),
  details: z.record(z.string(), z.unknown()).nullable(),
});
export type AuditEvent = z.infer<typeof AuditEvent>;
export const AuditPage = z.object({ rows: z.array(AuditEvent), total: z.number(), page: z.number(), pageSize: z.number() });

export interface AuditFilter {
  action?: string;
  actorId?: string;
  from?: string;
  to?: string;
  page?: number;
  pageSize?: number;
}
export const listAuditEvents = (filter: AuditFilter) => request('GET', `/api/audit-events${toQuery({ ...filter, tz: new Date().getTimezoneOffset() })}`, { schema: AuditPage });
