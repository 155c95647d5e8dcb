// Key control, issue and return: every key copy issued individually with the next copy number
// of its key (safe under parallel issues), the holder's acknowledgement (typed and ticked, or a
// drawn signature as a PNG data URL), returns, keys to chase, the due-date reminder, and the cut
// list: the one answer with bittings, restricted and audited. Nothing else carries a bitting.
// Sources: ANSI/BHMA A156.28 and ALOA Keynotes (Jan 2015) via ../shared/trade/keying-primer.md
// ("Key control"); reliability.md A-3, A5, A7.
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { sendPending } from '../../server/services/notifier';
import { queueDueReminders } from '../../server/services/keyIssues';
import { createMailer } from '../../server/services/mail';
import { loadSystem } from '../../server/services/keySystems';
import { countRows, startHarness, type Harness } from './harness';

let h: Harness;
let lead: string;
let tech: string;
let systemId: string;
const keyId = new Map<string, string>();
beforeAll(async () => {
  h = await startHarness({}, { demo: true });
  lead = await h.tokenFor('supervisor');
  tech = await h.tokenFor('technician');
  systemId = (await h.call('GET', '/api/key-systems', { token: lead })).json.keySystems[0].id;
  for (const k of (await h.call('GET', `/api/key-systems/${systemId}/keys`, { token: lead })).json.keys) keyId.set(k.symbol, k.id);
});
afterAll(async () => h.close());

const fieldsOf = (res: { json: { error: { details?: { field?: string }[] } } }) => (res.json.error.details ?? []).map((d) => d.field);
/** A 1x1 PNG (its first bytes are PNG's signature, ISO/IEC 15948 5.2). */
const PNG = 'data:image/png;base64,iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAYAAAAfFcSJAAAADUlEQVR42mNk+M9QDwADhgGAWjR9awAAAABJRU5ErkJggg==';
const ack = (name = 'Pat Example') => ({ name, accepted: true });

async function holder(name: string, email?: string): Promise<string> {
  const res = await h.call('POST', '/api/holders', { token: lead, body: { name, department: 'Chemistry', ...(email ? { email } : {}) } });
  expect(res.status).toBe(201);
  return res.json.holder.id;
}
const issue = (body: Record<string, unknown>) => h.call('POST', '/api/key-issues', { token: lead, body });

