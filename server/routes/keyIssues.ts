/**
 * Key copies issued, returned, passed on and chased; the cut list (bittings) for supervisors and admins, audited.
 * A system's control key is issued like any key, by the same roles (supervisors and administrators).
 */
import { Router } from 'express';
import { Id } from '../../shared/schemas/common';
import { CutListQuery, KeyIssueInput, KeyIssueQuery, KeyReturnInput, KeyTransferInput } from '../../shared/schemas/keyControl';
import type { Ctx } from '../context';
import { actorOf, allow } from '../middleware/auth';
import { parse } from '../middleware/validate';
import { audit } from '../services/auditTrail';
import { listControlKeys } from '../services/controlKeys';
import { cutList, getIssue, issueKey, listIssues, outstandingKeys, returnKey, transferKey } from '../services/keyIssues';

const office = allow('supervisor', 'admin');

export function keyIssuesRouter({ db, sealer }: Ctx): Router {
  const r = Router();
  /** A system's control keys as key control tracks them (symbol, status, copies out; never a bitting). */
  r.get('/key-systems/:id/control-keys', office, async (req, res) => {
    res.json({ controlKeys: await listControlKeys(db, parse(Id, req.params.id, 'The key system id')) });
  });
  r.get('/key-issues', office, async (req, res) => {
    res.json({ issues: await listIssues(db, parse(KeyIssueQuery, req.query, 'The filter')) });
  });
  r.post('/key-issues', office, async (req, res) => {
    const input = parse(KeyIssueInput, req.body, 'The key issue');
    const id = await db.transaction(async (trx) => {
      const created = await issueKey(trx, input, req.user!.id);
      const control = await trx('key_issues').where({ id: created }).whereNotNull('control_key_id').first('id');
      await audit(trx, actorOf(req), 'key.issued', { type: 'key-issue', id: created }, { signed: Boolean(input.acknowledgement.signature), ...(control ? { control: true } : {}) });
      return created;
    });
    res.status(201).json({ issue: await getIssue(db, id) });
  });
  /** Copies out past their due date or held by someone leaving or gone. */
  r.get('/key-issues/outstanding', office, async (_req, res) => {
    res.json({ issues: await outstandingKeys(db) });
  });
  r.get('/key-issues/cut-list', office, async (req, res) => {
    const { issueIds } = parse(CutListQuery, req.query, 'The cut list');
    const list = await cutList(db, sealer, issueIds);
    await audit(db, actorOf(req), 'bittings.viewed', null, { what: 'cut-list', issues: issueIds.length, keys: list.length });
    res.json({ cutList: list });
  });
  /** The receipt: symbol and copy number, never a bitting; with the drawn signature. */
  r.get('/key-issues/:id', office, async (req, res) => {
    res.json({ issue: await getIssue(db, parse(Id, req.params.id, 'The key issue id'), true) });
  });
  r.post('/key-issues/:id/return', office, async (req, res) => {
    const id = parse(Id, req.params.id, 'The key issue id');
    const input = parse(KeyReturnInput, req.body, 'The return');
    await db.transaction(async (trx) => {
      await returnKey(trx, id, req.user!.id);
      await audit(trx, actorOf(req), 'key.returned', { type: 'key-issue', id }, input.note ? { note: input.note } : {});
    });
    res.json({ issue: await getIssue(db, id) });
  });
  /** The copy passes to another holder with its copy number: authorised and acknowledged as an issue; answers the new record. */
  r.post('/key-issues/:id/transfer', office, async (req, res) => {
    const id = parse(Id, req.params.id, 'The key issue id');
    const input = parse(KeyTransferInput, req.body, 'The transfer');
    const created = await db.transaction(async (trx) => {
      const done = await transferKey(trx, id, input, req.user!.id);
      await audit(trx, actorOf(req), 'key.transferred', { type: 'key-issue', id: done.id }, { copy: done.copy, from: done.from, to: input.holderId, request: done.request, signed: Boolean(input.acknowledgement.signature) });
      return done.id;
    });
    res.status(201).json({ issue: await getIssue(db, created) });
  });
  return r;
}
