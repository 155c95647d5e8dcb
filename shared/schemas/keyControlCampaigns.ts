/**
 * Key audit campaigns: an office user starts one over a key system or a department; every holder
 * with copies out in it gets a mailed single-use, expiring link (no sign-in, no bitting) to confirm
 * which copies they still hold, or flag one missing (which opens a lost report for the office).
 */
import { z } from 'zod';
import { Id, Name } from './common';
import { LinkToken } from './keyControlRequests';

export const CAMPAIGN_LINK_DAYS = 14;

export const KeyCampaignInput = z
  .strictObject({
    title: Name(120, 'a title'),
    keySystemId: Id.optional(),
    departmentId: Id.optional(),
  })
  .refine((v) => Boolean(v.keySystemId) !== Boolean(v.departmentId), { error: 'choose one scope: a key system or a department', path: ['keySystemId'] });
export type KeyCampaignInput = z.infer<typeof KeyCampaignInput>;

export const CampaignCopy = z.object({ issueId: Id, keySymbol: z.string(), copyNumber: z.number(), answer: z.enum(['held', 'missing']).nullable(), reportId: Id.nullable() });
export type CampaignCopy = z.infer<typeof CampaignCopy>;

export const KeyCampaignSummary = z.object({
  id: Id,
  number: z.number(),
  title: z.string(),
  scope: z.object({ kind: z.enum(['key-system', 'department']), name: z.string() }),
  createdAt: z.string(),
  expiresAt: z.string(),
  holders: z.number(),
  confirmed: z.number(),
  missing: z.number(),
  /** Holders with copies out in the scope but no e-mail on record: not asked, to follow up by hand. */
  noEmail: z.array(z.string()),
});
export type KeyCampaignSummary = z.infer<typeof KeyCampaignSummary>;

export const KeyCampaign = KeyCampaignSummary.extend({
  people: z.array(z.object({ holderId: Id, name: z.string(), department: z.string(), email: z.string().nullable(), answeredAt: z.string().nullable(), copies: z.array(CampaignCopy) })),
});
export type KeyCampaign = z.infer<typeof KeyCampaign>;
export const KeyCampaignAnswer = z.object({ campaign: KeyCampaign });
export type KeyCampaignAnswer = z.infer<typeof KeyCampaignAnswer>;
export const KeyCampaignList = z.object({ campaigns: z.array(KeyCampaignSummary) });
export type KeyCampaignList = z.infer<typeof KeyCampaignList>;

export const CampaignLinkView = z.strictObject({ token: LinkToken });
export const CampaignConfirm = z.strictObject({
  token: LinkToken,
  copies: z.array(z.strictObject({ issueId: Id, held: z.boolean({ error: 'held is true or false' }) })).min(1, { error: 'answer for every key listed' }).max(200),
});
export type CampaignConfirm = z.infer<typeof CampaignConfirm>;

/** What the holder's page shows: their name, the campaign, their copies by symbol and copy number. */
export const CampaignLinkAnswer = z.object({
  campaign: z.object({ number: z.number(), title: z.string(), expiresAt: z.string() }),
  holder: z.object({ name: z.string() }),
  answeredAt: z.string().nullable(),
  copies: z.array(CampaignCopy.omit({ reportId: true })),
});
export type CampaignLinkAnswer = z.infer<typeof CampaignLinkAnswer>;
