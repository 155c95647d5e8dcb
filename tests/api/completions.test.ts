// The completion log: filters, sorting, server-side paging, the CSV export and one completion's
// detail. Cases A-3 and A7 of ../shared/design/reliability.md; RFC 4180 for the CSV; OWASP
// "CSV Injection" for cells that a spreadsheet would run as formulas.
import { randomUUID } from 'node:crypto';
import { parse as parseCsv } from 'csv-parse/sync';
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import type { Packet } from '../../shared/schemas/packet';
import { completionFor } from './factories';
import { countRows, startHarness, type Harness } from './harness';

interface Row {
  id: string;
  coreId: string;
  coreTag: string;
  doorId: string | null;
  doorLabel: string | null;
  workOrderId: string | null;
  workOrderNumber: number | null;
  workOrderTitle: string | null;
  technicianId: string;
  technicianName: string;
  startedAt: string;
  finishedAt: string;
  receivedAt: string;
  result: 'passed' | 'failed';
  attemptCount: number;
  failedChecks: number;
}

const FORMULA_TITLE = '=HYPERLINK("http://example.test/x","open")';
let h: Harness;
let lead: string;
let tech: string;
let techId: string;
let bench2Id: string;
let historyWoId: string;
let myWoId: string;
const deviceId = randomUUID();
/** Three completions the demo technician lands by sync, on fixed days in 2020 (noon UTC, far from the demo's week). */
const mine = { c1: randomUUID(), c2: randomUUID(), c3: randomUUID() };
let myDoorIds: string[] = [];

beforeAll(async () => {
  h = await startHarness({}, { demo: true });
  [lead, tech] = await Promise.all([h.tokenFor('supervisor'), h.tokenFor('technician')]);
  const ids = Object.fromEntries((await h.db('users').select('email', 'id')).map((u: { email: string; id: string }) => [u.email, u.id]));
  techId = ids['tech@demo.corewright.test']!;
  bench2Id = ids['bench2@demo.corewright.test']!;
  historyWoId = (await h.db('work_orders').where({ status: 'done' }).first('id')).id;
  const doors = await h.db('doors').whereIn('label', ['AH-101', 'AH-102', 'AH-103']).orderBy('label').select('id', 'key_id', 'key_system_id');
  myDoorIds = doors.map((d) => d.id);
  const wo = await h.call('POST', '/api/work-orders', {
    token: lead,
    body: { title: FORMULA_TITLE, purpose: 'maintenance', keySystemId: doors[0].key_system_id, assigneeId: techId, doors: doors.map((d) => ({ doorId: d.id, keyId: d.key_id })) },
  });
  if (wo.status !== 201) throw new Error(`work order: ${wo.status} ${wo.text}`);
  myWoId = wo.json.workOrder.id;
  // The work order was planned before the 2020 work (the server refuses work dated before its work order: T5).
  await h.db('work_orders').where({ id: myWoId }).update({ created_at: '2020-03-01T08:00:00Z' });
  const packet = (await h.call('GET', `/api/work-orders/${myWoId}/packet`, { token: tech })).json.packet as Packet;
  // Each record ends at noon UTC of its day (the factory's completion ends 16 minutes after it starts).
  const on = (day: number) => new Date(`2020-03-${day}T11:44:00.000Z`);
  const records = [
    { ...completionFor(myWoId, packet.cores[0]!, { at: on(10) }), clientId: mine.c1 },
    { ...completionFor(myWoId, packet.cores[1]!, { at: on(11), result: 'failed' }), clientId: mine.c2, notes: 'Plug bound at chamber 3; set aside.' },
    { ...completionFor(myWoId, packet.cores[2]!, { at: on(12) }), clientId: mine.c3 },
  ];
  const sync = await h.call('POST', '/api/sync', { token: tech, body: { deviceId, records } });
  if (sync.status !== 200 || sync.json.accepted.length !== 3) throw new Error(`sync: ${sync.status} ${sync.text}`);
});
afterAll(async () => h.close());

async function page(query: string): Promise<{ rows: Row[]; total: number; page: number; pageSize: number }> {
  const res = await h.call('GET', `/api/completions${query}`, { token: lead });
  expect(res.status, res.text).toBe(200);
  return res.json;
}
const all = async (extra = '') => (await page(`?pageSize=200${extra}`)).rows;
const fieldsOf = (res: { json: { error: { details?: { field?: string }[] } } }) => (res.json.error.details ?? []).map((d) => d.field);

