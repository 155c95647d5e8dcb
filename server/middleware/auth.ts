/**
 * Deny by default: every /api route after the public ones passes `requireAuth`, and each
 * router states which roles it serves with `allow(...)`.
 */
import type { NextFunction, Request, RequestHandler, Response } from 'express';
import type { Knex } from 'knex';
import type { Config } from '../config';
import type { Role } from '../../shared/schemas/auth';
import { forbidden, HttpError, unauthenticated } from '../errors';
import { DEVICE_REVOKED_MESSAGE } from '../services/devices';
import { sessionOf } from '../services/sessions';
import { verifyAccessToken } from '../services/tokens';
import type { Actor } from '../services/auditTrail';

export interface AuthedUser {
  id: string;
  email: string;
  name: string;
  role: Role;
  sessionId: string;
  /** The tablet this session signed in from, or null (a browser without the Bench). */
  deviceId: string | null;
}

declare module 'express-serve-static-core' {
  interface Request {
    user?: AuthedUser;
  }
}

export function requireAuth(db: Knex, config: Config): RequestHandler {
  return async (req: Request, _res: Response, next: NextFunction) => {
    const header = req.get('authorization') ?? '';
    const match = /^Bearer ([A-Za-z0-9._~+/=-]+)$/.exec(header);
    if (!match?.[1]) throw unauthenticated('Sign in to continue: this request carries no access token.');
    let claims;
    try {
      claims = await verifyAccessToken(config.jwtSecret, match[1]);
    } catch {
      throw unauthenticated('Your sign-in has expired or is not valid; sign in again.');
    }
    const row = await sessionOf(db, claims.sid, claims.sub);
    // A tablet revoked by an administrator is told so, so it wipes its packets.
    if (row?.revoked_reason === 'device-revoked' || row?.device_revoked_at) throw new HttpError('device-revoked', DEVICE_REVOKED_MESSAGE);
    if (!row || row.revoked_at || !row.active || new Date(row.expires_at) < new Date()) {
      throw unauthenticated('This session has ended; sign in again.');
    }
    // The role comes from the database, so a role change applies at once.
    req.user = { id: claims.sub, email: row.email, name: row.name, role: row.role, sessionId: claims.sid, deviceId: row.device_id ?? null };
    next();
  };
}

export function allow(...roles: Role[]): RequestHandler {
  return (req, _res, next) => {
    if (!req.user) throw unauthenticated();
    if (!roles.includes(req.user.role)) throw forbidden(`This needs the ${roles.join(' or ')} role; you are signed in as ${req.user.role}.`);
    next();
  };
}

export function actorOf(req: Request): Actor {
  return { id: req.user?.id ?? null, email: req.user?.email ?? null, ip: req.ip, userAgent: req.get('user-agent') };
}
