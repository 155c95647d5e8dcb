/** Departments and key holders: office roles only (holders' data is personal). */
import { Router } from 'express';
import { Id } from '../../shared/schemas/common';
import { DepartmentInput, HolderInput, HolderQuery, HolderUpdate } from '../../shared/schemas/keyControl';
import type { Ctx } from '../context';
import { badRequest } from '../errors';
import { actorOf, allow } from '../middleware/auth';
import { parse } from '../middleware/validate';
import { audit } from '../services/auditTrail';
import { importHolders } from '../services/csvImport';
import { keysToReturn } from '../services/keyIssues';
import { createDepartment, createHolders, getDepartment, getHolder, listDepartments, listHolders, updateHolder } from '../services/keyHolders';
import { upload } from '../middleware/upload';

const office = allow('supervisor', 'admin');

export function holdersRouter({ db }: Ctx): Router {
  const r = Router();
  r.get('/departments', office, async (_req, res) => {
    res.json({ departments: await listDepartments(db) });
  });
  r.post('/departments', office, async (req, res) => {
    const input = parse(DepartmentInput, req.body, 'The department');
    const id = await db.transaction(async (trx) => {
      const created = await createDepartment(trx, input);
      await audit(trx, actorOf(req), 'department.created', { type: 'department', id: created }, { authorisers: input.authorisers.length });
      return created;
    });
    res.status(201).json({ department: await getDepartment(db, id) });
  });

  r.get('/holders', office, async (req, res) => {
    res.json({ holders: await listHolders(db, parse(HolderQuery, req.query, 'The filter')) });
  });
  r.post('/holders', office, async (req, res) => {
    const input = parse(HolderInput, req.body, 'The key holder');
    const id = await db.transaction(async (trx) => {
      const [created] = await createHolders(trx, [input]);
      await audit(trx, actorOf(req), 'holder.created', { type: 'holder', id: created! });
      return created!;
    });
    res.status(201).json({ holder: await getHolder(db, id) });
  });
  r.post('/holders/import', office, upload.single('file'), async (req, res) => {
    if (!req.file) throw badRequest('Attach the CSV file as the form field "file".', [{ field: 'file', message: 'missing' }]);
    const commit = req.query.commit === '1';
    const result = await db.transaction(async (trx) => {
      const outcome = await importHolders(trx, req.file!.buffer, commit);
      if (outcome.committed) await audit(trx, actorOf(req), 'holders.imported', null, { count: outcome.created });
      return outcome;
    });
    res.status(result.errors.length ? 422 : 200).json(result);
  });
  r.get('/holders/:id', office, async (req, res) => {
    const id = parse(Id, req.params.id, 'The key holder id');
    res.json({ holder: await getHolder(db, id), keysToReturn: await keysToReturn(db, id) });
  });
  /** Marking someone leaving answers with every key they must return. */
  r.patch('/holders/:id', office, async (req, res) => {
    const id = parse(Id, req.params.id, 'The key holder id');
    const input = parse(HolderUpdate, req.body, 'The key holder');
    await db.transaction(async (trx) => {
      await updateHolder(trx, id, input);
      await audit(trx, actorOf(req), input.status && input.status !== 'active' ? `holder.${input.status}` : 'holder.updated', { type: 'holder', id }, { fields: Object.keys(input) });
    });
    res.json({ holder: await getHolder(db, id), keysToReturn: await keysToReturn(db, id) });
  });
  return r;
}
