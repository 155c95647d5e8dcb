// Key control, chasing the holders who have not answered a key audit, walked by a supervisor at the office desk
// (1440x900): the audit's page shows when each holder was last mailed and how many reminders went; "Send a reminder
// now" (confirmed) mails the unanswered a new link; one holder's link is sent again (confirmed) after their mail was
// lost; the development mailbox shows the mail; the replaced link, opened on a phone, says to use the newest e-mail,
// and the newest works; closing the key audit stops the links. Then a key request's approval e-mail is sent again
// from its page and the authoriser's old link says the same. No bitting in any mail.
// Screenshots: test-results/screenshots/kc-reminders-*.png.
import { expect, test, type Page } from '@playwright/test';
import { apiGet, apiPost, apiSignIn, waitForMail, type Mail } from '../console/api';
import { demo, signIn } from '../support/session';
import { smallTargets } from '../support/touchTargets';
import { freshDemo } from '../support/freshDemo';

test.beforeAll(freshDemo);

test.use({ viewport: { width: 1440, height: 900 } });

const shot = async (page: Page, name: string) => {
  await page.evaluate(() => document.fonts.ready);
  await page.waitForTimeout(400);
  await page.screenshot({ path: `test-results/screenshots/kc-reminders-${name}.png`, fullPage: true });
};

const linkIn = (mail: Mail, path: string) => new RegExp(`https?://[^/\\s]+(${path}#\\S+)`).exec(mail.text)![1]!;
/** Opens a mailed link afresh (a link differing only in its fragment would not load the page again). */
async function open(page: Page, link: string): Promise<void> {
  await page.goto('about:blank');
  await page.goto(link);
}

