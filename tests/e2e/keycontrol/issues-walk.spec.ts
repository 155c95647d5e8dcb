// Keys issued at the administrator's desk (1440×900): copies out, a cut list for two chosen copies, the
// keys to chase (overdue, holder leaving) with a return taken from there, and a request approved in the
// app rather than from the mail. Screenshots: test-results/screenshots/kc-issues-*.png.
import { expect, test, type Page } from '@playwright/test';
import type { Door, Key, KeySystem } from '../../../shared/schemas/records';
import type { HolderList } from '../../../shared/schemas/keyControl';
import type { KeyRequestAnswer } from '../../../shared/schemas/keyControlRequests';
import { demo, signIn } from '../support/session';
import { smallTargets } from '../support/touchTargets';
import { apiGet, apiSignIn, bearer } from '../console/api';
import { freshDemo } from '../support/freshDemo';

test.beforeAll(freshDemo);

test.use({ viewport: { width: 1440, height: 900 } });

const shot = async (page: Page, name: string) => {
  await page.evaluate(() => document.fonts.ready);
  await page.waitForTimeout(400);
  await page.screenshot({ path: `test-results/screenshots/kc-issues-${name}.png`, fullPage: true });
};

test('keys out, a cut list, the keys to chase with a return, a request approved in the app', async ({ page }) => {
  test.setTimeout(120_000);
  const api = await apiSignIn(page.request, demo.admin);
  const { keySystems } = await apiGet<{ keySystems: KeySystem[] }>(page.request, api, '/api/key-systems');
  const { keys } = await apiGet<{ keys: Key[] }>(page.request, api, `/api/key-systems/${keySystems[0]!.id}/keys?reveal=1`);
  const bitting = (symbol: string) => keys.find((k) => k.symbol === symbol)!.bitting!;

  await signIn(page, demo.admin);
  await page.getByTestId('nav-keyIssues.list').click();
  await expect(page.getByTestId('issue-row-AB1 #1')).toContainText('Ada Quill (demo)');
  // Lost copies are not out: Cass's AB7 is on the lost-key report, not here.
  await expect(page.getByTestId('issue-row-AB7 #1')).toHaveCount(0);
  await expect(page.getByTestId('issues-cut-list')).toBeDisabled();
  expect(await smallTargets(page, 48)).toEqual([]);
  await shot(page, 'out');

  // A cut list for two chosen copies: bittings only after "Show".
  await page.getByTestId('pick-AB1 #1').click();
  await page.getByTestId('pick-AA7 #1').click();
  await expect(page.getByTestId('issues-cut-list')).toContainText('Cut list for 2 copies');
  await page.getByTestId('issues-cut-list').click();
  await expect(page.getByTestId('cut-list-page')).toContainText('2 key copies to cut and stamp');
  expect(await page.locator('body').innerText()).not.toContain(bitting('AB1'));
  await page.getByTestId('cut-list-show').click();
  await expect(page.getByTestId('cut-bitting-AA7')).toHaveText(bitting('AA7'));
  await expect(page.getByTestId('cut-bitting-AB1')).toHaveText(bitting('AB1'));
  // Natural symbol order: AA7 before AB1.
  await expect(page.getByTestId('cut-list').locator('tbody tr').first()).toContainText('AA7');
  await shot(page, 'cut-list');

  // The keys to chase: Bo's overdue AB5, and every key Fin (leaving) still holds.
  await page.getByTestId('print-back').click();
  await page.getByTestId('tab-chase').click();
  await expect(page).toHaveURL(/tab=chase/);
  await expect(page.getByTestId('issue-row-AB5 #1')).toContainText('Past its due date');
  await expect(page.getByTestId('issue-status-AB5 #1')).toContainText('Overdue');
  await expect(page.getByTestId('issue-row-AD2 #1')).toContainText('Holder leaving');
  await expect(page.getByTestId('issue-row-AB3 #1')).toContainText('Fin Hart (demo)');
  await expect(page.getByTestId('tab-chase')).toContainText('To chase (3)');
  expect(await smallTargets(page, 48)).toEqual([]);
  await shot(page, 'chase');
  await page.getByTestId('return-AB5 #1').click();
  await page.getByTestId('return-confirm').click();
  await expect(page.getByTestId('issue-row-AB5 #1')).toHaveCount(0);
  await expect(page.getByTestId('tab-chase')).toContainText('To chase (2)');
  await page.getByTestId('tab-all').click();
  await expect(page.getByTestId('issue-status-AB5 #1')).toContainText('Returned');
  await shot(page, 'returned');

  // A request approved in the app: the decision and who made it, then "Issue the key".
  const gia = (await apiGet<HolderList>(page.request, api, '/api/holders?q=Torres')).holders[0]!;
  const { doors } = await apiGet<{ doors: Door[] }>(page.request, api, '/api/doors');
  const door = doors.find((d) => d.label.startsWith('BL-') && d.currentCoreTag)!;
  const made = await page.request.post('/api/key-requests', { headers: bearer(api), data: { holderId: gia.id, doorIds: [door.id], reason: 'Covering the library desk (demo).' } });
  expect(made.status()).toBe(201);
  const { request } = (await made.json()) as KeyRequestAnswer;
  await page.getByTestId('nav-keyRequests.list').click();
  await page.getByTestId('requests-status').click();
  await page.getByRole('option', { name: 'Waiting for a decision' }).click();
  await expect(page.getByTestId(`request-row-${request.number}`)).toContainText('Gia Torres (demo)');
  await page.getByTestId(`request-open-${request.number}`).click();
  await expect(page.getByTestId(`opens-${door.label}`)).toContainText('Asked for');
  expect(await smallTargets(page, 48)).toEqual([]);
  await page.getByTestId('request-approve').click();
  await page.locator('.q-dialog input').fill('Approved at the desk (demo).');
  await page.getByTestId('decision-confirm').click();
  await expect(page.getByTestId('request-status-approved')).toBeVisible();
  await expect(page.getByTestId('request-decided-by')).toHaveText('Alex Admin (demo)');
  await expect(page.getByTestId('request-issue')).toBeVisible();
  await shot(page, 'approved-in-app');
});
