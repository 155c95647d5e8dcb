import { Router } from 'express';
import { z } from 'zod';
import { Id, Text } from '../../shared/schemas/common';
import { DoorInput, DoorUpdate } from '../../shared/schemas/records';
import type { Ctx } from '../context';
import { badRequest } from '../errors';
import { actorOf, allow } from '../middleware/auth';
import { upload } from '../middleware/upload';
import { parse } from '../middleware/validate';
import { audit } from '../services/auditTrail';
import { importDoors } from '../services/csvImport';
import { createDoors, doorHistory, getDoor, listDoors, updateDoor } from '../services/doors';

const DoorFilter = z.strictObject({
  q: Text(80, 'q').optional(),
  building: Text(80, 'building').optional(),
  fireRated: z.enum(['0', '1']).optional(),
  keySystemId: Id.optional(),
  retired: z.enum(['only', 'all'], { error: 'retired is only or all' }).optional(),
});

export function doorsRouter({ db }: Ctx): Router {
  const r = Router();
  r.get('/doors', allow('supervisor', 'admin'), async (req, res) => {
    const f = parse(DoorFilter, req.query, 'The filter');
    res.json({ doors: await listDoors(db, { ...f, fireRated: f.fireRated === undefined ? undefined : f.fireRated === '1' }) });
  });
  r.post('/doors', allow('admin'), async (req, res) => {
    const input = parse(DoorInput, req.body, 'The door');
    const id = await db.transaction(async (trx) => {
      const [created] = await createDoors(trx, [input]);
      await audit(trx, actorOf(req), 'door.created', { type: 'door', id: created! });
      return created;
    });
    res.status(201).json({ door: await getDoor(db, id!) });
  });
  r.post('/doors/import', allow('admin'), upload.single('file'), async (req, res) => {
    if (!req.file) throw badRequest('Attach the CSV file as the form field "file".', [{ field: 'file', message: 'missing' }]);
    const commit = req.query.commit === '1';
    const result = await db.transaction(async (trx) => {
      const outcome = await importDoors(trx, req.file!.buffer, commit);
      if (outcome.committed) await audit(trx, actorOf(req), 'doors.imported', null, { count: outcome.created });
      return outcome;
    });
    res.status(result.errors.length ? 422 : 200).json(result);
  });
  r.get('/doors/:id', allow('supervisor', 'admin'), async (req, res) => {
    res.json({ door: await getDoor(db, parse(Id, req.params.id, 'The door id')) });
  });
  r.patch('/doors/:id', allow('admin'), async (req, res) => {
    const id = parse(Id, req.params.id, 'The door id');
    const input = parse(DoorUpdate, req.body, 'The door');
    await db.transaction(async (trx) => {
      const change = await updateDoor(trx, id, input);
      const action = input.retired === true ? 'door.retired' : input.retired === false ? 'door.restored' : 'door.updated';
      await audit(trx, actorOf(req), action, { type: 'door', id }, { fields: Object.keys(input).filter((k) => k !== 'retired'), ...(change.retiredCoreTag ? { retiredCore: change.retiredCoreTag } : {}) });
    });
    res.json({ door: await getDoor(db, id) });
  });
  r.get('/doors/:id/history', allow('supervisor', 'admin'), async (req, res) => {
    res.json({ history: await doorHistory(db, parse(Id, req.params.id, 'The door id')) });
  });
  return r;
}
