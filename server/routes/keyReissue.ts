/** Re-issue tasks (office roles), made when a lost key's rekey is installed and its report closes. */
import { Router } from 'express';
import { Id } from '../../shared/schemas/common';
import { ReissueInput, ReissueTaskQuery } from '../../shared/schemas/keyControlReissue';
import type { Ctx } from '../context';
import { actorOf, allow } from '../middleware/auth';
import { parse } from '../middleware/validate';
import { audit } from '../services/auditTrail';
import { getTask, listTasks, reissue } from '../services/keyReissue';

const office = allow('supervisor', 'admin');

export function keyReissueRouter({ db }: Ctx): Router {
  const r = Router();
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
