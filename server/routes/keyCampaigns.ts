/**
 * Key audit campaigns (office roles) and the holder's mailed link (public: the single-use token is
 * the credential; no bitting). Re-issue tasks after a lost key's rekey closes its report.
 */
import { Router } from 'express';
import { Id } from '../../shared/schemas/common';
import { CampaignConfirm, CampaignLinkView, KeyCampaignInput } from '../../shared/schemas/keyControlCampaigns';
import { ReissueInput, ReissueTaskQuery } from '../../shared/schemas/keyControlReissue';
import type { Ctx } from '../context';
import { actorOf, allow } from '../middleware/auth';
import { parse } from '../middleware/validate';
import { audit } from '../services/auditTrail';
import { confirmByLink, getCampaign, listCampaigns, startCampaign, viewCampaignLink } from '../services/keyCampaigns';
import { getTask, listTasks, reissue } from '../services/keyReissue';
import { mails } from '../services/mail';

const office = allow('supervisor', 'admin');

export function keyCampaignsRouter({ db, mailer, config }: Ctx): Router {
  const r = Router();
  r.post('/key-campaigns', office, async (req, res) => {
    const input = parse(KeyCampaignInput, req.body, 'The campaign');
    const started = await db.transaction(async (trx) => {
      const made = await startCampaign(trx, input, req.user!.id);
      await audit(trx, actorOf(req), 'key-campaign.started', { type: 'key-campaign', id: made.id }, { holders: made.links.length });
      return made;
    });
    // After the commit; the token rides in the link's fragment, so it never reaches a server log.
    const expires = started.expiresAt.toISOString().slice(0, 10);
    for (const l of started.links) await mailer.send({ to: l.email, ...mails.keyCampaign({ holder: l.name, number: started.number, title: started.title, copies: l.copies, expires, link: `${config.publicUrl}/confirm-keys#${l.token}` }) });
    res.status(201).json({ campaign: await getCampaign(db, started.id) });
  });
  r.get('/key-campaigns', office, async (_req, res) => {
    res.json({ campaigns: await listCampaigns(db) });
  });
  r.get('/key-campaigns/:id', office, async (req, res) => {
    res.json({ campaign: await getCampaign(db, parse(Id, req.params.id, 'The campaign id')) });
  });
  r.get('/key-reissue-tasks', office, async (req, res) => {
    res.json({ tasks: await listTasks(db, parse(ReissueTaskQuery, req.query, 'The filter').status) });
  });
  /** Closes the task by issuing the new key (next copy number) with the holder's acknowledgement. */
  r.post('/key-reissue-tasks/:id/issue', office, async (req, res) => {
    const id = parse(Id, req.params.id, 'The re-issue task id');
    const input = parse(ReissueInput, req.body, 'The re-issue');
    await db.transaction(async (trx) => {
      const issueId = await reissue(trx, id, input, req.user!.id);
      await audit(trx, actorOf(req), 'key.reissued', { type: 'key-issue', id: issueId }, { task: id, signed: Boolean(input.acknowledgement.signature) });
    });
    res.json({ task: await getTask(db, id) });
  });
  return r;
}

/** Public: the holder's single-use, expiring link. */
export function keyCampaignLinksRouter({ db, sealer }: Ctx): Router {
  const r = Router();
  r.post('/key-campaign-links/view', async (req, res) => {
    res.json(await viewCampaignLink(db, parse(CampaignLinkView, req.body, 'The link').token));
  });
  r.post('/key-campaign-links/confirm', async (req, res) => {
    const input = parse(CampaignConfirm, req.body, 'The answer');
    const done = await db.transaction(async (trx) => {
      const d = await confirmByLink(trx, sealer, input);
      const actor = { id: null, email: null, ip: req.ip, userAgent: req.get('user-agent') };
      await audit(trx, actor, 'key-campaign.answered', null, { holder: d.name, missing: d.reports.length });
      for (const id of d.reports) await audit(trx, actor, 'key.reported', { type: 'key-report', id }, { kind: 'lost', by: 'holder in a key audit campaign' });
      return d;
    });
    res.json(done.answer);
  });
  return r;
}
