/**
 * Key requests: the proposal (the lowest key that opens the doors, and every door beyond), the
 * request, the decision in the app; and the authoriser's mailed link, read and decided without sign-in.
 */
import { KeyProposal, KeyRequestAnswer, KeyRequestList, LinkRequestAnswer, type KeyDecisionInput, type KeyRequestInput } from '@shared/schemas/keyControlRequests';
import { toQuery } from './doors';
import { request } from './http';

export type { KeyCandidate, KeyProposal, KeyRequest, LinkRequestAnswer, OpenedDoor } from '@shared/schemas/keyControlRequests';
export type RequestStatus = 'pending' | 'approved' | 'refused';

export const proposeKey = (doorIds: string[], keyId?: string) => request('POST', '/api/key-requests/proposal', { body: keyId ? { doorIds, keyId } : { doorIds }, schema: KeyProposal });
/** Saved, then mailed to the department's authorisers. */
export const createRequest = async (input: KeyRequestInput) => (await request('POST', '/api/key-requests', { body: input, schema: KeyRequestAnswer })).request;
export const listRequests = async (status?: RequestStatus) => (await request('GET', `/api/key-requests${toQuery({ status })}`, { schema: KeyRequestList })).requests;
export const getRequest = async (id: string) => (await request('GET', `/api/key-requests/${id}`, { schema: KeyRequestAnswer })).request;
/** The approval e-mail again: each authoriser gets a new link; the links not used yet stop working. */
export const resendRequest = async (id: string) => (await request('POST', `/api/key-requests/${id}/resend`, { schema: KeyRequestAnswer })).request;
export const decideRequest = async (id: string, input: KeyDecisionInput) => (await request('POST', `/api/key-requests/${id}/decision`, { body: input, schema: KeyRequestAnswer })).request;

/** The authoriser's link: no sign-in, the token from the address's fragment. */
export const viewLink = (token: string) => request('POST', '/api/key-request-links/view', { body: { token }, schema: LinkRequestAnswer, auth: false });
export const decideLink = (token: string, input: KeyDecisionInput) => request('POST', '/api/key-request-links/decide', { body: { token, ...input }, schema: LinkRequestAnswer, auth: false });
