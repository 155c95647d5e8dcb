/**
 * Key requests: a holder, the doors they need and why; the key proposed (the lowest of the
 * system that opens every door asked for, through the engine on the installed cores) and every
 * door it opens beyond them; the decision, by a supervisor in the app or the department's
 * authoriser from a mailed single-use link. No bitting anywhere.
 */
import { z } from 'zod';
import { Id, Notes } from './common';
import { ExposureHow } from './keyControlExposure';

const DoorIds = z.array(Id).min(1, { error: 'name at least one door' }).max(200, { error: 'at most 200 doors per request' });

export const KeyProposalInput = z.strictObject({ doorIds: DoorIds, keyId: Id.optional() });
export type KeyProposalInput = z.infer<typeof KeyProposalInput>;

export const KeyRequestInput = z.strictObject({
  holderId: Id,
  doorIds: DoorIds,
  reason: Notes(1000, 'the reason').pipe(z.string().min(3, { error: 'say why the key is needed (3 to 1000 characters)' })),
  /** Another key than the one proposed; it must open every door asked for. */
  keyId: Id.optional(),
});
export type KeyRequestInput = z.infer<typeof KeyRequestInput>;

export const OpenedDoor = z.object({ doorId: Id, doorLabel: z.string(), how: ExposureHow, requested: z.boolean() });
export type OpenedDoor = z.infer<typeof OpenedDoor>;

/** One key that opens every door asked for, with every door it opens and those beyond the request. */
export const KeyCandidate = z.object({
  keyId: Id,
  keySymbol: z.string(),
  level: z.enum(['ggm', 'gm', 'master', 'change']),
  opens: z.array(OpenedDoor),
  beyond: z.number(),
});
export type KeyCandidate = z.infer<typeof KeyCandidate>;

/** The proposal first (lowest level, fewest doors beyond), then every other key that would do. */
export const KeyProposal = z.object({ proposal: KeyCandidate, candidates: z.array(KeyCandidate) });
export type KeyProposal = z.infer<typeof KeyProposal>;

export const KeyRequest = z.object({
  id: Id,
  number: z.number(),
  holderId: Id,
  holderName: z.string(),
  department: z.string(),
  keySystemId: Id,
  doors: z.array(z.object({ id: Id, label: z.string() })),
  reason: z.string(),
  proposedKeyId: Id.nullable(),
  proposedKeySymbol: z.string().nullable(),
  keyId: Id,
  keySymbol: z.string(),
  opens: z.array(OpenedDoor),
  status: z.enum(['pending', 'approved', 'refused']),
  decidedBy: z.string().nullable(),
  decidedAt: z.string().nullable(),
  decisionNote: z.string().nullable(),
  createdAt: z.string(),
  /** The authorisers' links that still work (not used, not replaced): to whom and when the approval e-mail went. */
  links: z.array(z.object({ authoriser: z.string(), sentAt: z.string(), expiresAt: z.string() })),
});
export type KeyRequest = z.infer<typeof KeyRequest>;
export const KeyRequestAnswer = z.object({ request: KeyRequest });
export type KeyRequestAnswer = z.infer<typeof KeyRequestAnswer>;
export const KeyRequestList = z.object({ requests: z.array(KeyRequest) });
export type KeyRequestList = z.infer<typeof KeyRequestList>;

export const KeyDecisionInput = z.strictObject({
  decision: z.enum(['approved', 'refused'], { error: 'decision is approved or refused' }),
  note: Notes(500, 'the note').optional(),
});
export type KeyDecisionInput = z.infer<typeof KeyDecisionInput>;

/** The authoriser's link: the token from the mail (never stored, only its SHA-256). */
export const LinkToken = z.string({ error: 'the token from the e-mailed link' }).regex(/^[A-Za-z0-9_-]{43}$/, { error: 'the token from the e-mailed link (43 characters)' });
export const LinkView = z.strictObject({ token: LinkToken });
export const LinkDecision = KeyDecisionInput.extend({ token: LinkToken });
export type LinkDecision = z.infer<typeof LinkDecision>;

/** What the authoriser sees: the request without anything the office keeps to itself. */
export const LinkRequestAnswer = z.object({
  request: KeyRequest.pick({ number: true, holderName: true, department: true, doors: true, reason: true, keySymbol: true, opens: true, status: true, decidedBy: true, decidedAt: true }),
  authoriser: z.object({ name: z.string(), email: z.string() }),
});
export type LinkRequestAnswer = z.infer<typeof LinkRequestAnswer>;
