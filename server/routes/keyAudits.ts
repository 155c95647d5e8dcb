/**
 * Key audits (office roles) and the holder's mailed link (public: the single-use token is the
 * credential; no bitting). The paths before the rename (`/key-campaigns`, `/key-campaign-links`)
 * answer 308 to these: the method and body are kept, and the new route decides who may.
 */
import { Router, type Request, type Response } from 'express';
import { Id } from '../../shared/schemas/common';
import { KeyAuditConfirm, KeyAuditLinkView, KeyAuditInput } from '../../shared/schemas/keyControlKeyAudits';
import type { Ctx } from '../context';
import { actorOf, allow } from '../middleware/auth';
import { parse } from '../middleware/validate';
import { audit } from '../services/auditTrail';
import { closeKeyAudit, confirmByLink, getKeyAudit, listKeyAudits, remindNow, resendLink, startKeyAudit, viewKeyAuditLink } from '../services/keyAudits';
import { mails } from '../services/mail';
import { sendPending } from '../services/notifier';

const office = allow('supervisor', 'admin');

/** `/api/key-campaigns[/:id]` → `/api/key-audits[/:id]`, `/api/key-campaign-links/...` → `/api/key-audit-links/...`, the query kept. */
function movedToKeyAudits(req: Request, res: Response): void {
  if (req.params.id !== undefined) parse(Id, req.params.id, 'The key audit id');
  res.redirect(308, req.originalUrl.replace(/^\/api\/key-campaign(s|-links)(?=[/?]|$)/, (_m, tail: string) => `/api/key-audit${tail}`));
}

export function keyAuditsRouter({ db, mailer, config }: Ctx): Router {
  const r = Router();
  r.post('/key-audits', office, async (req, res) => {
    const input = parse(KeyAuditInput, req.body, 'The key audit');
    const started = await db.transaction(async (trx) => {
      const made = await startKeyAudit(trx, input, req.user!.id);
      // The action and target type keep their stored names (key-campaign), so older rows keep their meaning.
      await audit(trx, actorOf(req), 'key-campaign.started', { type: 'key-campaign', id: made.id }, { holders: made.links.length });
      return made;
    });
    // After the commit; the token rides in the link's fragment, so it never reaches a server log.
    const expires = started.expiresAt.toISOString().slice(0, 10);
    for (const l of started.links) await mailer.send({ to: l.email, ...mails.keyAudit({ holder: l.name, number: started.number, title: started.title, copies: l.copies, expires, link: `${config.publicUrl}/confirm-keys#${l.token}` }) });
    res.status(201).json({ keyAudit: await getKeyAudit(db, started.id) });
  });
  r.get('/key-audits', office, async (_req, res) => {
    res.json({ keyAudits: await listKeyAudits(db) });
  });
  r.get('/key-audits/:id', office, async (req, res) => {
    res.json({ keyAudit: await getKeyAudit(db, parse(Id, req.params.id, 'The key audit id')) });
  });
  /** Reminds every holder not answered, at once (each gets a new link; the mail goes through the owed-mail queue). */
  r.post('/key-audits/:id/reminders', office, async (req, res) => {
    const id = parse(Id, req.params.id, 'The key audit id');
    await db.transaction(async (trx) => {
      const done = await remindNow(trx, id, req.user!.id);
      await audit(trx, actorOf(req), 'key-audit.reminded', { type: 'key-campaign', id }, { holders: done.holders });
    });
    // After the commit, now rather than at the next minute; each row is sent under its lock, so never twice. A failure
    // here leaves the reminders queued for the owed-mail job and does not turn the committed change into an error.
    await sendPending({ db, mailer, config }).catch(() => 0);
    res.json({ keyAudit: await getKeyAudit(db, id) });
  });
  /** Sends one holder their link again: a new single-use link; the old one answers that a newer e-mail replaced it. */
  r.post('/key-audits/:id/holders/:holderId/resend', office, async (req, res) => {
    const id = parse(Id, req.params.id, 'The key audit id');
    const holderId = parse(Id, req.params.holderId, 'The key holder id');
    const sent = await db.transaction(async (trx) => {
      const done = await resendLink(trx, config, id, holderId);
      await audit(trx, actorOf(req), 'key-audit.link-resent', { type: 'key-campaign', id }, { holder: done.name });
      return done;
    });
    await mailer.send(sent.mail);
    res.json({ keyAudit: await getKeyAudit(db, id) });
  });
  r.post('/key-audits/:id/close', office, async (req, res) => {
    const id = parse(Id, req.params.id, 'The key audit id');
    await db.transaction(async (trx) => {
      const done = await closeKeyAudit(trx, id, req.user!.id);
      await audit(trx, actorOf(req), 'key-audit.closed', { type: 'key-campaign', id }, { unanswered: done.unanswered });
    });
    res.json({ keyAudit: await getKeyAudit(db, id) });
  });
  r.get('/key-campaigns', movedToKeyAudits);
  r.post('/key-campaigns', movedToKeyAudits);
  r.get('/key-campaigns/:id', movedToKeyAudits);
  return r;
}

/** Public: the holder's single-use, expiring link. */
export function keyAuditLinksRouter({ db, sealer }: Ctx): Router {
  const r = Router();
  r.post('/key-audit-links/view', async (req, res) => {
    res.json(await viewKeyAuditLink(db, parse(KeyAuditLinkView, req.body, 'The link').token));
  });
  r.post('/key-audit-links/confirm', async (req, res) => {
    const input = parse(KeyAuditConfirm, req.body, 'The answer');
    const done = await db.transaction(async (trx) => {
      const d = await confirmByLink(trx, sealer, input);
      const actor = { id: null, email: null, ip: req.ip, userAgent: req.get('user-agent') };
      await audit(trx, actor, 'key-campaign.answered', null, { holder: d.name, missing: d.reports.length });
      for (const id of d.reports) await audit(trx, actor, 'key.reported', { type: 'key-report', id }, { kind: 'lost', by: 'holder in a key audit' });
      return d;
    });
    res.json(done.answer);
  });
  r.post('/key-campaign-links/view', movedToKeyAudits);
  r.post('/key-campaign-links/confirm', movedToKeyAudits);
  return r;
}
