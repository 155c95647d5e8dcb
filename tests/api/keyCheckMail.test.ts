// The failed-key-check mail says what was true on the tablet when it synced, and its link opens
// a completion-log list that shows the core (the "had a failed key check" filter).
// Case S (sync) of ../shared/design/reliability.md; the trade's rule that a failure stays in the record.
import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, beforeEach, describe, expect, test } from 'vitest';
import type { Packet } from '../../shared/schemas/packet';
import { CompletionPage } from '../../shared/schemas/completions';
import { completionFor, techPacket } from './factories';
import { startHarness, type Harness } from './harness';

let h: Harness;
let token: string;
let packet: Packet;
const deviceId = randomUUID();
const sync = (records: unknown[]) => h.call('POST', '/api/sync', { token, body: { deviceId, records } });
const lead = 'lead@demo.corewright.test';

beforeAll(async () => {
  h = await startHarness({}, { demo: true });
});
beforeEach(async () => {
  await h.reset();
  h.smtp.messages.length = 0;
  ({ token, packet } = await techPacket(h));
});
afterAll(async () => h.close());

async function failedMail(tag: string) {
  const mails = await h.mailTo(lead);
  const mail = mails.find((m) => m.subject.includes(`core ${tag}`));
  expect(mail, mails.map((m) => m.subject).join('; ')).toBeDefined();
  return mail!;
}
async function listFrom(text: string) {
  const link = new URL(/https?:\/\/\S+\/completions\?\S+/.exec(text)![0]);
  const lead = await h.tokenFor('supervisor');
  const res = await h.call('GET', `/api/completions${link.search}`, { token: lead });
  expect(res.status, res.text).toBe(200);
  return CompletionPage.parse(res.json);
}

describe('the failed-key-check mail', () => {
  test('failed, rebuilt and passed in one completion before the sync: reported as passed on attempt 2, not waiting; the link lists it', async () => {
    const core = packet.cores[0]!;
    const rec = completionFor(packet.workOrder.id, core, { failFirst: true });
    expect((await sync([rec])).json.accepted).toHaveLength(1);
    const mail = await failedMail(core.tag);
    expect(mail.subject).toBe(`Key check failed, then passed: core ${core.tag} for ${core.door!.label}`);
    expect(mail.text).toMatch(/rebuilt and passed its key check on attempt 2/);
    expect(mail.text).not.toMatch(/waits for a rebuild/);
    const list = await listFrom(mail.text);
    expect(list.rows.map((r) => r.id)).toEqual([rec.clientId]);
    expect(list.rows[0]!.result).toBe('passed');
  });

  test('a failed completion and a later passing one synced together: the mail for the failure says it passed before the sync', async () => {
    const core = packet.cores[1]!;
    const start = new Date(Date.now() - 3 * 3600_000);
    const failed = completionFor(packet.workOrder.id, core, { result: 'failed', at: start });
    const passed = completionFor(packet.workOrder.id, core, { at: new Date(start.getTime() + 30 * 60_000) });
    const res = await sync([failed, passed]);
    expect(res.json.accepted, res.text).toHaveLength(2);
    const mail = await failedMail(core.tag);
    expect(mail.text).toMatch(/rebuilt and passed its key check at/);
    expect(mail.text).not.toMatch(/waits for a rebuild/);
    // The link's list shows both records of the core: the failure and the pass after it.
    const list = await listFrom(mail.text);
    expect(list.rows.map((r) => r.result).sort()).toEqual(['failed', 'passed']);
  });

  test('a failure with no pass before the sync: the core waits for a rebuild (control case)', async () => {
    const core = packet.cores[2]!;
    await sync([completionFor(packet.workOrder.id, core, { result: 'failed' })]);
    const mail = await failedMail(core.tag);
    expect(mail.subject).toBe(`Failed key check: core ${core.tag} for ${core.door!.label}`);
    expect(mail.text).toMatch(/waits for a rebuild/);
    // A pass synced after the mail was written does not rewrite what was true at the sync.
    await sync([completionFor(packet.workOrder.id, core, { at: new Date(Date.now() + 60_000) })]);
    const again = (await h.mailTo(lead)).filter((m) => m.subject.includes(core.tag));
    expect(again).toHaveLength(1);
  });
});

describe('GET /api/completions?hadFailedCheck=1', () => {
  test('lists every completion of a core that ever failed a key check, whatever its final result; result= still narrows; a bad value is a 400 naming it (A7)', async () => {
    const [a, b, c] = packet.cores;
    await sync([completionFor(packet.workOrder.id, a!, { failFirst: true }), completionFor(packet.workOrder.id, b!), completionFor(packet.workOrder.id, c!, { result: 'failed' })]);
    const lead = await h.tokenFor('supervisor');
    const get = async (q: string) => CompletionPage.parse((await h.call('GET', `/api/completions?workOrderId=${packet.workOrder.id}&${q}`, { token: lead })).json);
    expect((await get('hadFailedCheck=1')).rows.map((r) => r.coreTag).sort()).toEqual([a!.tag, c!.tag].sort());
    expect((await get('hadFailedCheck=1&result=passed')).rows.map((r) => r.coreTag)).toEqual([a!.tag]);
    expect((await get('result=failed')).rows.map((r) => r.coreTag)).toEqual([c!.tag]);
    const bad = await h.call('GET', '/api/completions?hadFailedCheck=yes', { token: lead });
    expect(bad.status).toBe(400);
    expect(bad.json.error.details[0].field).toBe('hadFailedCheck');
  });
});