describe('whole-day filters in the viewer\'s time zone (tz = Date.getTimezoneOffset(), ECMA-262)', () => {
  test('a core finished at 23:30 UTC is "tomorrow" for a viewer at UTC+1 and "today" at UTC', async () => {
    const row = await h.db('completions').orderBy('finished_at', 'desc').first('id');
    await h.db('completions').where({ id: row.id }).update({ finished_at: '2026-06-14T23:30:00Z', started_at: '2026-06-14T23:10:00Z' });
    const ids = async (q: string) => ((await h.call('GET', `/api/completions?${q}`, { token: lead })).json.rows as { id: string }[]).map((r) => r.id);
    expect(await ids('from=2026-06-14&to=2026-06-14')).toContain(row.id);
    expect(await ids('from=2026-06-14&to=2026-06-14&tz=-60')).not.toContain(row.id);
    expect(await ids('from=2026-06-15&to=2026-06-15&tz=-60')).toContain(row.id);
    expect(await ids('from=2026-06-15&to=2026-06-15')).not.toContain(row.id);
    const bad = await h.call('GET', '/api/completions?tz=2000', { token: lead });
    expect(bad.status).toBe(400);
    expect(bad.json.error.details[0].field).toBe('tz');
  });
});

describe('GET /api/completions: filters', () => {
  test('without a filter: the 14 demo completions and the 3 synced here, newest first, 25 a page (the seed; shared/schemas/completions.ts defaults)', async () => {
    const p = await page('');
    expect(p).toMatchObject({ total: 17, page: 1, pageSize: 25 });
    expect(p.rows).toHaveLength(17);
    expect(p.rows.map((r) => r.finishedAt)).toEqual(p.rows.map((r) => r.finishedAt).sort().reverse());
  });

  test('workOrderId, technicianId, doorId, coreId and result each narrow the log (the seed and the rows synced here)', async () => {
    const byWo = await all(`&workOrderId=${historyWoId}`);
    expect(byWo).toHaveLength(14); // the seed: 14 Birchwood Library cores, each built once
    expect(byWo.every((r) => r.workOrderId === historyWoId && r.technicianName === 'Jordan Bench (demo)' && r.doorLabel!.startsWith('BL-'))).toBe(true);
    expect((await all(`&workOrderId=${myWoId}`)).map((r) => r.id).sort()).toEqual(Object.values(mine).sort());

    expect((await all(`&technicianId=${bench2Id}`)).every((r) => r.technicianId === bench2Id)).toBe(true);
    expect(await all(`&technicianId=${bench2Id}`)).toHaveLength(14);
    expect((await all(`&technicianId=${techId}`)).map((r) => r.technicianName)).toEqual(['Robin Tech (demo)', 'Robin Tech (demo)', 'Robin Tech (demo)']);

    const door = await all(`&doorId=${myDoorIds[1]}`);
    expect(door.map((r) => [r.id, r.doorLabel])).toEqual([[mine.c2, 'AH-102']]);
    expect((await all(`&coreId=${door[0]!.coreId}`)).map((r) => r.id)).toEqual([mine.c2]);

    const failed = await all('&result=failed');
    expect(failed.map((r) => [r.id, r.result, r.failedChecks])).toEqual([[mine.c2, 'failed', 1]]);
    expect(await all('&result=passed')).toHaveLength(16);
    expect((await all(`&technicianId=${techId}&result=passed`)).map((r) => r.id).sort()).toEqual([mine.c1, mine.c3].sort());
  });

  test('from and to are whole days, both inclusive (common practice for date filters)', async () => {
    expect((await all('&from=2020-03-11&to=2020-03-11')).map((r) => r.id)).toEqual([mine.c2]);
    expect((await all('&to=2020-03-11')).map((r) => r.id).sort()).toEqual([mine.c1, mine.c2].sort());
    expect(await all('&from=2020-03-11')).toHaveLength(16);
    expect(await all('&from=2020-03-13&to=2020-12-31')).toHaveLength(0);
  });

  test.each([
    ['pageSize=500', 'pageSize', /at most 200/],
    ['pageSize=0', 'pageSize', /./],
    ['page=0', 'page', /starts at 1/],
    ['sort=nope', 'sort', /sort is one of finishedAt/],
    ['order=up', 'order', /./],
    ['from=yesterday', 'from', /date like 2026-12-01/],
    ['to=2020-02-30', 'to', /date like/],
    ['result=maybe', 'result', /./],
    ['technicianId=42', 'technicianId', /UUID/],
  ])('a bad filter %s is a 400 naming %s (A7)', async (query, field, message) => {
    const res = await h.call('GET', `/api/completions?${query}`, { token: lead });
    expect(res.status).toBe(400);
    expect(res.json.error.code).toBe('validation');
    expect(fieldsOf(res)).toEqual([field]);
    expect(res.json.error.details[0].message).toMatch(message);
  });

  test('an unknown filter is refused, not ignored (A5 spirit: strict input)', async () => {
    const res = await h.call('GET', '/api/completions?technician=Robin', { token: lead });
    expect(res.status).toBe(400);
    expect(res.json.error.message).toMatch(/remove "technician"/);
  });

  test.each([['/api/completions'], ['/api/completions.csv'], ['/api/completions/{id}']])('a technician gets 403 on %s (A-3, ASVS 5 V8)', async (path) => {
    const res = await h.call('GET', path.replace('{id}', mine.c1), { token: tech });
    expect(res.status).toBe(403);
    expect(res.json.error.code).toBe('forbidden');
  });
});

