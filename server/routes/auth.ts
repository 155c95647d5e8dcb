import { Router, type Request } from 'express';
import { ipKeyGenerator, rateLimit, type RateLimitInfo } from 'express-rate-limit';
import type { Knex } from 'knex';
import type { Config } from '../config';
import { RefreshRequest, SetPasswordRequest, SignInRequest } from '../../shared/schemas/auth';
import { acceptInvitation } from '../services/users';
import { HttpError, unauthenticated } from '../errors';
import { parse } from '../middleware/validate';
import { actorOf, requireAuth } from '../middleware/auth';
import { audit } from '../services/audit';
import { verifyPassword } from '../services/passwords';
import { createSession, refreshSession, revokeSession } from '../services/sessions';

const SAME_MESSAGE = 'That e-mail and password do not match an active account.';

export function authRouter(db: Knex, config: Config): Router {
  const router = Router();
  const emailOf = (req: Request) => (typeof req.body?.email === 'string' ? req.body.email.trim().toLowerCase() : '');
  const limiter = rateLimit({
    windowMs: config.signInWindowMs,
    limit: config.signInAttempts,
    skipSuccessfulRequests: true,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    keyGenerator: (req) => `${ipKeyGenerator(req.ip ?? '')}|${emailOf(req)}`,
    handler: (req, res) => {
      const reset = (req as Request & { rateLimit?: RateLimitInfo }).rateLimit?.resetTime?.getTime() ?? Date.now() + config.signInWindowMs;
      const seconds = Math.max(1, Math.ceil((reset - Date.now()) / 1000));
      res.set('Retry-After', String(seconds));
      void audit(db, { id: null, email: emailOf(req) || null, ip: req.ip, userAgent: req.get('user-agent') }, 'auth.sign-in.locked', null, { seconds });
      res.status(429).json({ error: { code: 'rate-limited', message: `Too many failed sign-ins. Wait ${Math.ceil(seconds / 60)} minute(s) and try again.` } });
    },
  });

  router.post('/auth/sign-in', limiter, async (req, res) => {
    const input = parse(SignInRequest, req.body, 'The sign-in');
    const user = await db('users').where({ email: input.email }).first('id', 'email', 'name', 'role', 'password_hash', 'active');
    const ok = await verifyPassword(input.password, user?.password_hash);
    if (!user || !ok || !user.active) {
      await audit(db, { id: user?.id ?? null, email: input.email, ip: req.ip, userAgent: req.get('user-agent') }, 'auth.sign-in.failed');
      throw unauthenticated(SAME_MESSAGE);
    }
    const sessionUser = { id: user.id, email: user.email, name: user.name, role: user.role };
    const tokens = await createSession(db, config, sessionUser, { deviceId: input.deviceId, userAgent: req.get('user-agent'), ip: req.ip });
    await audit(db, { id: user.id, email: user.email, ip: req.ip, userAgent: req.get('user-agent') }, 'auth.sign-in', { type: 'user', id: user.id });
    res.json({ ...tokens, user: sessionUser });
  });

  router.post('/auth/refresh', async (req, res) => {
    const input = parse(RefreshRequest, req.body, 'The refresh');
    const outcome = await refreshSession(db, config, input.refreshToken);
    if (!outcome.ok) {
      if (outcome.reason === 'reused') await audit(db, { id: null, email: null, ip: req.ip }, 'auth.refresh.reused');
      if (outcome.reason === 'device-revoked') throw new HttpError('device-revoked', 'This tablet was revoked by an administrator; its packets are wiped. Finished work stays in its outbox.');
      throw new HttpError('unauthenticated', 'Your sign-in has ended; sign in again.');
    }
    res.json({ ...outcome.tokens, user: outcome.user });
  });

  /** The one-time link from an invitation: choose a password. */
  router.post('/auth/set-password', limiter, async (req, res) => {
    const input = parse(SetPasswordRequest, req.body, 'The new password');
    const { userId, email } = await acceptInvitation(db, input.token, input.password);
    await audit(db, { id: userId, email, ip: req.ip, userAgent: req.get('user-agent') }, 'user.password-set', { type: 'user', id: userId });
    res.json({ email });
  });

  router.post('/auth/sign-out', requireAuth(db, config), async (req, res) => {
    await revokeSession(db, req.user!.sessionId, 'sign-out');
    await audit(db, actorOf(req), 'auth.sign-out', { type: 'user', id: req.user!.id });
    res.status(204).end();
  });

  router.get('/auth/me', requireAuth(db, config), (req, res) => {
    const { sessionId: _sid, ...user } = req.user!;
    res.json({ user });
  });
  return router;
}
