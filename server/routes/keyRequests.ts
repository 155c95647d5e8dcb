/**
 * Key requests: proposal (every key that opens the doors, the lowest first), request, decision
 * in the app. The authoriser's mailed link is served by keyRequestLinksRouter, before sign-in.
 */
import { Router } from 'express';
import { z } from 'zod';
import { Id } from '../../shared/schemas/common';
import { KeyDecisionInput, KeyProposalInput, KeyRequestInput, LinkDecision, LinkView } from '../../shared/schemas/keyControlRequests';
import type { Ctx } from '../context';
import { actorOf, allow } from '../middleware/auth';
import { parse } from '../middleware/validate';
import { audit } from '../services/auditTrail';
import { mails } from '../services/mail';
import { createRequest, decideByLink, decideInApp, getRequest, linkAnswer, listRequests, proposeKeys, resendLinks, viewByLink, type CreatedRequest } from '../services/keyRequests';

const office = allow('supervisor', 'admin');
const RequestQuery = z.strictObject({ status: z.enum(['pending', 'approved', 'refused'], { error: 'status is pending, approved or refused' }).optional() });

export function keyRequestsRouter({ db, sealer, mailer, config }: Ctx): Router {
  const r = Router();
  /** After the commit: each authoriser's link; the token rides in the link's fragment, so it never reaches a server log. */
  async function mailLinks(made: CreatedRequest, again = false) {
    const request = await getRequest(db, sealer, made.id);
    const beyond = request.opens.filter((o) => !o.requested).map((o) => o.doorLabel);
    for (const l of made.links) {
      await mailer.send({ to: l.email, ...mails.keyRequest({ authoriser: l.name, number: request.number, holder: request.holderName, department: request.department, reason: request.reason, symbol: request.keySymbol, doors: request.doors.map((d) => d.label), beyond, link: `${config.publicUrl}/authorise#${l.token}`, again }) });
    }
    return request;
  }
  /** Nothing saved: the proposal and every other key that would open all the doors. */
  r.post('/key-requests/proposal', office, async (req, res) => {
    const input = parse(KeyProposalInput, req.body, 'The doors');
    const { proposal, candidates } = await proposeKeys(db, sealer, input.doorIds, input.keyId);
    res.json({ proposal, candidates });
  });
  r.post('/key-requests', office, async (req, res) => {
    const input = parse(KeyRequestInput, req.body, 'The key request');
    const created = await db.transaction(async (trx) => {
      const made = await createRequest(trx, sealer, input, req.user!.id);
      await audit(trx, actorOf(req), 'key-request.created', { type: 'key-request', id: made.id }, { doors: input.doorIds.length, chosen: Boolean(input.keyId), authorisers: made.links.length });
      return made;
    });
    res.status(201).json({ request: await mailLinks(created) });
  });
  /** The approval e-mail again: each authoriser gets a new link; the links not used yet stop working. */
  r.post('/key-requests/:id/resend', office, async (req, res) => {
    const id = parse(Id, req.params.id, 'The key request id');
    const resent = await db.transaction(async (trx) => {
      const made = await resendLinks(trx, id);
      await audit(trx, actorOf(req), 'key-request.link-resent', { type: 'key-request', id }, { authorisers: made.links.length });
      return made;
    });
    res.json({ request: await mailLinks(resent, true) });
  });
  r.get('/key-requests', office, async (req, res) => {
    res.json({ requests: await listRequests(db, sealer, parse(RequestQuery, req.query, 'The filter').status) });
  });
  r.get('/key-requests/:id', office, async (req, res) => {
    res.json({ request: await getRequest(db, sealer, parse(Id, req.params.id, 'The key request id')) });
  });
  r.post('/key-requests/:id/decision', office, async (req, res) => {
    const id = parse(Id, req.params.id, 'The key request id');
    const input = parse(KeyDecisionInput, req.body, 'The decision');
    await db.transaction(async (trx) => {
      await decideInApp(trx, id, input, req.user!);
      await audit(trx, actorOf(req), 'key-request.decided', { type: 'key-request', id }, { decision: input.decision, by: 'supervisor' });
    });
    res.json({ request: await getRequest(db, sealer, id) });
  });
  return r;
}

/** Public: the authoriser's single-use, expiring link (no sign-in, no bitting). */
export function keyRequestLinksRouter({ db, sealer }: Ctx): Router {
  const r = Router();
  r.post('/key-request-links/view', async (req, res) => {
    res.json(await viewByLink(db, sealer, parse(LinkView, req.body, 'The link').token));
  });
  r.post('/key-request-links/decide', async (req, res) => {
    const { token, ...input } = parse(LinkDecision, req.body, 'The decision');
    const done = await db.transaction(async (trx) => {
      const d = await decideByLink(trx, token, input);
      await audit(trx, { id: null, email: d.email, ip: req.ip, userAgent: req.get('user-agent') }, 'key-request.decided', { type: 'key-request', id: d.requestId }, { decision: input.decision, by: 'authoriser link' });
      return d;
    });
    res.json(await linkAnswer(db, sealer, done.requestId, done));
  });
  return r;
}