describe('GET /api/completions: sorting and paging', () => {
  const keyOf: Record<string, (r: Row) => string | number> = {
    finishedAt: (r) => r.finishedAt,
    startedAt: (r) => r.startedAt,
    technician: (r) => r.technicianName,
    door: (r) => r.doorLabel ?? '',
    core: (r) => r.coreTag,
    result: (r) => r.result,
    workOrder: (r) => r.workOrderNumber ?? 0,
  };

  test.each(Object.keys(keyOf).flatMap((sort) => [[sort, 'asc'], [sort, 'desc']]))('sort=%s order=%s: every row, in order, ties broken by id the same way (common practice: a unique tie-breaker)', async (sort, order) => {
    const rows = await all(`&sort=${sort}&order=${order}`);
    expect(rows.map((r) => r.id).sort()).toEqual((await all()).map((r) => r.id).sort());
    const key = keyOf[sort]!;
    const sign = order === 'asc' ? 1 : -1;
    for (let i = 1; i < rows.length; i++) {
      const a = rows[i - 1]!;
      const b = rows[i]!;
      const ka = key(a);
      const kb = key(b);
      const cmp = ka < kb ? -1 : ka > kb ? 1 : a.id < b.id ? -1 : 1;
      expect(cmp * sign, `${sort} ${order}: ${String(ka)} ${a.id} before ${String(kb)} ${b.id}`).toBe(-1);
    }
  });

  test('sorting by result (many ties) is stable across pages: pages of 5 join up to the whole list, no row twice or lost (common practice: a unique tie-breaker for offset paging)', async () => {
    const whole = (await all('&sort=result&order=asc')).map((r) => r.id);
    const pages: string[] = [];
    for (let p = 1; p <= 4; p++) {
      const res = await page(`?sort=result&order=asc&pageSize=5&page=${p}`);
      expect(res).toMatchObject({ total: 17, page: p, pageSize: 5 });
      expect(res.rows).toHaveLength(p < 4 ? 5 : 2);
      pages.push(...res.rows.map((r) => r.id));
    }
    expect(pages).toEqual(whole);
    // the same query twice: the same order
    expect((await all('&sort=result&order=asc')).map((r) => r.id)).toEqual(whole);
  });

  test('a page past the end is empty but still reports the total (common practice for offset paging)', async () => {
    expect(await page('?pageSize=10&page=3')).toEqual({ rows: [], total: 17, page: 3, pageSize: 10 });
  });

  test('the total counts the filtered rows, not the page (common practice for offset paging; the seed: 14)', async () => {
    const p = await page(`?workOrderId=${historyWoId}&pageSize=4&page=2`);
    expect(p.total).toBe(14);
    expect(p.rows).toHaveLength(4);
  });
});

