/** Key audits: started by the office; answered by each holder from a mailed link without signing in. */
import { KeyAuditLinkAnswer, KeyAuditAnswer, KeyAuditList, type KeyAuditConfirm, type KeyAuditInput } from '@shared/schemas/keyControlKeyAudits';
import { request } from './http';

export type { KeyAuditLinkAnswer, KeyAudit, KeyAuditSummary } from '@shared/schemas/keyControlKeyAudits';

/** Saved, then each holder with keys out in the scope is mailed a link. */
export const startKeyAudit = async (input: KeyAuditInput) => (await request('POST', '/api/key-audits', { body: input, schema: KeyAuditAnswer })).keyAudit;
export const listKeyAudits = async () => (await request('GET', '/api/key-audits', { schema: KeyAuditList })).keyAudits;
export const getKeyAudit = async (id: string) => (await request('GET', `/api/key-audits/${id}`, { schema: KeyAuditAnswer })).keyAudit;

/** The holder's link: no sign-in, the token from the address's fragment. */
export const viewKeyAuditLink = (token: string) => request('POST', '/api/key-audit-links/view', { body: { token }, schema: KeyAuditLinkAnswer, auth: false });
export const confirmKeys = (input: KeyAuditConfirm) => request('POST', '/api/key-audit-links/confirm', { body: input, schema: KeyAuditLinkAnswer, auth: false });