describe('POST /api/key-issues', () => {
  test('201 { issue } with the next copy number of that key; another key starts at its own next number (primer: copy number stamped on the key)', async () => {
    const pat = await holder('Pat Example', 'pat@example.test');
    const first = await issue({ holderId: pat, keyId: keyId.get('AC3'), acknowledgement: ack() });
    expect(first.status).toBe(201);
    const n = first.json.issue.copyNumber;
    expect(first.json.issue).toMatchObject({ holderId: pat, holderName: 'Pat Example', keySymbol: 'AC3', status: 'out', acknowledgement: { name: 'Pat Example', signed: false }, issuedBy: 'Sam Lead (demo)', authorisedBy: null, overdue: false });
    const second = await issue({ holderId: pat, keyId: keyId.get('AC3'), acknowledgement: { ...ack(), signature: PNG } });
    expect(second.json.issue.copyNumber).toBe(n + 1);
    expect(second.json.issue.acknowledgement.signed).toBe(true);
    const receipt = await h.call('GET', `/api/key-issues/${second.json.issue.id}`, { token: lead });
    expect(receipt.json.issue.signature).toBe(PNG);
    expect(await h.db('audit_events').where({ action: 'key.issued', target_id: second.json.issue.id }).first('id')).toBeTruthy();
  });

  test('parallel issues of one key each get their own copy number, none shared or skipped (unique (key, copy) index and retry)', async () => {
    const lee = await holder('Lee Parallel');
    const before = (await h.db('key_issues').where({ key_id: keyId.get('AC4') }).max({ m: 'copy_number' }).first()) as { m: number | null };
    const replies = await Promise.all(Array.from({ length: 10 }, () => issue({ holderId: lee, keyId: keyId.get('AC4'), acknowledgement: ack('Lee Parallel') })));
    expect(replies.map((r) => r.status)).toEqual(Array(10).fill(201));
    const numbers = replies.map((r) => r.json.issue.copyNumber as number).sort((a, b) => a - b);
    const from = (before.m ?? 0) + 1;
    expect(numbers).toEqual(Array.from({ length: 10 }, (_, i) => from + i));
  });

  test('bad input: 400 naming the field, nothing stored (A7); the signature is a PNG data URL within its size', async () => {
    const pat = await holder('Pat Bad Input');
    const before = await countRows(h.db, 'key_issues');
    const cases: [Record<string, unknown>, string][] = [
      [{ keyId: keyId.get('AC3'), acknowledgement: ack() }, 'holderId'],
      [{ holderId: pat, keyId: 'nope', acknowledgement: ack() }, 'keyId'],
      [{ holderId: pat, keyId: keyId.get('AC3') }, 'acknowledgement'],
      [{ holderId: pat, keyId: keyId.get('AC3'), acknowledgement: { name: 'Pat', accepted: false } }, 'acknowledgement.accepted'],
      [{ holderId: pat, keyId: keyId.get('AC3'), acknowledgement: { name: '', accepted: true } }, 'acknowledgement.name'],
      [{ holderId: pat, keyId: keyId.get('AC3'), acknowledgement: { ...ack(), signature: 'data:image/svg+xml;base64,PHN2Zz4=' } }, 'acknowledgement.signature'],
      [{ holderId: pat, keyId: keyId.get('AC3'), acknowledgement: { ...ack(), signature: 'data:image/png;base64,R0lGODlhAQABAAAAACw=' } }, 'acknowledgement.signature'],
      [{ holderId: pat, keyId: keyId.get('AC3'), acknowledgement: { ...ack(), signature: `${PNG.slice(0, -2)}${'A'.repeat(70_000)}==` } }, 'acknowledgement.signature'],
      [{ holderId: pat, keyId: keyId.get('AC3'), dueDate: '2026-13-01', acknowledgement: ack() }, 'dueDate'],
      [{ holderId: '00000000-0000-4000-8000-000000000000', keyId: keyId.get('AC3'), acknowledgement: ack() }, 'holderId'],
      [{ holderId: pat, keyId: '00000000-0000-4000-8000-000000000000', acknowledgement: ack() }, 'keyId'],
    ];
    for (const [body, field] of cases) {
      const res = await issue(body);
      expect(res.status, field).toBe(400);
      expect(fieldsOf(res), field).toContain(field);
    }
    // An extra field (a copy number of one's choosing) is refused by name (A5, mass assignment).
    const extra = await issue({ holderId: pat, keyId: keyId.get('AC3'), copyNumber: 1, acknowledgement: ack() });
    expect(extra.status).toBe(400);
    expect(extra.json.error.message).toContain('"copyNumber"');
    expect(await countRows(h.db, 'key_issues')).toEqual(before);
  });

  test('office roles only: technician 403, anonymous 401 (A-3)', async () => {
    for (const [method, path] of [['POST', '/api/key-issues'], ['GET', '/api/key-issues'], ['GET', '/api/key-issues/outstanding'], ['GET', `/api/key-issues/cut-list?issueIds=${keyId.get('A')}`]] as const) {
      const body = method === 'POST' ? {} : undefined;
      expect((await h.call(method, path, { token: tech, body })).status, path).toBe(403);
      expect((await h.call(method, path, { body })).status, path).toBe(401);
    }
  });
});

describe('returns, leaving holders and keys to chase', () => {
  test('return closes the copy; returning it again is a conflict', async () => {
    const jo = await holder('Jo Return');
    const out = (await issue({ holderId: jo, keyId: keyId.get('AB5'), acknowledgement: ack('Jo Return') })).json.issue;
    const back = await h.call('POST', `/api/key-issues/${out.id}/return`, { token: lead, body: {} });
    expect(back.status).toBe(200);
    expect(back.json.issue).toMatchObject({ status: 'returned' });
    expect(back.json.issue.returnedAt).toEqual(expect.any(String));
    expect((await h.call('POST', `/api/key-issues/${out.id}/return`, { token: lead, body: {} })).status).toBe(409);
  });

  test('a holder marked leaving gets the list of every key to return; no new key is issued to them; the report lists their keys', async () => {
    const mo = await holder('Mo Leaving');
    const a = (await issue({ holderId: mo, keyId: keyId.get('AB6'), acknowledgement: ack('Mo') })).json.issue;
    const b = (await issue({ holderId: mo, keyId: keyId.get('AA'), acknowledgement: ack('Mo') })).json.issue;
    const res = await h.call('PATCH', `/api/holders/${mo}`, { token: lead, body: { status: 'leaving' } });
    expect(res.json.keysToReturn.map((i: { id: string }) => i.id).sort()).toEqual([a.id, b.id].sort());
    const refused = await issue({ holderId: mo, keyId: keyId.get('AB7'), acknowledgement: ack('Mo') });
    expect(refused.status).toBe(409);
    expect(fieldsOf(refused)).toEqual(['holderId']);
    const chase = (await h.call('GET', '/api/key-issues/outstanding', { token: lead })).json.issues as { id: string; reason: string }[];
    expect(chase.filter((i) => i.id === a.id || i.id === b.id).map((i) => i.reason)).toEqual(['leaving', 'leaving']);
  });

  test('a copy past its due date is overdue, listed, and its holder gets one reminder e-mail with symbol and copy number only', async () => {
    const kim = await holder('Kim Due', 'kim.due@example.test');
    const out = (await issue({ holderId: kim, keyId: keyId.get('AB8'), dueDate: '2026-01-05', acknowledgement: ack('Kim') })).json.issue;
    expect(out.overdue).toBe(true);
    const chase = (await h.call('GET', '/api/key-issues/outstanding', { token: lead })).json.issues as { id: string; reason: string }[];
    expect(chase.find((i) => i.id === out.id)?.reason).toBe('overdue');
    const deps = { db: h.db, config: h.config, mailer: createMailer(h.config, () => {}) };
    expect(await queueDueReminders(h.db)).toBeGreaterThanOrEqual(1);
    await sendPending(deps);
    const mail = await h.mailTo('kim.due@example.test');
    expect(mail).toHaveLength(1);
    expect(mail[0]!.subject).toContain(`Key AB8 copy ${out.copyNumber}`);
    // Queued once per copy: a second round sends nothing new.
    await queueDueReminders(h.db);
    await sendPending(deps);
    await new Promise((r) => setTimeout(r, 300));
    expect(await h.mailTo('kim.due@example.test')).toHaveLength(1);
  });
});