describe('GET /api/completions.csv', () => {
  const columns = ['finishedAt', 'startedAt', 'receivedAt', 'coreTag', 'doorLabel', 'workOrderNumber', 'workOrderTitle', 'technicianName', 'result', 'attemptCount', 'failedChecks', 'installDoorLabel', 'installedAt', 'removedCoreTag', 'doorMismatch', 'id'];

  test('text/csv, a header row and one line per row, in the order of the log (RFC 4180 2.1-2.3 and 3, text/csv)', async () => {
    const res = await h.call('GET', '/api/completions.csv', { token: lead });
    expect(res.status).toBe(200);
    expect(res.headers.get('content-type')).toMatch(/^text\/csv; charset=utf-8/);
    expect(res.headers.get('content-disposition')).toMatch(/^attachment; filename="completion-log-\d{4}-\d{2}-\d{2}\.csv"$/);
    expect(res.headers.get('cache-control')).toBe('no-store');
    const lines = res.text.replace(/\r?\n$/, '').split(/\r?\n/);
    expect(lines[0]).toBe(columns.join(','));
    expect(lines).toHaveLength(1 + 17); // no cell here holds a line break, so one line per record
    const records: Record<string, string>[] = parseCsv(res.text, { columns: true });
    expect(records).toHaveLength(17);
    expect(records.map((r) => r.id)).toEqual((await all()).map((r) => r.id));
    expect(records.every((r) => Object.keys(r).length === columns.length)).toBe(true);
  });

  test('RFC 4180 quoting, and a cell starting with "=" neutralised with a leading apostrophe (OWASP CSV Injection)', async () => {
    const res = await h.call('GET', `/api/completions.csv?workOrderId=${myWoId}`, { token: lead });
    expect(res.status).toBe(200);
    // RFC 4180 2.6/2.7: a field with a comma or a quote is enclosed in quotes, inner quotes doubled
    expect(res.text).toContain(`"'=HYPERLINK(""http://example.test/x"",""open"")"`);
    expect(res.text).not.toMatch(/(^|,)=HYPERLINK/m);
    const records: Record<string, string>[] = parseCsv(res.text, { columns: true });
    expect(records).toHaveLength(3);
    for (const r of records) {
      expect(r.workOrderTitle).toBe(`'${FORMULA_TITLE}`);
      expect(r.technicianName).toBe('Robin Tech (demo)');
    }
    expect(records.map((r) => [r.id, r.result, r.failedChecks, r.attemptCount])).toEqual([
      [mine.c3, 'passed', '0', '1'],
      [mine.c2, 'failed', '1', '1'],
      [mine.c1, 'passed', '0', '1'],
    ]);
  });

  test('each export writes a "completions.exported" audit row with its filter (ASVS 5 16.2.1 security logging; key control: who took the log)', async () => {
    const before = await countRows(h.db, 'audit_events');
    expect((await h.call('GET', `/api/completions.csv?result=failed`, { token: lead })).status).toBe(200);
    expect(await countRows(h.db, 'audit_events')).toEqual({ audit_events: before.audit_events! + 1 });
    const row = await h.db('audit_events').where({ action: 'completions.exported' }).orderBy('id', 'desc').first('actor_email', 'details');
    expect(row.actor_email).toBe('lead@demo.corewright.test');
    expect(row.details.filter).toMatchObject({ result: 'failed' });
  });

  test('a bad filter on the export is a JSON 400 naming it, and no export is audited (A7)', async () => {
    const before = await countRows(h.db, 'audit_events');
    const res = await h.call('GET', '/api/completions.csv?from=yesterday', { token: lead });
    expect(res.status).toBe(400);
    expect(fieldsOf(res)).toEqual(['from']);
    expect(await countRows(h.db, 'audit_events')).toEqual(before);
  });
});

describe('GET /api/completions/:id', () => {
  test('a demo completion that needed two attempts: both attempts, and the install that followed (the seed: cores 4 and 10)', async () => {
    const twice = (await all(`&workOrderId=${historyWoId}`)).filter((r) => r.attemptCount === 2);
    expect(twice).toHaveLength(2); // the seed: cores 4 and 10 failed a first key check
    const res = await h.call('GET', `/api/completions/${twice[0]!.id}`, { token: lead });
    expect(res.status).toBe(200);
    const c = res.json.completion;
    expect(c).toMatchObject({ id: twice[0]!.id, result: 'passed', attemptCount: 2, failedChecks: 1, technicianName: 'Jordan Bench (demo)' });
    expect(c.attempts.map((a: { n: number; result: string }) => [a.n, a.result])).toEqual([
      [1, 'failed'],
      [2, 'passed'],
    ]);
    expect(c.attempts[0].keyChecks[0]).toMatchObject({ result: 'failed', note: 'would not turn' });
    expect(c.install).toMatchObject({ doorLabel: c.doorLabel, installedBy: 'Jordan Bench (demo)', removedCoreTag: null });
    expect(new Date(c.install.installedAt).getTime()).toBeGreaterThan(new Date(c.finishedAt).getTime());
  });

  test('a completion synced here: its notes and device, no install yet (S1 spirit: the stored record is what was sent)', async () => {
    const res = await h.call('GET', `/api/completions/${mine.c2}`, { token: lead });
    expect(res.status).toBe(200);
    expect(res.json.completion).toMatchObject({ id: mine.c2, result: 'failed', notes: 'Plug bound at chamber 3; set aside.', deviceId, install: null, workOrderTitle: FORMULA_TITLE });
    expect(res.json.completion.attempts).toHaveLength(1);
  });

  test('an unknown completion is a 404, a malformed id a 400 (RFC 9110 15.5.5; A7)', async () => {
    expect((await h.call('GET', `/api/completions/${randomUUID()}`, { token: lead })).status).toBe(404);
    const bad = await h.call('GET', '/api/completions/12', { token: lead });
    expect(bad.status).toBe(400);
    expect(bad.json.error.message).toMatch(/completion id/);
  });
});
