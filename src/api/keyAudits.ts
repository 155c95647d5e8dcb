/** Key audits: started by the office; answered by each holder from a mailed link without signing in. */
import { KeyAuditLinkAnswer, KeyAuditAnswer, KeyAuditList, type KeyAuditConfirm, type KeyAuditInput } from '@shared/schemas/keyControlKeyAudits';
import { request } from './http';

export type { KeyAuditLinkAnswer, KeyAudit, KeyAuditSummary } from '@shared/schemas/keyControlKeyAudits';

/** Saved, then each holder with keys out in the scope is mailed a link. */
export const startKeyAudit = async (input: KeyAuditInput) => (await request('POST', '/api/key-audits', { body: input, schema: KeyAuditAnswer })).keyAudit;
export const listKeyAudits = async () => (await request('GET', '/api/key-audits', { schema: KeyAuditList })).keyAudits;
export const getKeyAudit = async (id: string) => (await request('GET', `/api/key-audits/${id}`, { schema: KeyAuditAnswer })).keyAudit;
/** Reminds every holder not answered at once (a new link each); audited. */
export const remindKeyAudit = async (id: string) => (await request('POST', `/api/key-audits/${id}/reminders`, { schema: KeyAuditAnswer })).keyAudit;
/** One holder's link again: a new link; the one in their earlier e-mails stops working. Audited. */
export const resendKeyAuditLink = async (id: string, holderId: string) => (await request('POST', `/api/key-audits/${id}/holders/${holderId}/resend`, { schema: KeyAuditAnswer })).keyAudit;
/** Closes it: the links stop working and no reminder goes out. Audited. */
export const closeKeyAudit = async (id: string) => (await request('POST', `/api/key-audits/${id}/close`, { schema: KeyAuditAnswer })).keyAudit;

/** The holder's link: no sign-in, the token from the address's fragment. */
export const viewKeyAuditLink = (token: string) => request('POST', '/api/key-audit-links/view', { body: { token }, schema: KeyAuditLinkAnswer, auth: false });
export const confirmKeys = (input: KeyAuditConfirm) => request('POST', '/api/key-audit-links/confirm', { body: input, schema: KeyAuditLinkAnswer, auth: false });
