/**
 * Key audits: an office user starts one over a key system or a department; every holder
 * with copies out in it gets a mailed single-use, expiring link (no sign-in, no bitting) to confirm
 * which copies they still hold, or flag one missing (which opens a lost report for the office).
 */
import { z } from 'zod';
import { Id, Name } from './common';
import { LinkToken } from './keyControlRequests';

export const KEY_AUDIT_LINK_DAYS = 14;

export const KeyAuditInput = z
  .strictObject({
    title: Name(120, 'a title'),
    keySystemId: Id.optional(),
    departmentId: Id.optional(),
  })
  .refine((v) => Boolean(v.keySystemId) !== Boolean(v.departmentId), { error: 'choose one scope: a key system or a department', path: ['keySystemId'] });
export type KeyAuditInput = z.infer<typeof KeyAuditInput>;

export const KeyAuditCopy = z.object({ issueId: Id, keySymbol: z.string(), copyNumber: z.number(), answer: z.enum(['held', 'missing']).nullable(), reportId: Id.nullable() });
export type KeyAuditCopy = z.infer<typeof KeyAuditCopy>;

export const KeyAuditSummary = z.object({
  id: Id,
  number: z.number(),
  title: z.string(),
  scope: z.object({ kind: z.enum(['key-system', 'department']), name: z.string() }),
  createdAt: z.string(),
  expiresAt: z.string(),
  /** Closed by the office: the links no longer work and no reminder goes out. */
  closedAt: z.string().nullable(),
  holders: z.number(),
  confirmed: z.number(),
  missing: z.number(),
  /** Holders with copies out in the scope but no e-mail on record: not asked, to follow up by hand. */
  noEmail: z.array(z.string()),
});
export type KeyAuditSummary = z.infer<typeof KeyAuditSummary>;

export const KeyAudit = KeyAuditSummary.extend({
  people: z.array(
    z.object({
      holderId: Id,
      name: z.string(),
      department: z.string(),
      email: z.string().nullable(),
      answeredAt: z.string().nullable(),
      /** When the holder was last sent a link (the first mail, a reminder or the link sent again), and how many reminders went. */
      mailedAt: z.string().nullable(),
      reminders: z.number(),
      copies: z.array(KeyAuditCopy),
    }),
  ),
});
export type KeyAudit = z.infer<typeof KeyAudit>;
export const KeyAuditAnswer = z.object({ keyAudit: KeyAudit });
export type KeyAuditAnswer = z.infer<typeof KeyAuditAnswer>;
export const KeyAuditList = z.object({ keyAudits: z.array(KeyAuditSummary) });
export type KeyAuditList = z.infer<typeof KeyAuditList>;

export const KeyAuditLinkView = z.strictObject({ token: LinkToken });
export const KeyAuditConfirm = z.strictObject({
  token: LinkToken,
  copies: z.array(z.strictObject({ issueId: Id, held: z.boolean({ error: 'held is true or false' }) })).min(1, { error: 'answer for every key listed' }).max(200),
});
export type KeyAuditConfirm = z.infer<typeof KeyAuditConfirm>;

/** What the holder's page shows: their name, the key audit, their copies by symbol and copy number. */
export const KeyAuditLinkAnswer = z.object({
  keyAudit: z.object({ number: z.number(), title: z.string(), expiresAt: z.string() }),
  holder: z.object({ name: z.string() }),
  answeredAt: z.string().nullable(),
  copies: z.array(KeyAuditCopy.omit({ reportId: true })),
});
export type KeyAuditLinkAnswer = z.infer<typeof KeyAuditLinkAnswer>;