describe('the cut list: bittings for the shop, restricted and audited like charts', () => {
  test('supervisor gets symbol, copy numbers, bitting and quantity per key; the view is audited', async () => {
    const ana = await holder('Ana Cut');
    const one = (await issue({ holderId: ana, keyId: keyId.get('AD7'), acknowledgement: ack('Ana') })).json.issue;
    const two = (await issue({ holderId: ana, keyId: keyId.get('AD7'), acknowledgement: ack('Ana') })).json.issue;
    const before = await countRows(h.db, 'audit_events');
    const res = await h.call('GET', `/api/key-issues/cut-list?issueIds=${one.id},${two.id}`, { token: lead });
    expect(res.status).toBe(200);
    const system = await loadSystem(h.db, h.sealer, systemId);
    expect(res.json.cutList).toEqual([{ keyId: keyId.get('AD7'), keySymbol: 'AD7', bitting: system.keys.find((k) => k.symbol === 'AD7')!.bitting, copyNumbers: [one.copyNumber, two.copyNumber], quantity: 2 }]);
    expect((await countRows(h.db, 'audit_events')).audit_events).toBe(before.audit_events! + 1);
    expect(await h.db('audit_events').where({ action: 'bittings.viewed' }).whereRaw(`details->>'what' = 'cut-list'`).first('id')).toBeTruthy();
  });
  test('an unknown issue id is a 400 naming issueIds', async () => {
    const res = await h.call('GET', '/api/key-issues/cut-list?issueIds=00000000-0000-4000-8000-000000000000', { token: lead });
    expect(res.status).toBe(400);
    expect(fieldsOf(res)).toEqual(['issueIds']);
  });
});

describe('no bitting outside the cut list (primer: symbol and copy number identify a key)', () => {
  test('receipts, lists, holders, keys to chase and every mail sent hold no bitting of the system (brute force over all its keys and the control key)', async () => {
    const system = await loadSystem(h.db, h.sealer, systemId);
    const bittings = [system.control, ...system.keys.map((k) => k.bitting)];
    const sam = await holder('Sam Scan', 'sam.scan@example.test');
    const out = (await issue({ holderId: sam, keyId: keyId.get('A'), dueDate: '2026-02-01', acknowledgement: { ...ack('Sam'), signature: PNG } })).json.issue;
    await queueDueReminders(h.db);
    await sendPending({ db: h.db, config: h.config, mailer: createMailer(h.config, () => {}) });
    await h.mailTo('sam.scan@example.test');
    const answers = [
      (await h.call('GET', `/api/key-issues/${out.id}`, { token: lead })).text,
      (await h.call('GET', '/api/key-issues', { token: lead })).text,
      (await h.call('GET', '/api/key-issues/outstanding', { token: lead })).text,
      (await h.call('GET', '/api/holders', { token: lead })).text,
      (await h.call('GET', `/api/holders/${sam}`, { token: lead })).text,
      ...h.smtp.messages.map((m) => JSON.stringify(m)),
    ];
    expect(h.smtp.messages.length).toBeGreaterThan(0);
    for (const text of answers) for (const b of bittings) expect(text.includes(b), `bitting ${b} in ${text.slice(0, 80)}`).toBe(false);
  });
});
