/**
 * Sign-in sessions. Each refresh rotates the secret; presenting an old secret again is
 * treated as theft and ends the session. Access tokens name their session, and the auth
 * middleware checks it on every request, so sign-out or a disabled account ends access at once.
 */
import type { Knex } from 'knex';
import type { Config } from '../config';
import type { Role } from '../../shared/schemas/auth';
import { newRefreshSecret, sha256, signAccessToken } from './tokens';

export interface SessionUser {
  id: string;
  email: string;
  name: string;
  role: Role;
}

export interface IssuedTokens {
  accessToken: string;
  refreshToken: string;
  expiresIn: number;
}

async function issue(config: Config, user: SessionUser, sessionId: string, secret: string): Promise<IssuedTokens> {
  const accessToken = await signAccessToken(config.jwtSecret, { sub: user.id, sid: sessionId, role: user.role }, config.accessTokenSeconds);
  return { accessToken, refreshToken: `${sessionId}.${secret}`, expiresIn: config.accessTokenSeconds };
}

export async function createSession(
  db: Knex,
  config: Config,
  user: SessionUser,
  meta: { deviceId?: string | undefined; userAgent?: string | undefined; ip?: string | undefined },
): Promise<IssuedTokens> {
  const secret = newRefreshSecret();
  const [row] = await db('sessions')
    .insert({
      user_id: user.id,
      refresh_hash: sha256(secret),
      device_id: meta.deviceId ?? null,
      user_agent: meta.userAgent?.slice(0, 300) ?? null,
      ip: meta.ip?.slice(0, 64) ?? null,
      expires_at: new Date(Date.now() + config.refreshTokenSeconds * 1000),
    })
    .returning('id');
  return issue(config, user, (row as { id: string }).id, secret);
}

export type RefreshOutcome = { ok: true; user: SessionUser; tokens: IssuedTokens } | { ok: false; reason: 'unknown' | 'expired' | 'revoked' | 'device-revoked' | 'reused' | 'inactive' };

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

export async function refreshSession(db: Knex, config: Config, refreshToken: string): Promise<RefreshOutcome> {
  const [sessionId, secret] = refreshToken.split('.');
  if (!sessionId || !secret || !UUID.test(sessionId)) return { ok: false, reason: 'unknown' };
  return db.transaction(async (trx) => {
    const row = await trx('sessions as s')
      .join('users as u', 'u.id', 's.user_id')
      .where('s.id', sessionId)
      .forUpdate()
      .first('s.id', 's.refresh_hash', 's.expires_at', 's.revoked_at', 's.revoked_reason', 'u.id as user_id', 'u.email', 'u.name', 'u.role', 'u.active');
    if (!row) return { ok: false, reason: 'unknown' } as const;
    if (row.revoked_at) return { ok: false, reason: row.revoked_reason === 'device-revoked' ? 'device-revoked' : 'revoked' } as const;
    if (!row.active) return { ok: false, reason: 'inactive' } as const;
    if (new Date(row.expires_at) < new Date()) return { ok: false, reason: 'expired' } as const;
    if (row.refresh_hash !== sha256(secret)) {
      await trx('sessions').where('id', sessionId).update({ revoked_at: trx.fn.now(), revoked_reason: 'refresh-reused' });
      return { ok: false, reason: 'reused' } as const;
    }
    const next = newRefreshSecret();
    await trx('sessions')
      .where('id', sessionId)
      .update({ refresh_hash: sha256(next), refreshed_at: trx.fn.now(), expires_at: new Date(Date.now() + config.refreshTokenSeconds * 1000) });
    const user: SessionUser = { id: row.user_id, email: row.email, name: row.name, role: row.role };
    return { ok: true, user, tokens: await issue(config, user, sessionId, next) } as const;
  });
}

export async function revokeSession(db: Knex, sessionId: string, reason: string): Promise<void> {
  await db('sessions').where({ id: sessionId }).whereNull('revoked_at').update({ revoked_at: db.fn.now(), revoked_reason: reason });
}

export async function revokeUserSessions(db: Knex, userId: string, reason: string): Promise<number> {
  return db('sessions').where({ user_id: userId }).whereNull('revoked_at').update({ revoked_at: db.fn.now(), revoked_reason: reason });
}
