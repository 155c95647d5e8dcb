/**
 * Development only: the local fake SMTP server's mailbox, so the demo's invitations can be
 * opened without a real mail server. Mounted only when `npm start` runs the fake SMTP
 * (CW_FAKE_SMTP=1) outside production, and answers only a caller on this machine as Express
 * sees it (req.ip under the app's `trust proxy`): a request a proxy relays for an outside
 * address gets 404, as if the route did not exist (ASVS 5 V13: no debug endpoints exposed).
 */
import { Router } from 'express';
import type { FakeSmtp } from '../dev/fakeSmtp';
import { HttpError } from '../errors';

/** Loopback in every spelling Node gives it: 127.0.0.0/8, ::1 and IPv4-mapped ::ffff:127.x. */
export function isLoopback(ip: string | undefined): boolean {
  if (!ip) return false;
  const v4 = ip.startsWith('::ffff:') ? ip.slice(7) : ip;
  return v4 === '::1' || /^127\.\d{1,3}\.\d{1,3}\.\d{1,3}$/.test(v4);
}

export function devRouter(smtp: FakeSmtp): Router {
  const r = Router();
  r.get('/dev/mailbox', (req, res) => {
    if (!isLoopback(req.ip)) throw new HttpError('not-found', `No API route ${req.method} ${req.path}.`);
    const to = typeof req.query.to === 'string' ? req.query.to.toLowerCase() : null;
    res.json({ messages: smtp.messages.filter((m) => !to || m.to.some((a) => a.toLowerCase() === to)).slice().reverse() });
  });
  return r;
}
