/**
 * Development only: the local fake SMTP server's mailbox, so the demo's invitations can be
 * opened without a real mail server. Mounted only outside production, answers only loopback.
 */
import { Router } from 'express';
import type { FakeSmtp } from '../dev/fakeSmtp';
import { forbidden } from '../errors';

export function devRouter(smtp: FakeSmtp): Router {
  const r = Router();
  r.get('/dev/mailbox', (req, res) => {
    if (!['127.0.0.1', '::1', '::ffff:127.0.0.1'].includes(req.socket.remoteAddress ?? '')) throw forbidden('The development mailbox answers only on this machine.');
    const to = typeof req.query.to === 'string' ? req.query.to.toLowerCase() : null;
    res.json({ messages: smtp.messages.filter((m) => !to || m.to.some((a) => a.toLowerCase() === to)).slice().reverse() });
  });
  return r;
}
