// Key control, a key audit's reminders and links sent again (the primer's "Key control", "Audits": holders who have
// not confirmed are chased; common practice). While a key audit is open, each holder who has not answered gets at most
// one reminder a day, through the owed-mail queue (a notification sent under a row lock); never after it closes or
// passes its deadline. A supervisor can remind at once, send one holder's link again, or close the key audit; each is
// audited. Every mail carries a new single-use link that replaces the one before (OWASP Forgot Password Cheat Sheet:
// one live token; the old one says a newer e-mail replaced it). A key request's approval e-mail can be sent again the
// same way. No bitting in any mail.
import { afterAll, beforeAll, beforeEach, describe, expect, test } from 'vitest';
import { loadSystem } from '../../server/services/keySystems';
import { queueKeyAuditReminders } from '../../server/services/keyAudits';
import { createMailer } from '../../server/services/mail';
import { sendPending } from '../../server/services/notifier';
import { sha256 } from '../../server/services/tokens';
import { startHarness, type Harness } from './harness';

let h: Harness;
let lead: string;
let bittings: string[];
let library: string;
beforeAll(async () => {
  h = await startHarness({}, { demo: true });
});
afterAll(async () => h.close());
beforeEach(async () => {
  await h.reset();
  lead = await h.tokenFor('supervisor');
  library = (await h.db('departments').where({ name: 'Library Services' }).first('id')).id;
  const system = await loadSystem(h.db, h.sealer, (await h.db('key_systems').first('id')).id);
  bittings = [system.control, ...system.keys.map((k) => k.bitting)];
});

const BO = 'bo@demo.corewright.test';
const ADA = 'ada@demo.corewright.test';
const tokenIn = (text: string) => /\/confirm-keys#([A-Za-z0-9_-]{43})/.exec(text)![1]!;
const deps = () => ({ db: h.db, config: h.config, mailer: createMailer(h.config, () => {}) });
/** The minute job of one server process: queue what is owed, then send it. */
const minuteJob = async () => {
  const queued = await queueKeyAuditReminders(h.db);
  await sendPending(deps());
  return queued;
};
/** As if the holders' last mail went a day and an hour ago. */
const dayLater = (id: string) => h.db('key_campaign_holders').where({ campaign_id: id }).update({ mailed_at: h.db.raw(`now() - interval '25 hours'`) });
/** The mail an address has now, after a pause for any wrong one to arrive (mailTo would wait for one that should not come). */
const mailNow = async (address: string) => {
  await new Promise((r) => setTimeout(r, 300));
  return h.smtp.messages.filter((m) => m.to.includes(address));
};

async function startLibraryAudit(): Promise<{ id: string; number: number; boToken: string; adaToken: string }> {
  const res = await h.call('POST', '/api/key-audits', { token: lead, body: { title: 'Spring key audit', departmentId: library } });
  expect(res.status, res.text).toBe(201);
  const [bo] = await h.mailTo(BO);
  const [ada] = await h.mailTo(ADA);
  return { id: res.json.keyAudit.id, number: res.json.keyAudit.number, boToken: tokenIn(bo!.text), adaToken: tokenIn(ada!.text) };
}
async function answerAll(token: string) {
  const view = await h.call('POST', '/api/key-audit-links/view', { body: { token } });
  expect(view.status, view.text).toBe(200);
  const copies = (view.json.copies as { issueId: string }[]).map((c) => ({ issueId: c.issueId, held: true }));
  expect((await h.call('POST', '/api/key-audit-links/confirm', { body: { token, copies } })).status).toBe(200);
}
const person = async (id: string, name: string) => ((await h.call('GET', `/api/key-audits/${id}`, { token: lead })).json.keyAudit.people as { name: string; mailedAt: string | null; reminders: number }[]).find((p) => p.name === name)!;

