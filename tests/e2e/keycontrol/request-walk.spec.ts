// A key request from the supervisor's desk (1440×900) to the key in the holder's hand: two doors asked for,
// the lowest key proposed with every door beyond, another key looked at, the request mailed to the
// department's authoriser, approved from the mailed link in the development mailbox (no sign-in, no
// bitting; the link works once), then the key issued (typed and ticked), its receipt, and the shop's cut
// list shown only on "Show" and audited. Screenshots: test-results/screenshots/kc-request-*.png.
import { expect, test, type Page } from '@playwright/test';
import type { Door, Key, KeySystem } from '../../../shared/schemas/records';
import { naturally } from '../../../shared/words';
import { demo, signIn } from '../support/session';
import { smallTargets } from '../support/touchTargets';
import { apiGet, apiSignIn } from '../console/api';
import { freshDemo } from '../support/freshDemo';

test.beforeAll(freshDemo);

test.use({ viewport: { width: 1440, height: 900 } });

const shot = async (page: Page, name: string) => {
  await page.evaluate(() => document.fonts.ready);
  await page.waitForTimeout(400);
  await page.screenshot({ path: `test-results/screenshots/kc-request-${name}.png`, fullPage: true });
};

/** Fails when the page's text holds any bitting of the system. */
async function noBitting(page: Page, bittings: string[]): Promise<void> {
  const text = await page.locator('body').innerText();
  expect(bittings.filter((b) => text.includes(b))).toEqual([]);
}

