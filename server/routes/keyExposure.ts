/**
 * Exposure and access through the engine: what a key opens (intended, incidental, control),
 * who can open a door, what a holder can open, and lost or stolen reports. Office roles only.
 */
import { Router } from 'express';
import { z } from 'zod';
import { Id } from '../../shared/schemas/common';
import { KeyReportCloseInput, KeyReportInput } from '../../shared/schemas/keyControlExposure';
import type { Ctx } from '../context';
import { actorOf, allow } from '../middleware/auth';
import { parse } from '../middleware/validate';
import { audit } from '../services/auditTrail';
import { controlExposureOf, doorAccess, holderAccess, keyExposureOf } from '../services/keyExposure';
import { closeControlReportAccepting } from '../services/controlRekey';
import { closeReportAccepting } from '../services/keyCloseout';
import { getReport, listReports, reportKey } from '../services/keyReports';
import { planToWorkOrder, rekeyPlan } from '../services/rekeyPlans';
import { RekeyWorkOrderInput } from '../../shared/schemas/keyControlRekey';

const office = allow('supervisor', 'admin');
const ReportQuery = z.strictObject({ status: z.enum(['open', 'closed'], { error: 'status is open or closed' }).optional() });

export function keyExposureRouter({ db, sealer }: Ctx): Router {
  const r = Router();
  r.get('/keys/:id/exposure', office, async (req, res) => {
    res.json({ exposure: await keyExposureOf(db, sealer, parse(Id, req.params.id, 'The key id')) });
  });
  r.get('/key-systems/:id/control-exposure', office, async (req, res) => {
    res.json({ exposure: await controlExposureOf(db, sealer, parse(Id, req.params.id, 'The key system id')) });
  });
  r.get('/doors/:id/access', office, async (req, res) => {
    res.json(await doorAccess(db, sealer, parse(Id, req.params.id, 'The door id')));
  });
  r.get('/holders/:id/access', office, async (req, res) => {
    res.json(await holderAccess(db, sealer, parse(Id, req.params.id, 'The key holder id')));
  });
  r.post('/key-issues/:id/report', office, async (req, res) => {
    const id = parse(Id, req.params.id, 'The key issue id');
    const input = parse(KeyReportInput, req.body, 'The report');
    const reportId = await db.transaction(async (trx) => {
      const created = await reportKey(trx, sealer, id, input, req.user!.id);
      await audit(trx, actorOf(req), 'key.reported', { type: 'key-report', id: created }, { kind: input.kind, issue: id });
      return created;
    });
    res.json({ report: await getReport(db, reportId) });
  });
  r.get('/key-reports', office, async (req, res) => {
    res.json({ reports: await listReports(db, parse(ReportQuery, req.query, 'The filter').status) });
  });
  r.get('/key-reports/:id', office, async (req, res) => {
    res.json({ report: await getReport(db, parse(Id, req.params.id, 'The key report id')) });
  });
  /** What it takes to restore control: the new key (never its bitting), cores to re-pin, keys to re-issue. */
  r.get('/key-reports/:id/plan', office, async (req, res) => {
    res.json({ plan: await rekeyPlan(db, sealer, parse(Id, req.params.id, 'The key report id')) });
  });
  /** One step: the new change key in the lost one's place and a work order for the Bench. */
  r.post('/key-reports/:id/work-order', office, async (req, res) => {
    const id = parse(Id, req.params.id, 'The key report id');
    const input = parse(RekeyWorkOrderInput, req.body, 'The work order');
    const done = await db.transaction(async (trx) => {
      const made = await planToWorkOrder(trx, sealer, id, input, req.user!.id);
      await audit(trx, actorOf(req), 'key-report.work-order', { type: 'key-report', id }, { workOrder: made.workOrderId, newKey: made.newKeySymbol });
      return made;
    });
    res.status(201).json({ ...done, plan: await rekeyPlan(db, sealer, id) });
  });
  /** Closes a rebuilt report whose old key still turns some cores: the supervisor accepts them, with a note. */
  r.post('/key-reports/:id/close', office, async (req, res) => {
    const id = parse(Id, req.params.id, 'The key report id');
    const input = parse(KeyReportCloseInput, req.body, 'The close');
    await db.transaction(async (trx) => {
      // A lost control key's report has its own close-out (controlRekey.ts); a key's goes through keyCloseout.ts.
      if (!(await closeControlReportAccepting(trx, sealer, id, input.note, actorOf(req)))) await closeReportAccepting(trx, sealer, id, input.note, actorOf(req));
    });
    res.json({ report: await getReport(db, id) });
  });
  return r;
}
