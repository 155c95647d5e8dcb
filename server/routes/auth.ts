import { Router, type Request, type Response } from 'express';
import { ipKeyGenerator } from 'express-rate-limit';
import type { Knex } from 'knex';
import type { Config } from '../config';
import { Email, RefreshRequest, SetPasswordRequest, SignInRequest } from '../../shared/schemas/auth';
import { acceptInvitation, userForSignIn } from '../services/users';
import { HttpError, unauthenticated } from '../errors';
import { parse } from '../middleware/validate';
import { actorOf, requireAuth } from '../middleware/auth';
import { audit, auditQuietly } from '../services/auditTrail';
import { sharedFailureLimiter } from '../services/failureLimiter';
import { verifyPassword } from '../services/passwords';
import { DEVICE_REVOKED_MESSAGE, isRevoked } from '../services/devices';
import { createSession, refreshSession, revokeSession } from '../services/sessions';

const SAME_MESSAGE = 'That e-mail and password do not match an active account.';

/** Answers that count as a failed attempt toward the lockout: wrong input, wrong password, a used link. */
const countsAsFailure = (err: unknown) => err instanceof HttpError && [400, 401, 403, 422].includes(err.status);

export function authRouter(db: Knex, config: Config): Router {
  const router = Router();
  const failures = sharedFailureLimiter(db, config.signInAttempts, config.signInWindowMs);
  // The raw e-mail is only a map key here; nothing unvalidated is ever written.
  const rawEmail = (req: Request) => (typeof req.body?.email === 'string' ? req.body.email.trim().toLowerCase().slice(0, 254) : '');
  const ipKey = (req: Request) => ipKeyGenerator(req.ip ?? '').slice(0, 64);
  const client = (req: Request) => ({ ip: req.ip, userAgent: req.get('user-agent') });

  /** 429 with Retry-After; the audit row takes the e-mail only when it is a valid address, and never fails the answer. */
  async function locked(req: Request, res: Response, seconds: number, action: string): Promise<void> {
    const email = Email.safeParse(req.body?.email);
    await auditQuietly(db, { id: null, email: email.success ? email.data : null, ...client(req) }, action, null, { seconds });
    res.set('Retry-After', String(seconds));
    res.status(429).json({ error: { code: 'rate-limited', message: `Too many failed attempts. Wait ${Math.ceil(seconds / 60)} minute(s) and try again.` } });
  }

  /** Runs an attempt under the failure lockout: only attempts that fail count toward it. */
  async function limited(key: string, req: Request, res: Response, lockedAction: string, attempt: () => Promise<void>): Promise<void> {
    const wait = await failures.lockedFor(key);
    if (wait) return locked(req, res, wait, lockedAction);
    try {
      await attempt();
    } catch (err) {
      if (countsAsFailure(err)) await failures.fail(key);
      throw err;
    }
    await failures.succeed(key);
  }

  router.post('/auth/sign-in', (req, res) =>
    limited(`sign-in|${ipKey(req)}|${rawEmail(req)}`, req, res, 'auth.sign-in.locked', async () => {
      const input = parse(SignInRequest, req.body, 'The sign-in');
      const user = await userForSignIn(db, input.email);
      const ok = await verifyPassword(input.password, user?.password_hash);
      if (!user || !ok || !user.active) {
        await audit(db, { id: user?.id ?? null, email: input.email, ...client(req) }, 'auth.sign-in.failed');
        throw unauthenticated(SAME_MESSAGE);
      }
      // A revoked tablet stays revoked: signing in again with its device id is refused (T7).
      if (input.deviceId && (await isRevoked(db, input.deviceId))) {
        await audit(db, { id: user.id, email: user.email, ...client(req) }, 'auth.sign-in.device-revoked', { type: 'device', id: input.deviceId });
        throw new HttpError('device-revoked', DEVICE_REVOKED_MESSAGE);
      }
      const sessionUser = { id: user.id, email: user.email, name: user.name, role: user.role };
      const tokens = await db.transaction(async (trx) => {
        const issued = await createSession(trx, config, sessionUser, { deviceId: input.deviceId, ...client(req) });
        await audit(trx, { id: user.id, email: user.email, ...client(req) }, 'auth.sign-in', { type: 'user', id: user.id }, input.deviceId ? { deviceId: input.deviceId } : {});
        return issued;
      });
      res.json({ ...tokens, user: sessionUser });
    }),
  );

  router.post('/auth/refresh', async (req, res) => {
    const input = parse(RefreshRequest, req.body, 'The refresh');
    const outcome = await refreshSession(db, config, input.refreshToken);
    if (!outcome.ok) {
      if (outcome.reason === 'reused') await auditQuietly(db, { id: outcome.userId ?? null, email: null, ...client(req) }, 'auth.refresh.reused', outcome.sessionId ? { type: 'session', id: outcome.sessionId } : null);
      if (outcome.reason === 'device-revoked') throw new HttpError('device-revoked', DEVICE_REVOKED_MESSAGE);
      throw new HttpError('unauthenticated', 'Your sign-in has ended; sign in again.');
    }
    res.json({ ...outcome.tokens, user: outcome.user });
  });

  /** The one-time link from an invitation: choose a password. */
  router.post('/auth/set-password', (req, res) =>
    limited(`set-password|${ipKey(req)}`, req, res, 'user.password-set.locked', async () => {
      const input = parse(SetPasswordRequest, req.body, 'The new password');
      const { email } = await acceptInvitation(db, input.token, input.password, (trx, userId, mail) => audit(trx, { id: userId, email: mail, ...client(req) }, 'user.password-set', { type: 'user', id: userId }));
      res.json({ email });
    }),
  );

  router.post('/auth/sign-out', requireAuth(db, config), async (req, res) => {
    await db.transaction(async (trx) => {
      await revokeSession(trx, req.user!.sessionId, 'sign-out');
      await audit(trx, actorOf(req), 'auth.sign-out', { type: 'user', id: req.user!.id });
    });
    res.status(204).end();
  });

  router.get('/auth/me', requireAuth(db, config), (req, res) => {
    const { sessionId: _sid, deviceId: _did, ...user } = req.user!;
    res.json({ user });
  });
  return router;
}