test('a request mailed to the authoriser, approved from the link, then the key issued', async ({ page, browser }) => {
  test.setTimeout(150_000);
  const api = await apiSignIn(page.request, demo.supervisor);
  const admin = await apiSignIn(page.request, demo.admin);
  const { keySystems } = await apiGet<{ keySystems: KeySystem[] }>(page.request, api, '/api/key-systems');
  const { keys } = await apiGet<{ keys: Key[] }>(page.request, api, `/api/key-systems/${keySystems[0]!.id}/keys?reveal=1`);
  const bittings = keys.map((k) => k.bitting!).filter(Boolean);
  expect(bittings.length).toBeGreaterThan(10);
  const { doors } = await apiGet<{ doors: Door[] }>(page.request, api, '/api/doors');
  const asked = naturally(doors.filter((d) => d.label.startsWith('BL-') && d.currentCoreTag), (d) => d.label).slice(0, 2);
  expect(asked).toHaveLength(2);

  await signIn(page, demo.supervisor);
  await page.getByTestId('nav-keyRequests.list').click();
  await page.getByTestId('request-new').click();
  await expect(page).toHaveURL(/\/key-requests\/new$/);
  await page.getByTestId('request-holder').fill('Whitby');
  await page.getByRole('option', { name: /Hal Whitby/ }).click();
  await expect(page.getByTestId('request-authorisers')).toContainText('Noor Ashby (demo)');
  await page.getByTestId('request-reason').fill('Evening shifts in the library reading rooms (demo).');
  for (const d of asked) {
    await page.getByTestId('door-search').fill(d.label);
    await page.getByTestId(`pick-${d.label}`).click();
  }
  await page.getByTestId('door-search').fill('');
  await page.getByTestId('request-propose').click();

  // The lowest key that opens both: their master, with every door beyond them.
  const summary = page.getByTestId('proposal-summary');
  await expect(summary).toContainText('Corewright proposes key AB (Master)');
  for (const d of asked) await expect(page.getByTestId(`opens-${d.label}`)).toContainText('Asked for');
  const beyond = await page.getByTestId('key-opens').locator('tbody tr', { hasText: 'Beyond the request' }).count();
  expect(beyond).toBeGreaterThan(0);
  await expect(summary).toContainText(`It also opens ${beyond} door`);
  expect(await smallTargets(page, 48)).toEqual([]);
  await shot(page, 'proposal');
  // Another key would do too (the grand master: every door AB opens, and any other installed core): the
  // supervisor looks at it and sees every door it opens; then keeps AB.
  const choices = page.getByTestId('key-choice').getByRole('radio');
  expect(await choices.count()).toBeGreaterThan(1);
  await page.getByTestId('key-choice').getByText(/^A \(/).click();
  await expect(page.getByTestId('chosen-other')).toBeVisible();
  await expect.poll(() => page.getByTestId('key-opens').locator('tbody tr').count()).toBeGreaterThanOrEqual(beyond + 2);
  await shot(page, 'other-key');
  await page.getByTestId('key-choice').getByText(/^AB \(/).click();
  await expect(page.getByTestId('chosen-other')).toHaveCount(0);
  await noBitting(page, bittings);
  await page.getByTestId('request-send').click();

  await expect(page).toHaveURL(/\/key-requests\/[0-9a-f-]{36}$/);
  await expect(page.getByTestId('request-status-pending')).toBeVisible();
  await expect(page.getByTestId('request-key')).toHaveText('AB');
  await shot(page, 'sent');

  // The authoriser's mail, read in the development mailbox; its link opens without sign-in.
  await page.goto('/dev/mailbox');
  const mail = page.locator('[data-test^="mail-"]').filter({ hasText: 'to noor.ashby@demo.corewright.test' }).first();
  await expect(mail).toContainText('Key request #');
  if (!(await mail.getByTestId('mail-link').isVisible())) await mail.locator('.q-item').first().click();
  await expect(mail).toContainText('Proposed key: AB.');
  await noBitting(page, bittings);
  await shot(page, 'mailbox');
  const href = new URL((await mail.getByTestId('mail-link').getAttribute('href'))!);
  expect(href.pathname).toBe('/authorise');
  expect(href.hash).toMatch(/^#[A-Za-z0-9_-]{43}$/);
  const link = href.pathname + href.hash;

  const outside = await browser.newContext({ viewport: { width: 1440, height: 900 } });
  const authoriser = await outside.newPage();
  await authoriser.goto(link);
  await expect(authoriser.getByTestId('authorise-request')).toContainText('Hal Whitby (demo)');
  await expect(authoriser.getByTestId('authorise-key')).toHaveText('AB');
  await expect(authoriser.getByTestId('authorise-doors')).toContainText(asked[0]!.label);
  await noBitting(authoriser, bittings);
  expect(await smallTargets(authoriser, 48)).toEqual([]);
  await shot(authoriser, 'authorise');
  await authoriser.getByTestId('authorise-note').fill('Approved for the autumn term (demo).');
  await authoriser.getByTestId('authorise-approve').click();
  await expect(authoriser.getByTestId('authorise-decided')).toContainText('Approved by Noor Ashby (demo)');
  await shot(authoriser, 'authorised');
  // The link works once.
  await authoriser.reload();
  await expect(authoriser.getByTestId('error-banner')).toContainText('was used already');
  await outside.close();

  // Back at the desk: the decision and who made it; then the key is issued from the request.
  await page.goto('/key-requests');
  const row = page.locator('[data-test^="request-row-"]').filter({ hasText: 'Hal Whitby (demo)' });
  await expect(row).toContainText('Approved');
  await expect(row).toContainText('Noor Ashby (demo)');
  await shot(page, 'list');
  await row.locator('a').first().click();
  await expect(page.getByTestId('request-decided-by')).toHaveText('Noor Ashby (demo)');
  await page.getByTestId('request-issue').click();
  await expect(page).toHaveURL(/\/key-issues\/new\?requestId=/);
  await expect(page.locator('.q-field', { has: page.getByTestId('issue-key') })).toContainText('AB (Master)');
  await expect(page.getByTestId('acknowledgement')).toContainText('I received key AB.');
  await page.getByTestId('ack-mode-typed').click();
  await expect(page.getByTestId('ack-name')).toHaveValue('Hal Whitby (demo)');
  await page.getByTestId('ack-name').fill('Hal Whitby');
  // Not ticked: refused with the reason, nothing issued.
  await page.getByTestId('issue-save').click();
  await expect(page.getByTestId('acknowledgement')).toContainText('must tick');
  await page.getByTestId('ack-accepted').click();
  await shot(page, 'issue');
  await page.getByTestId('issue-save').click();

  // The receipt: the key by symbol and copy number only.
  await expect(page).toHaveURL(/\/key-issues\/[0-9a-f-]{36}\/receipt/);
  await expect(page.getByTestId('receipt-key')).toHaveText('AB #2');
  await expect(page.getByTestId('receipt')).toContainText('Noor Ashby (demo)');
  await expect(page.getByTestId('receipt-signature')).toContainText('Typed and accepted on screen');
  await noBitting(page, bittings);
  await shot(page, 'receipt');
  // On paper: the receipt alone, on one page (no menu, header, notice or buttons).
  await page.emulateMedia({ media: 'print' });
  await expect(page.getByTestId('receipt')).toBeVisible();
  for (const hidden of ['.q-header', '.q-drawer', '[data-test="receipt-issued"]', '[data-test="print"]']) await expect(page.locator(hidden)).toBeHidden();
  const pdf = await page.pdf({ format: 'A4' });
  expect(pdf.toString('latin1').match(/\/Type\s*\/Page[^s]/g)).toHaveLength(1);
  await shot(page, 'receipt-print');
  await page.emulateMedia({ media: 'screen' });

  // The cut list: nothing restricted until "Show", which the audit trail records.
  const before = (await apiGet<{ total: number }>(page.request, admin, '/api/audit-events?action=bittings.')).total;
  await page.getByTestId('receipt-cut-list').click();
  await expect(page.getByTestId('restricted-note')).toBeVisible();
  await expect(page.getByTestId('cut-list')).toHaveCount(0);
  await noBitting(page, bittings);
  await page.getByTestId('cut-list-show').click();
  const ab = keys.find((k) => k.symbol === 'AB')!;
  await expect(page.getByTestId('cut-bitting-AB')).toHaveText(ab.bitting!);
  await expect(page.getByTestId('cut-AB')).toContainText('#2');
  expect((await apiGet<{ total: number }>(page.request, admin, '/api/audit-events?action=bittings.')).total).toBe(before + 1);
  await shot(page, 'cut-list');
});
