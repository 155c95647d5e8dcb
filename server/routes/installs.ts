import { Router } from 'express';
import { Id } from '../../shared/schemas/common';
import type { Ctx } from '../context';
import { badRequest, notFound } from '../errors';
import { actorOf, allow } from '../middleware/auth';
import { parse } from '../middleware/validate';
import { audit } from '../services/audit';
import { openMismatches } from '../services/installs';

/** Installs into another door than the planned one (T4): the office lists them and a supervisor marks each reviewed. */
export function installsRouter({ db }: Ctx): Router {
  const r = Router();
  r.get('/installs/mismatches', allow('supervisor', 'admin'), async (_req, res) => {
    res.json({ mismatches: await openMismatches(db) });
  });
  r.post('/installs/:id/review', allow('supervisor', 'admin'), async (req, res) => {
    const id = parse(Id, req.params.id, 'The install id');
    const row = (await db('installs').where({ id }).first('door_mismatch', 'reviewed_at')) as { door_mismatch: boolean; reviewed_at: Date | null } | undefined;
    if (!row) throw notFound('That install');
    if (!row.door_mismatch) throw badRequest('This install went into its planned door: there is nothing to review.');
    if (!row.reviewed_at) {
      await db.transaction(async (trx) => {
        await trx('installs').where({ id }).whereNull('reviewed_at').update({ reviewed_by: req.user!.id, reviewed_at: trx.fn.now() });
        await audit(trx, actorOf(req), 'install.mismatch-reviewed', { type: 'install', id });
      });
    }
    res.json({ review: await db('installs as i').leftJoin('users as u', 'u.id', 'i.reviewed_by').where('i.id', id).first('i.id', 'i.reviewed_at as reviewedAt', 'u.name as reviewedBy') });
  });
  return r;
}
