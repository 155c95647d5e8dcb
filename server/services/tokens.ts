/**
 * Access tokens: short-lived JWTs (HS256, typ at+jwt, fixed issuer and audience; RFC 8725).
 * Refresh tokens are opaque (`<session id>.<random>`); only their SHA-256 is stored.
 */
import { createHash, randomBytes } from 'node:crypto';
import { SignJWT, jwtVerify } from 'jose';
import type { Role } from '../../shared/schemas/auth';

export const ISSUER = 'corewright';
export const AUDIENCE = 'corewright-api';
export const ACCESS_TYP = 'at+jwt';

export interface AccessClaims {
  sub: string;
  sid: string;
  role: Role;
}

export async function signAccessToken(secret: Uint8Array, claims: AccessClaims, seconds: number): Promise<string> {
  return new SignJWT({ sid: claims.sid, role: claims.role })
    .setProtectedHeader({ alg: 'HS256', typ: ACCESS_TYP })
    .setIssuer(ISSUER)
    .setAudience(AUDIENCE)
    .setSubject(claims.sub)
    .setIssuedAt()
    .setNotBefore('0s')
    .setExpirationTime(`${seconds}s`)
    .sign(secret);
}

/** Throws on any defect: signature, algorithm, typ, issuer, audience, exp, nbf. */
export async function verifyAccessToken(secret: Uint8Array, token: string): Promise<AccessClaims> {
  const { payload } = await jwtVerify(token, secret, { algorithms: ['HS256'], issuer: ISSUER, audience: AUDIENCE, typ: ACCESS_TYP, requiredClaims: ['sub', 'exp', 'iat'] });
  if (typeof payload.sid !== 'string' || typeof payload.role !== 'string' || typeof payload.sub !== 'string') throw new Error('missing claims');
  return { sub: payload.sub, sid: payload.sid, role: payload.role as Role };
}

export function newRefreshSecret(): string {
  return randomBytes(32).toString('base64url');
}

export function sha256(text: string): string {
  return createHash('sha256').update(text).digest('hex');
}
