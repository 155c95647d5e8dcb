import { Router } from 'express';
import { z } from 'zod';
import { Id } from '../../shared/schemas/common';
import { DoorInput, DoorUpdate } from '../../shared/schemas/records';
import type { Ctx } from '../context';
import { badRequest } from '../errors';
import { actorOf, allow } from '../middleware/auth';
import { parse } from '../middleware/validate';
import { audit } from '../services/audit';
import { importDoors } from '../services/csvImport';
import { createDoors, doorHistory, getDoor, listDoors, updateDoor } from '../services/doors';
import { upload } from './keySystems';

const DoorFilter = z.strictObject({
  q: z.string().trim().max(80).optional(),
  building: z.string().trim().max(80).optional(),
  fireRated: z.enum(['0', '1']).optional(),
  keySystemId: Id.optional(),
});

export function doorsRouter({ db }: Ctx): Router {
  const r = Router();
  r.get('/doors', allow('supervisor', 'admin'), async (req, res) => {
    const f = parse(DoorFilter, req.query, 'The filter');
    res.json({ doors: await listDoors(db, { ...f, fireRated: f.fireRated === undefined ? undefined : f.fireRated === '1' }) });
  });
  r.post('/doors', allow('admin'), async (req, res) => {
    const [id] = await createDoors(db, [parse(DoorInput, req.body, 'The door')]);
    await audit(db, actorOf(req), 'door.created', { type: 'door', id: id! });
    res.status(201).json({ door: await getDoor(db, id!) });
  });
  r.post('/doors/import', allow('admin'), upload.single('file'), async (req, res) => {
    if (!req.file) throw badRequest('Attach the CSV file as the form field "file".', [{ field: 'file', message: 'missing' }]);
    const result = await importDoors(db, req.file.buffer, req.query.commit === '1');
    if (result.committed) await audit(db, actorOf(req), 'doors.imported', null, { count: result.created });
    res.status(result.errors.length ? 422 : 200).json(result);
  });
  r.get('/doors/:id', allow('supervisor', 'admin'), async (req, res) => {
    res.json({ door: await getDoor(db, parse(Id, req.params.id, 'The door id')) });
  });
  r.patch('/doors/:id', allow('admin'), async (req, res) => {
    const id = parse(Id, req.params.id, 'The door id');
    await updateDoor(db, id, parse(DoorUpdate, req.body, 'The door'));
    await audit(db, actorOf(req), 'door.updated', { type: 'door', id });
    res.json({ door: await getDoor(db, id) });
  });
  r.get('/doors/:id/history', allow('supervisor', 'admin'), async (req, res) => {
    res.json({ history: await doorHistory(db, parse(Id, req.params.id, 'The door id')) });
  });
  return r;
}
