import { stringify } from 'csv-stringify';
import { Router } from 'express';
import { z } from 'zod';
import { CompletionQuery } from '../../shared/schemas/completions';
import { Id } from '../../shared/schemas/common';
import type { Ctx } from '../context';
import { actorOf, allow } from '../middleware/auth';
import { parse } from '../middleware/validate';
import { audit } from '../services/auditTrail';
import { neutraliseCell, safeQuoting } from '../services/csvSafe';
import { completionRowsForExport, getCompletion, listCompletions, revealPinSizes } from '../services/completions';

const Reveal = z.strictObject({ reveal: z.enum(['0', '1']).optional() });

export function completionsRouter({ db, sealer }: Ctx): Router {
  const r = Router();
  r.get('/completions', allow('supervisor', 'admin'), async (req, res) => {
    res.json(await listCompletions(db, parse(CompletionQuery, req.query, 'The filter')));
  });
  r.get('/completions.csv', allow('supervisor', 'admin'), async (req, res) => {
    const q = parse(CompletionQuery, req.query, 'The filter');
    await audit(db, actorOf(req), 'completions.exported', null, { filter: { ...q, page: undefined, pageSize: undefined } });
    res.set('Content-Type', 'text/csv; charset=utf-8');
    res.set('Content-Disposition', `attachment; filename="completion-log-${new Date().toISOString().slice(0, 10)}.csv"`);
    const columns = ['finishedAt', 'startedAt', 'receivedAt', 'coreTag', 'doorLabel', 'workOrderNumber', 'workOrderTitle', 'technicianName', 'result', 'attemptCount', 'failedChecks', 'installDoorLabel', 'installedAt', 'removedCoreTag', 'doorMismatch', 'id'];
    // RFC 4180: CRLF between records.
    const csv = stringify({ header: true, columns, record_delimiter: 'windows', cast: { object: (v) => JSON.stringify(v), boolean: (v) => (v ? 'yes' : 'no') }, ...safeQuoting });
    csv.pipe(res);
    for await (const row of completionRowsForExport(db, q)) {
      // A cell that a spreadsheet would run as a formula is shown as text instead (csvSafe.ts).
      const safe = Object.fromEntries(Object.entries(row).map(([k, v]) => [k, neutraliseCell(v)]));
      if (!csv.write(safe)) await new Promise((resolve) => csv.once('drain', resolve));
    }
    csv.end();
  });
  // Pin sizes rebuild bittings (T9): shown only on an explicit reveal, to the roles that may see bittings, and audited like them.
  r.get('/completions/:id', allow('supervisor', 'admin'), async (req, res) => {
    const id = parse(Id, req.params.id, 'The completion id');
    const { reveal } = parse(Reveal, req.query, 'The query');
    const completion = await getCompletion(db, id);
    if (reveal !== '1') return res.json({ completion });
    const attempts = await revealPinSizes(db, sealer, id);
    await audit(db, actorOf(req), 'bittings.viewed', { type: 'completion', id }, { what: 'pin-sizes' });
    res.json({ completion: { ...completion, attempts } });
  });
  return r;
}