describe('the daily reminder', () => {
  test('only to the holders who have not answered, once their last mail is a day old; the reminder carries a new link that replaces the old one; no bitting', async () => {
    const audit = await startLibraryAudit();
    expect(await person(audit.id, 'Bo Linden (demo)')).toMatchObject({ reminders: 0 });
    // The first mail went just now: nothing is owed yet.
    expect(await minuteJob()).toBe(0);
    await answerAll(audit.adaToken);
    await dayLater(audit.id);
    expect(await minuteJob()).toBe(1);
    const bo = await h.mailTo(BO, 2);
    expect(bo).toHaveLength(2);
    expect(bo[1]!.subject).toBe(`Reminder: Key audit #${audit.number}: please confirm the keys you hold`);
    expect(bo[1]!.text).toContain('key AB2, copy 1');
    expect(bo[1]!.text).toContain('replaces the one in any earlier key audit e-mail');
    for (const b of bittings) expect(bo[1]!.text.includes(b)).toBe(false);
    expect(await mailNow(ADA), 'Ada answered: no reminder').toHaveLength(1);
    // The page shows it: one reminder, mailed just now.
    const shown = await person(audit.id, 'Bo Linden (demo)');
    expect(shown.reminders).toBe(1);
    expect(Date.now() - Date.parse(shown.mailedAt!)).toBeLessThan(60_000);
    // The first mail's link now says to use the newest e-mail; the reminder's link works.
    const old = await h.call('POST', '/api/key-audit-links/view', { body: { token: audit.boToken } });
    expect(old.status).toBe(422);
    expect(old.json.error.message).toMatch(/replaced by a newer one: open the link in the newest key audit e-mail/);
    await answerAll(tokenIn(bo[1]!.text));
  });

  test('not twice in a day: a second run the same day, even with the last mail pushed back, queues nothing; the next day it does', async () => {
    const audit = await startLibraryAudit();
    await dayLater(audit.id);
    expect(await minuteJob()).toBe(2);
    await dayLater(audit.id);
    // Several runs at once, as from several processes: the day's row exists, so none queues again.
    expect((await Promise.all([minuteJob(), minuteJob(), minuteJob()])).reduce((a, b) => a + b, 0)).toBe(0);
    expect(await mailNow(BO)).toHaveLength(2);
    expect((await person(audit.id, 'Bo Linden (demo)')).reminders).toBe(1);
    // Tomorrow (the day's rows moved back a day): one more each.
    await h.db('key_audit_reminders').update({ day: h.db.raw(`current_date - 1`) });
    expect(await minuteJob()).toBe(2);
    expect(await h.mailTo(BO, 3)).toHaveLength(3);
    expect((await person(audit.id, 'Bo Linden (demo)')).reminders).toBe(2);
  });

  test('a reminder still on its way holds back the next one, but not for ever: one that never went is passed over after a day', async () => {
    const audit = await startLibraryAudit();
    const bo = await h.db('key_campaign_holders as ch').join('key_holders as h', 'h.id', 'ch.holder_id').where({ 'ch.campaign_id': audit.id, 'h.email': BO }).first<{ id: string }>('ch.id');
    // Yesterday's reminder, never sent (its notification gave up): none is queued beside one still on its way today...
    const [stuck] = await h.db('key_audit_reminders').insert({ campaign_holder_id: bo.id, day: h.db.raw('current_date - 1') }).returning('id');
    await dayLater(audit.id);
    expect(await queueKeyAuditReminders(h.db)).toBe(1); // Ada only
    // ...but once it is a day old, Bo is asked again.
    await h.db('key_audit_reminders').where({ id: stuck.id }).update({ created_at: h.db.raw(`now() - interval '25 hours'`) });
    expect(await queueKeyAuditReminders(h.db)).toBe(1);
    await sendPending(deps());
    expect((await person(audit.id, 'Bo Linden (demo)')).reminders).toBe(1);
  });

  test('not after the key audit closes or passes its deadline, nor a reminder queued before the close; the closed links say so', async () => {
    const audit = await startLibraryAudit();
    await dayLater(audit.id);
    expect(await queueKeyAuditReminders(h.db)).toBe(2);
    const closed = await h.call('POST', `/api/key-audits/${audit.id}/close`, { token: lead });
    expect(closed.status, closed.text).toBe(200);
    expect(closed.json.keyAudit.closedAt).not.toBeNull();
    await sendPending(deps());
    expect(await mailNow(BO), 'the queued reminder is dropped').toHaveLength(1);
    await h.db('key_audit_reminders').update({ day: h.db.raw(`current_date - 1`) });
    await dayLater(audit.id);
    expect(await minuteJob()).toBe(0);
    const link = await h.call('POST', '/api/key-audit-links/view', { body: { token: audit.boToken } });
    expect(link.status).toBe(422);
    expect(link.json.error.message).toMatch(/key audit is closed/);
    expect((await h.call('POST', `/api/key-audits/${audit.id}/close`, { token: lead })).status).toBe(409);
    expect(await h.db('audit_events').where({ action: 'key-audit.closed', target_id: audit.id }).first('details')).toMatchObject({ details: { unanswered: 2 } });

    const late = await startLibraryAudit();
    await h.db('key_campaigns').where({ id: late.id }).update({ expires_at: h.db.raw(`now() - interval '1 minute'`) });
    await dayLater(late.id);
    expect(await minuteJob()).toBe(0);
    const now = await h.call('POST', `/api/key-audits/${late.id}/reminders`, { token: lead });
    expect(now.status).toBe(409);
    expect(now.json.error.message).toMatch(/past its deadline/);
  });
});

