// Key control, a key audit walked as its users would: a supervisor (office, 1440x900) starts one
// over a department; each holder gets an e-mail (captured) with a link that works once, with no
// sign-in and no bitting; a holder confirms one key and flags another missing from that link on a
// phone-sized screen; the office sees who has not answered, and the missing key as a lost report.
// Screenshots: test-results/screenshots/keycontrol-audit-*.png.
import { expect, test, type Page } from '@playwright/test';
import { apiGet, apiSignIn, waitForMail } from '../console/api';
import { demo, signIn } from '../support/session';
import { smallTargets } from '../support/touchTargets';
import { freshDemo } from '../support/freshDemo';

test.beforeAll(freshDemo);

const shot = (page: Page, name: string) => page.screenshot({ path: `test-results/screenshots/keycontrol-audit-${name}.png`, fullPage: true });

test('a key audit: started by the office, answered from the mailed link, the missing key in the lost keys queue', async ({ page, browser }) => {
  test.setTimeout(120_000);
  await page.setViewportSize({ width: 1440, height: 900 });
  await signIn(page, demo.supervisor);
  const lead = await apiSignIn(page.request, demo.supervisor);
  await page.getByRole('link', { name: 'Key audits', exact: true }).click();
  expect(await smallTargets(page, 48), 'the key audits page').toEqual([]);
  await page.getByTestId('key-audit-add').click();
  await page.getByTestId('key-audit-title').fill('Library winter key audit');
  await page.getByTestId('key-audit-department').click();
  await page.getByRole('option', { name: 'Library Services' }).click();
  await shot(page, 'start');
  expect(await smallTargets(page, 48), 'the start form').toEqual([]);
  await page.getByTestId('key-audit-start').click();

  await expect(page).toHaveURL(/\/key-audits\/[0-9a-f-]{36}$/);
  await expect(page.getByTestId('key-audit-summary')).toContainText('0 of 2 holders answered');
  await expect(page.getByTestId('key-audit-answered-Bo Linden (demo)')).toContainText('Not answered');
  expect(await smallTargets(page, 48), 'the key audit page').toEqual([]);

  const mail = await waitForMail(page.request, 'bo@demo.corewright.test', /Key audit #\d+: please confirm the keys you hold/);
  expect(mail.text).toContain('key AB5, copy 1');
  expect(mail.text).not.toMatch(/\b\d{7}\b/); // no bitting in the mail
  const link = /https?:\/\/\S+\/confirm-keys#\S+/.exec(mail.text)![0];

  // The holder, on a phone, signed in nowhere.
  const phone = await browser.newContext({ viewport: { width: 390, height: 844 }, hasTouch: true });
  const tab = await phone.newPage();
  await tab.goto(link.replace(/^https?:\/\/[^/]+/, ''));
  await expect(tab.getByRole('heading', { level: 1 })).toContainText('Key audit #');
  await expect(tab.getByTestId('confirm-copy-AB2 #1')).toContainText('Key AB2, copy 1');
  await expect(tab.getByTestId('confirm-send')).toBeDisabled();
  await tab.getByTestId('confirm-answer-AB2 #1').getByText('I still have it').tap();
  await tab.getByTestId('confirm-answer-AB5 #1').getByText('I cannot find it').tap();
  await shot(tab, 'holder-390x844');
  expect(await smallTargets(tab, 48), 'the holder\'s page').toEqual([]);
  await tab.getByTestId('confirm-send').tap();
  await expect(tab.getByTestId('confirm-done')).toContainText('Your answer is recorded');
  await expect(tab.getByTestId('confirm-missing-note')).toContainText('key AB5 copy 1');
  await shot(tab, 'holder-done-390x844');
  // The link works once.
  await tab.reload();
  await expect(tab.locator('.q-card')).toContainText('expired, was used already or is not valid');
  await phone.close();

  // The office: Bo answered, Ada not yet (first); AB5 #1 flagged missing opens a lost report.
  await page.reload();
  await expect(page.getByTestId('key-audit-summary')).toContainText('1 of 2 holders answered');
  await expect(page.getByTestId('key-audit-people').locator('tbody tr').first()).toContainText('Ada Quill (demo)');
  await expect(page.getByTestId('key-audit-copy-AB5 #1')).toContainText('missing');
  await shot(page, 'report');
  await page.getByTestId('key-audit-report-AB5 #1').click();
  await expect(page.getByRole('heading', { level: 1 })).toContainText('Key AB5 #1 lost');
  await expect(page.getByTestId('report-note-text')).toContainText('key audit #');
  await page.getByRole('link', { name: 'Lost keys', exact: true }).click();
  await expect(page.getByTestId('report-row-AB5 #1')).toBeVisible();
  // Beside the lost copies: what the control key exposes, every installed core of the system (one per door holding a core).
  const { keySystems } = await apiGet<{ keySystems: { id: string; name: string }[] }>(page.request, lead, '/api/key-systems');
  const { doors } = await apiGet<{ doors: { currentCoreTag: string | null }[] }>(page.request, lead, '/api/doors');
  const installed = doors.filter((d) => d.currentCoreTag).length;
  expect(installed).toBeGreaterThan(0);
  await expect(page.getByTestId(`control-exposure-${keySystems[0]!.name}`)).toContainText(`removes ${installed} installed cores from their housings, in ${installed} doors`);
  await shot(page, 'lost-keys');
  expect(await smallTargets(page, 48), 'the lost keys page').toEqual([]);
});
