/**
 * Key control: departments, key holders and issued key copies, requests and answers.
 * No schema here has a bitting: a key copy is its key symbol and copy number.
 */
import { z } from 'zod';
import { Email } from './auth';
import { Id, IsoDate, Name, Notes, Text } from './common';

export const HolderStatus = z.enum(['active', 'leaving', 'left'], { error: 'status is active, leaving or left' });
export type HolderStatus = z.infer<typeof HolderStatus>;

export const Authoriser = z.strictObject({ name: Name(120, 'the name'), email: Email });
export type Authoriser = z.infer<typeof Authoriser>;

export const DepartmentInput = z.strictObject({
  name: Name(120, 'the department name'),
  authorisers: z.array(Authoriser).max(20, { error: 'at most 20 authorisers per department' }).default([]),
});
export type DepartmentInput = z.infer<typeof DepartmentInput>;

export const Department = z.object({
  id: Id,
  name: z.string(),
  authorisers: z.array(z.object({ id: Id, name: z.string(), email: z.string() })),
  holderCount: z.number(),
});
export type Department = z.infer<typeof Department>;
export const DepartmentList = z.object({ departments: z.array(Department) });
export type DepartmentList = z.infer<typeof DepartmentList>;
export const DepartmentAnswer = z.object({ department: Department });
export type DepartmentAnswer = z.infer<typeof DepartmentAnswer>;

export const BadgeId = Text(40, 'the badge id').pipe(z.string().min(1, { error: 'enter the badge id or leave it out' }));

/** `department`: a department id, or its name (a name not known yet adds the department). */
export const HolderInput = z.strictObject({
  name: Name(120, 'the name'),
  department: Name(120, 'the department'),
  email: Email.optional(),
  badgeId: BadgeId.optional(),
});
export type HolderInput = z.infer<typeof HolderInput>;

export const HolderUpdate = z.strictObject({
  name: Name(120, 'the name').optional(),
  department: Name(120, 'the department').optional(),
  email: Email.nullable().optional(),
  badgeId: BadgeId.nullable().optional(),
  status: HolderStatus.optional(),
});
export type HolderUpdate = z.infer<typeof HolderUpdate>;

export const HolderQuery = z.strictObject({
  q: Text(80, 'q').optional(),
  departmentId: Id.optional(),
  status: HolderStatus.optional(),
});
export type HolderQuery = z.infer<typeof HolderQuery>;

export const Holder = z.object({
  id: Id,
  name: z.string(),
  departmentId: Id,
  department: z.string(),
  email: z.string().nullable(),
  badgeId: z.string().nullable(),
  status: HolderStatus,
  /** Key copies issued and not returned (lost or stolen ones are not out any more). */
  keysOut: z.number(),
  createdAt: z.string(),
});
export type Holder = z.infer<typeof Holder>;
export const HolderList = z.object({ holders: z.array(Holder) });
export type HolderList = z.infer<typeof HolderList>;

/** `transferred`: the copy passed to another holder; the record it became keeps its copy number. */
export const IssueStatus = z.enum(['out', 'returned', 'lost', 'stolen', 'transferred']);
export type IssueStatus = z.infer<typeof IssueStatus>;

/**
 * A system's control key as key control tracks it (never its bitting): `active` is the system's control key
 * now; `replaced` after a loss, while cores built for it are still installed; then `retired`.
 */
export const ControlKey = z.object({ id: Id, keySystemId: Id, symbol: z.string(), status: z.enum(['active', 'replaced', 'retired']), copiesOut: z.number() });
export type ControlKey = z.infer<typeof ControlKey>;
export const ControlKeyList = z.object({ controlKeys: z.array(ControlKey) });
export type ControlKeyList = z.infer<typeof ControlKeyList>;

/** The other side of a transfer: the record the copy passed to, or came from, and its holder. */
export const TransferLink = z.object({ issueId: Id, holderId: Id, holderName: z.string() });
export type TransferLink = z.infer<typeof TransferLink>;

