/** Accounts (admin): invitations, roles, deactivation; and the public set-password step of an invitation. */
import { PasswordSet, type InviteRequest, type SetPasswordRequest, type UserUpdate } from '@shared/schemas/auth';
import { Mailbox } from '@shared/schemas/devMailbox';
import { AdminUserAnswer, AdminUserList } from '@shared/schemas/users';
import { request } from './http';

export type { AdminUser } from '@shared/schemas/users';
export type { CapturedMail } from '@shared/schemas/devMailbox';

export const listUsers = async () => (await request('GET', '/api/users', { schema: AdminUserList })).users;
export const inviteUser = async (input: InviteRequest) => (await request('POST', '/api/users', { body: input, schema: AdminUserAnswer })).user;
export const updateUser = async (id: string, patch: UserUpdate) => (await request('PATCH', `/api/users/${id}`, { body: patch, schema: AdminUserAnswer })).user;
/** A new single-use link by e-mail; the earlier links stop working. */
export const resendInvitation = async (id: string) => (await request('POST', `/api/users/${id}/invitation`, { body: {}, schema: AdminUserAnswer })).user;
export const setPassword = (input: SetPasswordRequest) => request('POST', '/api/auth/set-password', { body: input, schema: PasswordSet, auth: false });

/** The development mailbox (absent in production): the local demo's invitations. */
export const devMailbox = async () => (await request('GET', '/api/dev/mailbox', { schema: Mailbox, auth: false })).messages;
