/** Key copies issued, returned and chased; the cut list (bittings: office roles only, every view audited). */
import { ControlKeyList, CutList, KeyIssueAnswer, KeyIssueList, OutstandingKeys, type KeyIssueInput, type KeyIssueQuery, type KeyTransferInput } from '@shared/schemas/keyControl';
import { toQuery } from './doors';
import { request } from './http';

export type { ControlKey, KeyIssue, KeyIssueAnswer, OutstandingKeys } from '@shared/schemas/keyControl';
export type Receipt = KeyIssueAnswer['issue'];
export type CutListEntry = CutList['cutList'][number];

export const listIssues = async (filter: KeyIssueQuery = {}) => (await request('GET', `/api/key-issues${toQuery({ ...filter })}`, { schema: KeyIssueList })).issues;
export const issueKey = async (input: KeyIssueInput) => (await request('POST', '/api/key-issues', { body: input, schema: KeyIssueAnswer })).issue;
/** The receipt: the issue with the drawn signature; never a bitting. */
export const getIssue = async (id: string) => (await request('GET', `/api/key-issues/${id}`, { schema: KeyIssueAnswer })).issue;
export const returnKey = async (id: string, note?: string) => (await request('POST', `/api/key-issues/${id}/return`, { body: note ? { note } : {}, schema: KeyIssueAnswer })).issue;
/** The copy passes to another holder with its copy number; answers the new record. */
export const transferKey = async (id: string, input: KeyTransferInput) => (await request('POST', `/api/key-issues/${id}/transfer`, { body: input, schema: KeyIssueAnswer })).issue;
/** A system's control keys as key control tracks them (symbol, status, copies out; never a bitting). */
export const listControlKeys = async (systemId: string) => (await request('GET', `/api/key-systems/${systemId}/control-keys`, { schema: ControlKeyList })).controlKeys;
/** Copies out past their due date, or held by someone leaving or gone. */
export const outstandingKeys = async () => (await request('GET', '/api/key-issues/outstanding', { schema: OutstandingKeys })).issues;
/** Restricted: each call is an audited view of bittings. */
export const cutList = async (issueIds: string[]) => (await request('GET', `/api/key-issues/cut-list${toQuery({ issueIds: issueIds.join(',') })}`, { schema: CutList })).cutList;