describe('remind now, send a link again', () => {
  test('remind now: at once, only to the ones not answered, audited; again with everyone answered or reminded is a 409 that changes nothing', async () => {
    const audit = await startLibraryAudit();
    await answerAll(audit.adaToken);
    const res = await h.call('POST', `/api/key-audits/${audit.id}/reminders`, { token: lead });
    expect(res.status, res.text).toBe(200);
    const bo = await h.mailTo(BO, 2);
    expect(bo[1]!.subject).toMatch(/^Reminder: Key audit #/);
    expect(await mailNow(ADA)).toHaveLength(1);
    expect(res.json.keyAudit.people.find((p: { name: string }) => p.name === 'Bo Linden (demo)').reminders).toBe(1);
    expect(await h.db('audit_events').where({ action: 'key-audit.reminded', target_id: audit.id }).first('details')).toMatchObject({ details: { holders: 1 } });
    // The reminder was just sent, so the daily one does not follow it the same day.
    expect(await minuteJob()).toBe(0);
    await answerAll(tokenIn(bo[1]!.text));
    const none = await h.call('POST', `/api/key-audits/${audit.id}/reminders`, { token: lead });
    expect(none.status).toBe(409);
    expect(none.json.error.message).toMatch(/no one to remind/);
    expect(Number((await h.db('key_audit_reminders').count({ n: '*' }).first())!.n)).toBe(1);
  });

  test('send one holder their link again: a new single-use link, the old one no longer valid with words that say to use the newest e-mail; audited; an answered holder is a 409', async () => {
    const audit = await startLibraryAudit();
    const bo = (await h.db('key_holders').where({ email: BO }).first('id')).id as string;
    const res = await h.call('POST', `/api/key-audits/${audit.id}/holders/${bo}/resend`, { token: lead });
    expect(res.status, res.text).toBe(200);
    const mails = await h.mailTo(BO, 2);
    expect(mails[1]!.subject).toBe(`Key audit #${audit.number}: please confirm the keys you hold`);
    expect(mails[1]!.text).toContain('This link replaces the one in any earlier key audit e-mail');
    for (const b of bittings) expect(mails[1]!.text.includes(b)).toBe(false);
    const fresh = tokenIn(mails[1]!.text);
    expect(fresh).not.toBe(audit.boToken);
    // Only the new token's hash is stored; the old one is kept only to say it was replaced.
    expect(await h.db('key_campaign_holders').where({ token_hash: sha256(fresh) }).first('id')).toBeDefined();
    expect(await h.db('key_campaign_holders').where({ token_hash: sha256(audit.boToken) }).first('id')).toBeUndefined();
    for (const path of ['/api/key-audit-links/view', '/api/key-audit-links/confirm']) {
      const old = await h.call('POST', path, { body: path.endsWith('view') ? { token: audit.boToken } : { token: audit.boToken, copies: [{ issueId: '00000000-0000-4000-8000-000000000000', held: true }] } });
      expect(old.status, path).toBe(422);
      expect(old.json.error.message).toMatch(/replaced by a newer one/);
    }
    // Not a reminder: the count stays, the time moves.
    expect(res.json.keyAudit.people.find((p: { name: string }) => p.name === 'Bo Linden (demo)').reminders).toBe(0);
    expect(await h.db('audit_events').where({ action: 'key-audit.link-resent', target_id: audit.id }).first('details')).toMatchObject({ details: { holder: 'Bo Linden (demo)' } });
    // The audit trail names it in words: the key audit by number and title (its stored target type is key-campaign).
    const trail = await h.call('GET', '/api/audit-events?action=key-audit.&pageSize=10', { token: await h.tokenFor('admin') });
    expect(trail.status, trail.text).toBe(200);
    expect(trail.json.rows[0]).toMatchObject({ actionName: "Sent a holder's key audit link again", target: `Key audit #${audit.number} Spring key audit` });
    await answerAll(fresh);
    const again = await h.call('POST', `/api/key-audits/${audit.id}/holders/${bo}/resend`, { token: lead });
    expect(again.status).toBe(409);
    expect(again.json.error.message).toMatch(/answered already/);
    // A holder this key audit did not ask (Cass's only copy is reported lost).
    const cass = (await h.db('key_holders').where({ name: 'Cass Moreno (demo)' }).first('id')).id as string;
    const stranger = await h.call('POST', `/api/key-audits/${audit.id}/holders/${cass}/resend`, { token: lead });
    expect(stranger.status).toBe(404);
    expect(stranger.json.error.message).toMatch(/key holder in this key audit/);
  });
});

describe('a key request\'s approval e-mail sent again', () => {
  test('each authoriser gets a new link; the old one says a newer e-mail replaced it; audited; no bitting; a decided request is a 409', async () => {
    const ada = (await h.db('key_holders').where({ email: ADA }).first('id')).id as string;
    const door = (await h.db('doors').where({ label: 'BL-101' }).first('id')).id as string;
    const made = await h.call('POST', '/api/key-requests', { token: lead, body: { holderId: ada, doorIds: [door], reason: 'Opens the reading room' } });
    expect(made.status, made.text).toBe(201);
    const id = made.json.request.id as string;
    expect(made.json.request.links.map((l: { authoriser: string }) => l.authoriser)).toEqual(['Morgan Vale (demo)']);
    const [first] = await h.mailTo('morgan.vale@demo.corewright.test');
    const oldToken = /#([A-Za-z0-9_-]{43})/.exec(first!.text)![1]!;
    const res = await h.call('POST', `/api/key-requests/${id}/resend`, { token: lead });
    expect(res.status, res.text).toBe(200);
    expect(res.json.request.links).toHaveLength(1);
    const mails = await h.mailTo('morgan.vale@demo.corewright.test', 2);
    expect(mails[1]!.text).toContain('This link replaces the one in the earlier e-mail about this request');
    for (const b of bittings) expect(mails[1]!.text.includes(b)).toBe(false);
    const newToken = /#([A-Za-z0-9_-]{43})/.exec(mails[1]!.text)![1]!;
    for (const path of ['/api/key-request-links/view', '/api/key-request-links/decide']) {
      const old = await h.call('POST', path, { body: path.endsWith('view') ? { token: oldToken } : { token: oldToken, decision: 'approved' } });
      expect(old.status, path).toBe(422);
      expect(old.json.error.message).toBe(`This link was replaced by a newer one: open the link in the newest e-mail about key request #${made.json.request.number}.`);
    }
    expect((await h.call('GET', `/api/key-requests/${id}`, { token: lead })).json.request.status).toBe('pending');
    expect(await h.db('audit_events').where({ action: 'key-request.link-resent', target_id: id }).first('details')).toMatchObject({ details: { authorisers: 1 } });
    const trail = await h.call('GET', '/api/audit-events?action=key-request.link-resent&pageSize=10', { token: await h.tokenFor('admin') });
    expect(trail.json.rows[0]).toMatchObject({ actionName: "Sent a key request's approval e-mail again", target: `Key request #${made.json.request.number} for Ada Quill (demo)` });
    const decided = await h.call('POST', '/api/key-request-links/decide', { body: { token: newToken, decision: 'approved' } });
    expect(decided.status, decided.text).toBe(200);
    const late = await h.call('POST', `/api/key-requests/${id}/resend`, { token: lead });
    expect(late.status).toBe(409);
    expect(late.json.error.message).toMatch(/approved already/);
    expect((await h.call('GET', `/api/key-requests/${id}`, { token: lead })).json.request.links).toEqual([]);
  });
});