/** A key copy as issued: holder, key symbol and copy number, who issued and who authorised it. */
export const KeyIssue = z.object({
  id: Id,
  holderId: Id,
  holderName: z.string(),
  department: z.string(),
  keyId: Id,
  keySymbol: z.string(),
  keySystemId: Id,
  /** A copy of the system's control key (`keyId` is then the control key's id): it removes cores. */
  control: z.boolean(),
  copyNumber: z.number().int().min(1),
  requestId: Id.nullable(),
  issuedAt: z.string(),
  issuedBy: z.string().nullable(),
  authorisedBy: z.string().nullable(),
  dueDate: z.string().nullable(),
  acknowledgement: z.object({ name: z.string(), signed: z.boolean() }),
  status: IssueStatus,
  returnedAt: z.string().nullable(),
  /** When the copy passed to another holder (status `transferred`), and the record it became. */
  transferredAt: z.string().nullable(),
  transferredTo: TransferLink.nullable(),
  /** The record this copy was passed on from, for a copy received by transfer. */
  transferredFrom: TransferLink.nullable(),
  /** Out and past its due date. */
  overdue: z.boolean(),
});
export type KeyIssue = z.infer<typeof KeyIssue>;
export const KeyIssueList = z.object({ issues: z.array(KeyIssue) });
export type KeyIssueList = z.infer<typeof KeyIssueList>;
/** The receipt: the issue and the drawn signature, if there is one. */
export const KeyIssueAnswer = z.object({ issue: KeyIssue.extend({ signature: z.string().nullable().optional() }) });
export type KeyIssueAnswer = z.infer<typeof KeyIssueAnswer>;

/** A drawn signature: a PNG as a data URL, at most SIGNATURE_MAX_CHARS characters. */
export const SIGNATURE_MAX_CHARS = 60_000;
const PNG_DATA_URL = /^data:image\/png;base64,([A-Za-z0-9+/]+={0,2})$/;
export const Signature = z
  .string({ error: 'the signature is an image data URL (data:image/png;base64,...)' })
  .max(SIGNATURE_MAX_CHARS, { error: `the signature image is too large (at most ${SIGNATURE_MAX_CHARS} characters); draw it again smaller` })
  .superRefine((value, ctx) => {
    const m = PNG_DATA_URL.exec(value);
    // The first bytes must be PNG's signature (ISO/IEC 15948, 5.2): 89 50 4E 47 0D 0A 1A 0A.
    if (!m || !m[1]!.startsWith('iVBORw0KGgo')) ctx.addIssue({ code: 'custom', message: 'the signature is a PNG image as a data URL (data:image/png;base64,...)', input: value });
  });

export const Acknowledgement = z.strictObject({
  name: Name(120, 'the name of the person signing'),
  accepted: z.literal(true, { error: 'the holder must tick that they received the key and accept its terms' }),
  signature: Signature.optional(),
});

export const KeyIssueInput = z.strictObject({
  holderId: Id,
  /** A key, or a system's control key (supervisors and administrators only, as every issue). */
  keyId: Id,
  requestId: Id.optional(),
  dueDate: IsoDate.optional(),
  acknowledgement: Acknowledgement,
});
export type KeyIssueInput = z.infer<typeof KeyIssueInput>;

/** A copy that is out passed to another holder in one step: authorised and acknowledged as an issue. */
export const KeyTransferInput = KeyIssueInput.omit({ keyId: true });
export type KeyTransferInput = z.infer<typeof KeyTransferInput>;

export const KeyIssueQuery = z.strictObject({
  holderId: Id.optional(),
  keyId: Id.optional(),
  status: IssueStatus.optional(),
});
export type KeyIssueQuery = z.infer<typeof KeyIssueQuery>;

export const KeyReturnInput = z.strictObject({ note: Notes(500, 'the note').optional() });

/** Copies to cut: per key symbol, the copy numbers to stamp. Restricted: it holds bittings. */
export const CutListQuery = z.strictObject({
  issueIds: z
    .string({ error: 'issueIds lists issue ids, comma-separated' })
    .transform((s) => s.split(',').map((x) => x.trim()).filter(Boolean))
    .pipe(z.array(Id).min(1, { error: 'name at least one issue' }).max(200, { error: 'at most 200 issues per cut list' })),
});
export const CutList = z.object({
  cutList: z.array(z.object({ keyId: Id, keySymbol: z.string(), bitting: z.string(), copyNumbers: z.array(z.number()), quantity: z.number() })),
});
export type CutList = z.infer<typeof CutList>;

/** Keys to chase: out past their due date, or held by someone leaving or gone. */
export const OutstandingKeys = z.object({
  issues: z.array(KeyIssue.extend({ holderStatus: HolderStatus, reason: z.enum(['overdue', 'leaving', 'left']) })),
});
export type OutstandingKeys = z.infer<typeof OutstandingKeys>;

/** A holder's record with the copies still out: for someone leaving, every key to return. */
export const HolderAnswer = z.object({ holder: Holder, keysToReturn: z.array(KeyIssue) });
export type HolderAnswer = z.infer<typeof HolderAnswer>;
