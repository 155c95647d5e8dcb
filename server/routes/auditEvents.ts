/** The audit trail (admin): its events as a page of the list, and the filtered trail as CSV (services/auditEvents.ts). */
import { stringify } from 'csv-stringify';
import { Router } from 'express';
import { AuditQuery } from '../../shared/schemas/auditEvents';
import type { Ctx } from '../context';
import { actorOf, allow } from '../middleware/auth';
import { parse } from '../middleware/validate';
import { auditEventsForExport, listAuditEvents } from '../services/auditEvents';
import { audit } from '../services/auditTrail';
import { neutraliseCell } from '../services/csvSafe';

export function auditEventsRouter({ db }: Ctx): Router {
  const r = Router();
  r.get('/audit-events', allow('admin'), async (req, res) => {
    res.json(await listAuditEvents(db, parse(AuditQuery, req.query, 'The filter')));
  });
  /** The filtered trail as CSV (at most 50,000 rows); the export is itself an audit event. */
  r.get('/audit-events.csv', allow('admin'), async (req, res) => {
    const { page: _p, pageSize: _s, ...q } = parse(AuditQuery, req.query, 'The filter');
    await audit(db, actorOf(req), 'audit.exported', null, { filter: { action: q.action, person: q.actorId, from: q.from, to: q.to } });
    res.set('Content-Type', 'text/csv; charset=utf-8');
    res.set('Content-Disposition', `attachment; filename="audit-trail-${new Date().toISOString().slice(0, 10)}.csv"`);
    const columns = ['at', 'actorName', 'actionName', 'target', 'summary', 'ip', 'action', 'id'];
    // RFC 4180: CRLF between records.
    const csv = stringify({ header: true, columns, record_delimiter: 'windows' });
    csv.pipe(res);
    for await (const row of auditEventsForExport(db, q)) {
      // A cell that a spreadsheet would run as a formula is shown as text instead (csvSafe.ts).
      const safe = Object.fromEntries(Object.entries(row).map(([k, v]) => [k, neutraliseCell(v)]));
      if (!csv.write(safe)) await new Promise((resolve) => csv.once('drain', resolve));
    }
    csv.end();
  });
  return r;
}
