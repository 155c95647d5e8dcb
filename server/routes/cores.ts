import { Router } from 'express';
import { z } from 'zod';
import { Id, Text } from '../../shared/schemas/common';
import { CoreUpdate } from '../../shared/schemas/records';
import type { Ctx } from '../context';
import { notFound } from '../errors';
import { actorOf, allow } from '../middleware/auth';
import { parse } from '../middleware/validate';
import { audit } from '../services/audit';

const CoreFilter = z.strictObject({ keySystemId: Id.optional(), doorId: Id.optional(), state: Text(12, 'state').optional(), tag: Text(24, 'tag').optional() });

export function coresRouter({ db }: Ctx): Router {
  const r = Router();
  const query = () =>
    db('cores as c')
      .leftJoin('doors as d', 'd.id', 'c.door_id')
      .select(
        'c.id',
        'c.tag',
        'c.key_system_id as keySystemId',
        'c.door_id as doorId',
        'd.label as doorLabel',
        'c.state',
        'c.updated_at as updatedAt',
        db.raw(`coalesce((select array_agg(k.symbol order by k.level desc) from core_keys ck join keys k on k.id = ck.key_id where ck.core_id = c.id), '{}') as "operatingSymbols"`),
      );
  r.get('/cores', allow('supervisor', 'admin'), async (req, res) => {
    const f = parse(CoreFilter, req.query, 'The filter');
    const q = query().orderBy('c.tag').limit(2000);
    if (f.keySystemId) q.where('c.key_system_id', f.keySystemId);
    if (f.doorId) q.where('c.door_id', f.doorId);
    if (f.state) q.where('c.state', f.state);
    if (f.tag) q.where('c.tag', f.tag.toUpperCase());
    res.json({ cores: await q });
  });
  r.get('/cores/:id', allow('supervisor', 'admin'), async (req, res) => {
    const core = await query().where('c.id', parse(Id, req.params.id, 'The core id')).first();
    if (!core) throw notFound('That core');
    res.json({ core });
  });
  r.patch('/cores/:id', allow('supervisor', 'admin'), async (req, res) => {
    const id = parse(Id, req.params.id, 'The core id');
    const input = parse(CoreUpdate, req.body, 'The core');
    const patch: Record<string, unknown> = { updated_at: db.fn.now() };
    if (input.doorId !== undefined) patch.door_id = input.doorId;
    if (input.state) patch.state = input.state;
    await db.transaction(async (trx) => {
      const n = await trx('cores').where({ id }).update(patch);
      if (!n) throw notFound('That core');
      await audit(trx, actorOf(req), input.state === 'retired' ? 'core.retired' : 'core.updated', { type: 'core', id });
    });
    res.json({ core: await query().where('c.id', id).first() });
  });
  return r;
}