test('a key audit: remind now, a link sent again, the old link replaced, the key audit closed; a key request\'s approval e-mail sent again', async ({ page, browser }) => {
  test.setTimeout(150_000);
  const lead = await apiSignIn(page.request, demo.supervisor);
  const admin = await apiSignIn(page.request, demo.admin);
  const { keySystems } = await apiGet<{ keySystems: { id: string }[] }>(page.request, lead, '/api/key-systems');
  const { keys } = await apiGet<{ keys: { bitting?: string }[] }>(page.request, admin, `/api/key-systems/${keySystems[0]!.id}/keys?reveal=1`);
  const bittings = keys.map((k) => k.bitting!).filter(Boolean);
  expect(bittings.length).toBeGreaterThan(10);
  const noBitting = (text: string) => expect(bittings.filter((b) => text.includes(b))).toEqual([]);
  const { departments } = await apiGet<{ departments: { id: string; name: string }[] }>(page.request, lead, '/api/departments');
  const library = departments.find((d) => d.name === 'Library Services')!;
  const { keyAudit } = await apiPost<{ keyAudit: { id: string; number: number } }>(page.request, lead, '/api/key-audits', { title: 'Spring key audit', departmentId: library.id });
  const subject = new RegExp(`^Key audit #${keyAudit.number}:`);
  const reminder = new RegExp(`^Reminder: Key audit #${keyAudit.number}:`);
  const first = await waitForMail(page.request, 'bo@demo.corewright.test', subject, 1);

  await signIn(page, demo.supervisor);
  await page.getByRole('link', { name: 'Key audits', exact: true }).click();
  await page.getByTestId(`key-audit-open-${keyAudit.number}`).click();
  await expect(page.getByTestId('key-audit-mailed-Bo Linden (demo)')).toContainText('no reminder yet');
  await expect(page.getByTestId('key-audit-reminder-rule')).toContainText('a reminder once a day');
  expect(await smallTargets(page, 48), 'the key audit page').toEqual([]);

  // Remind now: confirmed first, then both holders who have not answered get a reminder with a new link.
  await page.getByTestId('key-audit-remind').click();
  await expect(page.getByRole('dialog')).toContainText('Remind 2 holders now?');
  await shot(page, 'remind-confirm');
  await page.getByTestId('key-audit-remind-confirm').click();
  await expect(page.getByText(`Reminders sent for key audit #${keyAudit.number}.`)).toBeVisible();
  await expect(page.getByTestId('key-audit-mailed-Bo Linden (demo)')).toContainText('1 reminder');
  await expect(page.getByTestId('key-audit-mailed-Ada Quill (demo)')).toContainText('1 reminder');
  const reminded = await waitForMail(page.request, 'bo@demo.corewright.test', reminder, 1);
  noBitting(reminded.text);
  await shot(page, 'reminded');

  // Bo's reminder went astray: send his link again.
  await page.getByTestId('key-audit-resend-Bo Linden (demo)').click();
  await expect(page.getByRole('dialog')).toContainText('the link in the e-mails sent before stops working');
  await page.getByTestId('key-audit-resend-confirm').click();
  await expect(page.getByText('A new link went to bo@demo.corewright.test.')).toBeVisible();
  const again = await waitForMail(page.request, 'bo@demo.corewright.test', subject, 2);
  expect(again.text).toContain('This link replaces the one in any earlier key audit e-mail');
  noBitting(again.text);

  // The development mailbox lists what went out.
  await page.goto('/dev/mailbox');
  // Bo's: the first mail, the reminder and the link sent again (beside the demo's due-back reminder for his AB5).
  await expect(page.locator('[data-test^="mail-"]').filter({ hasText: 'to bo@demo.corewright.test' }).filter({ hasText: `Key audit #${keyAudit.number}:` })).toHaveCount(3);
  await shot(page, 'mailbox');
  await page.goBack();

  // Bo, on his phone: the first mail's and the reminder's links say to use the newest e-mail; the newest works.
  const phone = await browser.newContext({ viewport: { width: 390, height: 844 }, hasTouch: true });
  const tab = await phone.newPage();
  for (const old of [first, reminded]) {
    await open(tab, linkIn(old, '/confirm-keys'));
    await expect(tab.locator('.q-card')).toContainText('This link was replaced by a newer one: open the link in the newest key audit e-mail');
  }
  await shot(tab, 'replaced-390x844');
  await open(tab, linkIn(again, '/confirm-keys'));
  await tab.getByTestId('confirm-answer-AB2 #1').getByText('I still have it').tap();
  await tab.getByTestId('confirm-answer-AB5 #1').getByText('I still have it').tap();
  await tab.getByTestId('confirm-send').tap();
  await expect(tab.getByTestId('confirm-done')).toContainText('Your answer is recorded');
  await phone.close();

  // The office: Bo answered (no link to send him); Ada has not. Closing stops her link and every reminder.
  await page.reload();
  await expect(page.getByTestId('key-audit-answered-Bo Linden (demo)')).toContainText('Answered');
  await expect(page.getByTestId('key-audit-resend-Bo Linden (demo)')).toHaveCount(0);
  await expect(page.getByTestId('key-audit-resend-Ada Quill (demo)')).toBeVisible();
  await shot(page, 'after-answer');
  await page.getByTestId('key-audit-close').click();
  await expect(page.getByRole('dialog')).toContainText('1 holder not answered');
  await page.getByTestId('key-audit-close-confirm').click();
  await expect(page.getByTestId('key-audit-reminder-rule')).toContainText('Closed');
  await expect(page.getByTestId('key-audit-remind')).toHaveCount(0);
  await expect(page.getByTestId('key-audit-resend-Ada Quill (demo)')).toHaveCount(0);
  // A row without its button shows an empty cell, never the holder's id.
  expect(await page.getByTestId('key-audit-people').innerText()).not.toMatch(/[0-9a-f]{8}-[0-9a-f]{4}-/);
  await shot(page, 'closed');
  await page.getByText('All key audits', { exact: true }).click();
  await expect(page.getByTestId(`key-audit-row-${keyAudit.number}`)).toContainText('closed');
  const ada = await waitForMail(page.request, 'ada@demo.corewright.test', reminder, 1);
  await page.goto(linkIn(ada, '/confirm-keys'));
  await expect(page.locator('.q-card')).toContainText('This key audit is closed');

  // A key request whose approval e-mail was lost: sent again from its page; the old link says to use the newest.
  const { holders } = await apiGet<{ holders: { id: string; name: string }[] }>(page.request, lead, '/api/holders?q=Ada');
  const { doors } = await apiGet<{ doors: { id: string; label: string }[] }>(page.request, lead, '/api/doors');
  const { request } = await apiPost<{ request: { id: string; number: number } }>(page.request, lead, '/api/key-requests', { holderId: holders[0]!.id, doorIds: [doors.find((d) => d.label === 'BL-101')!.id], reason: 'Opens the reading room early (demo).' });
  const approval = new RegExp(`^Key request #${request.number}:`);
  const firstAsk = await waitForMail(page.request, 'morgan.vale@demo.corewright.test', approval, 1);
  await page.goto(`/key-requests/${request.id}`);
  await expect(page.getByTestId('request-links-text')).toContainText('Sent to Morgan Vale (demo)');
  expect(await smallTargets(page, 48), 'the key request page').toEqual([]);
  await page.getByTestId('request-resend').click();
  await expect(page.getByRole('dialog')).toContainText('Each authoriser of Library Services gets a new link');
  await shot(page, 'request-resend-confirm');
  await page.getByTestId('request-resend-confirm').click();
  await expect(page.getByText(`The approval e-mail for request #${request.number} went again; the earlier links no longer work.`)).toBeVisible();
  const secondAsk = await waitForMail(page.request, 'morgan.vale@demo.corewright.test', approval, 2);
  noBitting(secondAsk.text);
  await shot(page, 'request-resent');
  const outside = await browser.newContext({ viewport: { width: 1440, height: 900 } });
  const authoriser = await outside.newPage();
  await open(authoriser, linkIn(firstAsk, '/authorise'));
  await expect(authoriser.getByTestId('error-banner')).toContainText(`This link was replaced by a newer one: open the link in the newest e-mail about key request #${request.number}.`);
  await shot(authoriser, 'authorise-replaced');
  await open(authoriser, linkIn(secondAsk, '/authorise'));
  await expect(authoriser.getByTestId('authorise-request')).toContainText('Ada Quill (demo)');
  await outside.close();
});
