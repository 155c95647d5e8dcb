/**
 * Sign-in sessions, each bound to the tablet it signed in from (when it named one). Each
 * refresh rotates the secret; presenting a rotated-out secret after its short grace window
 * is treated as theft and ends the session. Access tokens name their session, and the auth
 * middleware checks it on every request, so sign-out or a disabled account ends access at once.
 */
import { hkdfSync } from 'node:crypto';
import type { Knex } from 'knex';
import type { Config } from '../config';
import type { Role } from '../../shared/schemas/auth';
import { createSealer } from './secrets';
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

export type RefreshFailure = 'unknown' | 'expired' | 'revoked' | 'device-revoked' | 'reused' | 'inactive';
export type RefreshOutcome = { ok: true; user: SessionUser; tokens: IssuedTokens } | { ok: false; reason: RefreshFailure; sessionId?: string; userId?: string };

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/**
 * The pair a rotation issued, sealed under a key derived from the secret it replaced: only a
 * caller holding that old secret can open it, and nothing usable sits in the row at rest.
 */
function graceSealer(oldSecret: string, sessionId: string) {
  return createSealer(Buffer.from(hkdfSync('sha256', oldSecret, sessionId, 'corewright refresh grace', 32)));
}

/**
 * Rotates the refresh secret. The secret just rotated out gets the same new pair again for
 * `refreshGraceSeconds` (parallel tabs, a retried request); after that, or for any older
 * rotated secret, it is reuse and ends the session (RFC 9700 4.14.2). A secret this session
 * never had is only refused: a wrong guess must not sign the user out.
 */
export async function refreshSession(db: Knex, config: Config, refreshToken: string): Promise<RefreshOutcome> {
  const [sessionId, secret, extra] = refreshToken.split('.');
  if (!sessionId || !secret || extra !== undefined || !UUID.test(sessionId)) return { ok: false, reason: 'unknown' };
  return db.transaction(async (trx) => {
    const row = await trx('sessions as s')
      .join('users as u', 'u.id', 's.user_id')
      .leftJoin('devices as d', 'd.id', 's.device_id')
      .where('s.id', sessionId)
      .forUpdate('s')
      .first('s.id', 's.refresh_hash', 's.previous_hash', 's.previous_until', 's.grace_enc', 's.expires_at', 's.revoked_at', 's.revoked_reason', 'd.revoked_at as device_revoked_at', 'u.id as user_id', 'u.email', 'u.name', 'u.role', 'u.active');
    if (!row) return { ok: false, reason: 'unknown' } as const;
    const fail = (reason: RefreshFailure) => ({ ok: false, reason, sessionId, userId: row.user_id as string }) as const;
    if (row.revoked_at) return fail(row.revoked_reason === 'device-revoked' ? 'device-revoked' : 'revoked');
    if (row.device_revoked_at) {
      await trx('sessions').where('id', sessionId).update({ revoked_at: trx.fn.now(), revoked_reason: 'device-revoked' });
      return fail('device-revoked');
    }
    if (!row.active) return fail('inactive');
    if (new Date(row.expires_at) < new Date()) return fail('expired');
    const user: SessionUser = { id: row.user_id, email: row.email, name: row.name, role: row.role };
    const hash = sha256(secret);
    if (hash === row.previous_hash && row.grace_enc && new Date(row.previous_until) > new Date()) {
      const tokens = JSON.parse(graceSealer(secret, sessionId).open(row.grace_enc, `refresh-grace:${sessionId}`)) as IssuedTokens;
      return { ok: true, user, tokens } as const;
    }
    if (hash !== row.refresh_hash) {
      const rotatedOut = hash === row.previous_hash || (await trx('session_rotated_secrets').where({ hash, session_id: sessionId }).first('hash'));
      if (!rotatedOut) return fail('unknown');
      await trx('sessions').where('id', sessionId).update({ revoked_at: trx.fn.now(), revoked_reason: 'refresh-reused' });
      return fail('reused');
    }
    const next = newRefreshSecret();
    const tokens = await issue(config, user, sessionId, next);
    await trx('session_rotated_secrets').insert({ hash, session_id: sessionId }).onConflict('hash').ignore();
    await trx('sessions')
      .where('id', sessionId)
      .update({
        refresh_hash: sha256(next),
        previous_hash: hash,
        previous_until: new Date(Date.now() + config.refreshGraceSeconds * 1000),
        grace_enc: graceSealer(secret, sessionId).seal(JSON.stringify(tokens), `refresh-grace:${sessionId}`),
        refreshed_at: trx.fn.now(),
        expires_at: new Date(Date.now() + config.refreshTokenSeconds * 1000),
      });
    return { ok: true, user, tokens } as const;
  });
}

/** A session with its user and device as every request checks them (middleware/auth.ts); undefined when there is none. */
export async function sessionOf(db: Knex, sessionId: string, userId: string): Promise<SessionCheck | undefined> {
  return db('sessions as s')
    .join('users as u', 'u.id', 's.user_id')
    .leftJoin('devices as d', 'd.id', 's.device_id')
    .where({ 's.id': sessionId, 'u.id': userId })
    .first('s.revoked_at', 's.revoked_reason', 's.expires_at', 's.device_id', 'd.revoked_at as device_revoked_at', 'u.active', 'u.email', 'u.name', 'u.role');
}

export interface SessionCheck {
  revoked_at: Date | null;
  revoked_reason: string | null;
  expires_at: Date;
  device_id: string | null;
  device_revoked_at: Date | null;
  active: boolean;
  email: string;
  name: string;
  role: Role;
}

export async function revokeSession(db: Knex, sessionId: string, reason: string): Promise<void> {
  await db('sessions').where({ id: sessionId }).whereNull('revoked_at').update({ revoked_at: db.fn.now(), revoked_reason: reason });
}

export async function revokeUserSessions(db: Knex, userId: string, reason: string): Promise<number> {
  return db('sessions').where({ user_id: userId }).whereNull('revoked_at').update({ revoked_at: db.fn.now(), revoked_reason: reason });
}
