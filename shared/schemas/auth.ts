import { z } from 'zod';
import { Name } from './common';

export const Role = z.enum(['technician', 'supervisor', 'admin']);
export type Role = z.infer<typeof Role>;

export const Email = z
  .string({ error: 'enter an e-mail address' })
  .trim()
  .toLowerCase()
  .max(254, { error: 'an e-mail address has at most 254 characters' })
  .pipe(z.email({ error: 'enter a valid e-mail address, like name@example.test' }));

export const SignInRequest = z.strictObject({
  email: Email,
  password: z.string({ error: 'enter your password' }).min(1, { error: 'enter your password' }).max(200, { error: 'a password has at most 200 characters' }),
  deviceId: z.uuid({ error: 'deviceId must be a UUID' }).optional(),
});
export type SignInRequest = z.infer<typeof SignInRequest>;

export const RefreshRequest = z.strictObject({
  refreshToken: z.string({ error: 'send the refresh token' }).min(20, { error: 'the refresh token is too short' }).max(300, { error: 'the refresh token is too long' }),
});
export type RefreshRequest = z.infer<typeof RefreshRequest>;

export const User = z.object({
  id: z.uuid(),
  email: z.string(),
  name: z.string(),
  role: Role,
});
export type User = z.infer<typeof User>;

export const SignInResponse = z.object({
  accessToken: z.string(),
  refreshToken: z.string(),
  expiresIn: z.number(),
  user: User,
});
export type SignInResponse = z.infer<typeof SignInResponse>;
/** Who is signed in (GET /api/auth/me). */
export const Me = z.object({ user: User });
export type Me = z.infer<typeof Me>;
/** The address whose password was just set from an invitation link. */
export const PasswordSet = z.object({ email: z.string() });
export type PasswordSet = z.infer<typeof PasswordSet>;

export const Health = z.object({
  status: z.enum(['ok', 'degraded']),
  version: z.string(),
  time: z.string(),
  database: z.object({ state: z.enum(['up', 'down']), latencyMs: z.number().nullable(), migrations: z.enum(['current', 'pending', 'unknown']) }),
});
export type Health = z.infer<typeof Health>;

/** Lowest role first: what each role may see in the navigation. */
export const roleRank: Record<Role, number> = { technician: 0, supervisor: 1, admin: 2 };

export const NewPassword = z
  .string({ error: 'choose a password' })
  .min(12, { error: 'a password has at least 12 characters; a short phrase of three or four words works well' })
  .max(200, { error: 'a password has at most 200 characters' });

export const InviteRequest = z.strictObject({
  email: Email,
  name: Name(120, 'the name'),
  role: Role,
});
export type InviteRequest = z.infer<typeof InviteRequest>;

export const UserUpdate = z.strictObject({
  role: Role.optional(),
  active: z.boolean().optional(),
  name: Name(120, 'the name').optional(),
});
export type UserUpdate = z.infer<typeof UserUpdate>;

export const SetPasswordRequest = z.strictObject({
  token: z.string({ error: 'the link is incomplete' }).min(20, { error: 'the link is incomplete' }).max(200),
  password: NewPassword,
});
export type SetPasswordRequest = z.infer<typeof SetPasswordRequest>;
