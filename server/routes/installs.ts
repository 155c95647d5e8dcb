import { Router } from 'express';
import { Id } from '../../shared/schemas/common';
import type { Ctx } from '../context';
import { actorOf, allow } from '../middleware/auth';
import { parse } from '../middleware/validate';
import { audit } from '../services/auditTrail';
import { markMismatchReviewed, openMismatches, reviewOf } from '../services/installs';

/** Installs into another door than the planned one (T4): the office lists them and a supervisor marks each reviewed. */
export function installsRouter({ db }: Ctx): Router {
  const r = Router();
  r.get('/installs/mismatches', allow('supervisor', 'admin'), async (_req, res) => {
    res.json({ mismatches: await openMismatches(db) });
  });
  r.post('/installs/:id/review', allow('supervisor', 'admin'), async (req, res) => {
    const id = parse(Id, req.params.id, 'The install id');
    await db.transaction(async (trx) => {
      if (await markMismatchReviewed(trx, id, req.user!.id)) await audit(trx, actorOf(req), 'install.mismatch-reviewed', { type: 'install', id });
    });
    res.json({ review: await reviewOf(db, id) });
  });
  return r;
}
