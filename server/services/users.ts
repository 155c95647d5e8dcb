/** Accounts: invitations by e-mail with a one-time set-password link, role changes, deactivation. */
import { randomBytes } from 'node:crypto';
import type { Knex } from 'knex';
import type { AdminUser, Technician } from '../../shared/schemas/users';
import { isoOrNull } from './dates';
import type { InviteRequest, Role, UserUpdate } from '../../shared/schemas/auth';
import { badRequest, conflict, HttpError, notFound } from '../errors';
import { hashPassword } from './passwords';
import { revokeUserSessions } from './sessions';
import { sha256 } from './tokens';

const INVITE_HOURS = 72;

export async function listUsers(db: Knex, id?: string): Promise<AdminUser[]> {
  const q = db('users as u');
  if (id) q.where('u.id', id);
  const rows = await q
    .orderBy('u.email')
    .select('u.id', 'u.email', 'u.name', 'u.role', 'u.active', 'u.created_at as createdAt', db.raw('(u.password_hash is not null) as "hasPassword"'));
  return rows.map((u) => ({ ...u, createdAt: isoOrNull(u.createdAt)! }));
}

/** What sign-in checks: the password hash and whether the account is active. */
export async function userForSignIn(db: Knex, email: string): Promise<{ id: string; email: string; name: string; role: Role; password_hash: string | null; active: boolean } | undefined> {
  return db('users').where({ email }).first('id', 'email', 'name', 'role', 'password_hash', 'active');
}

/** A user's e-mail address, for mail about their work; undefined when there is no such user. */
export async function emailOf(db: Knex, id: string): Promise<{ email: string } | undefined> {
  return db('users').where({ id }).first('email');
}

/** Active technicians and supervisors, for assigning work orders. */
export async function listTechnicians(db: Knex): Promise<Technician[]> {
  return db('users').where({ active: true }).whereIn('role', ['technician', 'supervisor']).orderBy('name').select('id', 'name', 'email', 'role');
}

export async function inviteUser(db: Knex, input: InviteRequest, by: string): Promise<{ userId: string; token: string }> {
  return db.transaction(async (trx) => {
    if (await trx('users').where({ email: input.email }).first('id')) throw conflict(`${input.email} has an account already.`, [{ field: 'email', message: 'already has an account' }]);
    const [user] = await trx('users').insert({ email: input.email, name: input.name, role: input.role, password_hash: null }).returning('id');
    const token = randomBytes(32).toString('base64url');
    await trx('invitations').insert({ user_id: user.id, token_hash: sha256(token), expires_at: new Date(Date.now() + INVITE_HOURS * 3600_000), created_by: by });
    return { userId: user.id as string, token };
  });
}

/**
 * A new single-use link for someone who has not set a password yet; every earlier link of theirs
 * dies in the same transaction (marked expired), so only the newest mail works.
 */
export async function resendInvitation(db: Knex, userId: string, by: string): Promise<{ email: string; name: string; token: string }> {
  return db.transaction(async (trx) => {
    const user = await trx('users').where({ id: userId }).forUpdate().first('id', 'email', 'name', 'active', 'password_hash');
    if (!user) throw notFound('That user');
    if (!user.active) throw conflict(`${user.email} is deactivated; reactivate the account before inviting again.`, [{ field: 'active', message: 'deactivated' }]);
    if (user.password_hash) throw conflict(`${user.email} has set a password already; there is no invitation to resend.`, [{ field: 'hasPassword', message: 'password set' }]);
    await trx('invitations').where({ user_id: userId }).whereNull('used_at').update({ expires_at: trx.fn.now() });
    const token = randomBytes(32).toString('base64url');
    await trx('invitations').insert({ user_id: userId, token_hash: sha256(token), expires_at: new Date(Date.now() + INVITE_HOURS * 3600_000), created_by: by });
    return { email: user.email as string, name: user.name as string, token };
  });
}

export async function updateUser(db: Knex, id: string, input: UserUpdate, by: string): Promise<void> {
  if (id === by && (input.active === false || (input.role && input.role !== 'admin'))) throw badRequest('You cannot deactivate yourself or remove your own admin role; ask another administrator.');
  await db.transaction(async (trx) => {
    const user = await trx('users').where({ id }).forUpdate().first('id', 'role', 'active');
    if (!user) throw notFound('That user');
    const patch: Record<string, unknown> = { updated_at: trx.fn.now() };
    if (input.role !== undefined) patch.role = input.role;
    if (input.active !== undefined) patch.active = input.active;
    if (input.name !== undefined) patch.name = input.name;
    await trx('users').where({ id }).update(patch);
    if (input.active === false) await revokeUserSessions(trx, id, 'deactivated');
  });
}

/** `record` writes the audit row inside the same transaction, so an accepted link is never unaudited. */
export async function acceptInvitation(db: Knex, token: string, password: string, record?: (trx: Knex.Transaction, userId: string, email: string) => Promise<void>): Promise<{ userId: string; email: string }> {
  const hash = await hashPassword(password);
  return db.transaction(async (trx) => {
    const inv = await trx('invitations as i').join('users as u', 'u.id', 'i.user_id').where('i.token_hash', sha256(token)).forUpdate().first('i.id', 'i.expires_at', 'i.used_at', 'u.id as userId', 'u.email', 'u.active');
    if (!inv || inv.used_at || new Date(inv.expires_at) < new Date() || !inv.active) {
      throw new HttpError('unprocessable', 'This link has expired or was used already; ask your administrator for a new invitation.');
    }
    await trx('invitations').where({ id: inv.id }).update({ used_at: trx.fn.now() });
    await trx('users').where({ id: inv.userId }).update({ password_hash: hash, updated_at: trx.fn.now() });
    await record?.(trx, inv.userId, inv.email);
    return { userId: inv.userId, email: inv.email };
  });
}
