/** The audit trail as the API answers it: names and words, never raw ids or JSON. */
import { z } from 'zod';
import { cleanText, Id, IsoDate, Text, TzOffset } from './common';

export const AuditEvent = z.object({
  id: z.string(),
  at: z.string(),
  actorId: z.string().nullable(),
  actorName: z.string(),
  action: z.string(),
  actionName: z.string(),
  targetType: z.string().nullable(),
  targetId: z.string().nullable(),
  target: z.string(),
  ip: z.string().nullable(),
  summary: z.string(),
});
export type AuditEvent = z.infer<typeof AuditEvent>;
export const AuditPage = z.object({ rows: z.array(AuditEvent), total: z.number(), page: z.number(), pageSize: z.number() });
export type AuditPage = z.infer<typeof AuditPage>;

const Prefixes = z
  .string()
  .trim()
  .max(200, { error: 'action is one or more action prefixes like door. or bittings., separated by commas, at most 200 characters' })
  .superRefine(cleanText({ names: true }));
export const AuditQuery = z.strictObject({
  action: Prefixes.optional(),
  actorId: Id.optional(),
  targetId: Text(80, 'targetId').optional(),
  from: IsoDate.optional(),
  to: IsoDate.optional(),
  tz: TzOffset,
  page: z.coerce.number().int().min(1, { error: 'page starts at 1' }).default(1),
  pageSize: z.coerce.number().int().min(1).max(200, { error: 'pageSize is at most 200' }).default(50),
});
export type AuditQuery = z.infer<typeof AuditQuery>;
