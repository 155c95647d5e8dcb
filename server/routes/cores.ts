import { Router } from 'express';
import { z } from 'zod';
import { Id, Text } from '../../shared/schemas/common';
import { CoreUpdate } from '../../shared/schemas/records';
import type { Ctx } from '../context';
import { actorOf, allow } from '../middleware/auth';
import { parse } from '../middleware/validate';
import { audit } from '../services/auditTrail';
import { getCore, listCores, updateCore } from '../services/cores';

const CoreFilter = z.strictObject({ keySystemId: Id.optional(), doorId: Id.optional(), state: Text(12, 'state').optional(), tag: Text(24, 'tag').optional() });

export function coresRouter({ db }: Ctx): Router {
  const r = Router();
  r.get('/cores', allow('supervisor', 'admin'), async (req, res) => {
    res.json({ cores: await listCores(db, parse(CoreFilter, req.query, 'The filter')) });
  });
  r.get('/cores/:id', allow('supervisor', 'admin'), async (req, res) => {
    res.json({ core: await getCore(db, parse(Id, req.params.id, 'The core id')) });
  });
  r.patch('/cores/:id', allow('supervisor', 'admin'), async (req, res) => {
    const id = parse(Id, req.params.id, 'The core id');
    const input = parse(CoreUpdate, req.body, 'The core');
    await db.transaction(async (trx) => {
      await updateCore(trx, id, input);
      await audit(trx, actorOf(req), input.state === 'retired' ? 'core.retired' : 'core.updated', { type: 'core', id });
    });
    res.json({ core: await getCore(db, id) });
  });
  return r;
}
