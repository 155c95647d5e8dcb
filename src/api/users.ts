/** Accounts (admin): invitations, roles, deactivation; and the public set-password step of an invitation. */
import { z } from 'zod';
import { Role, type InviteRequest, type SetPasswordRequest, type UserUpdate } from '@shared/schemas/auth';
import { request } from './http';

export const AdminUser = z.object({
  id: z.uuid(),
  email: z.string(),
  name: z.string(),
  role: Role,
  active: z.boolean(),
  createdAt: z.string(),
  hasPassword: z.boolean(),
});
export type AdminUser = z.infer<typeof AdminUser>;
const One = z.object({ user: AdminUser });

export const listUsers = async () => (await request('GET', '/api/users', { schema: z.object({ users: z.array(AdminUser) }) })).users;
export const inviteUser = async (input: InviteRequest) => (await request('POST', '/api/users', { body: input, schema: One })).user;
export const updateUser = async (id: string, patch: UserUpdate) => (await request('PATCH', `/api/users/${id}`, { body: patch, schema: One })).user;
/** A new single-use link by e-mail; the earlier links stop working. */
export const resendInvitation = async (id: string) => (await request('POST', `/api/users/${id}/invitation`, { body: {}, schema: One })).user;
export const setPassword = (input: SetPasswordRequest) => request('POST', '/api/auth/set-password', { body: input, schema: z.object({ email: z.string() }), auth: false });

/** The development mailbox (absent in production): the local demo's invitations. */
export const CapturedMail = z.object({ id: z.number(), to: z.array(z.string()), from: z.string(), subject: z.string(), text: z.string(), receivedAt: z.string() });
export type CapturedMail = z.infer<typeof CapturedMail>;
export const devMailbox = async () => (await request('GET', '/api/dev/mailbox', { schema: z.object({ messages: z.array(CapturedMail) }), auth: false })).messages;
