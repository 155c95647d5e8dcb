// A control key tracked like any key, at the supervisor's desk (1440×900): a copy of the campus's control
// key issued to a holder (the page warns that control keys normally stay in the shop), then reported
// lost from the holder's page; the report shows every installed core removed by it, and the plan a new
// control key with every core to rebuild, turned into the Bench's work order in one step. No bitting on
// any page. Screenshots: test-results/screenshots/kc-control-*.png.
import { expect, test, type Page } from '@playwright/test';
import type { HolderList } from '../../../shared/schemas/keyControl';
import { apiGet, apiSignIn } from '../console/api';
import { demo, signIn } from '../support/session';
import { smallTargets } from '../support/touchTargets';
import { freshDemo } from '../support/freshDemo';

test.beforeAll(freshDemo);

test.use({ viewport: { width: 1440, height: 900 } });

const shot = async (page: Page, name: string) => {
  await page.evaluate(() => document.fonts.ready);
  await page.waitForTimeout(400);
  await page.screenshot({ path: `test-results/screenshots/kc-control-${name}.png`, fullPage: true });
};

test('a control key copy issued with a warning, reported lost, its exposure and its plan made a work order', async ({ page }) => {
  test.setTimeout(120_000);
  const api = await apiSignIn(page.request, demo.supervisor);
  const hal = (await apiGet<HolderList>(page.request, api, '/api/holders')).holders.find((h) => h.name === 'Hal Whitby (demo)')!;

  await signIn(page, demo.supervisor);
  await page.goto(`/key-holders/${hal.id}`);
  await page.getByTestId('holder-issue').click();
  await expect(page).toHaveURL(/\/key-issues\/new/);
  await page.getByTestId('issue-key').fill('CK');
  await page.getByRole('option', { name: 'CK (Control key)' }).click();
  await expect(page.getByTestId('control-warning')).toContainText('Control keys normally stay in the shop');
  await page.getByTestId('ack-mode-typed').click();
  await page.getByTestId('ack-accepted').click();
  expect(await smallTargets(page, 48)).toEqual([]);
  await shot(page, 'issue');
  await page.getByTestId('issue-save').click();
  await expect(page.getByTestId('receipt-key')).toHaveText('CK #1');
  expect(await page.locator('.q-page').innerText()).not.toMatch(/\b\d{7}\b/);

  // Lost: reported from the holder's page like any copy.
  await page.getByTestId('print-back').click();
  await expect(page.getByTestId('issue-row-CK #1')).toContainText('(control key)');
  await page.getByTestId('report-CK #1').click();
  await page.getByTestId('report-form-CK #1').getByText('Lost', { exact: true }).click();
  await page.getByTestId('report-note').fill('Dropped on the loading dock');
  await page.getByTestId('report-confirm').click();
  await expect(page).toHaveURL(/\/key-reports\/[0-9a-f-]{36}$/);
  await expect(page.getByRole('heading', { level: 1 })).toContainText('Key CK #1 lost');
  const installed = (await apiGet<{ doors: { currentCoreTag: string | null }[] }>(page.request, api, '/api/doors')).doors.filter((d) => d.currentCoreTag).length;
  expect(installed).toBeGreaterThan(0);
  await expect(page.getByTestId('exposure-cores').locator('tbody tr')).toHaveCount(installed);
  await expect(page.getByTestId('exposure-cores')).toContainText('Removes the core (control key)');
  const plan = page.getByTestId('rekey-plan');
  await expect(plan).toContainText('CK is a control key');
  await expect(plan.getByTestId('choice-new-control-key')).toContainText('New control key');
  await expect(plan.getByTestId('choice-counts-new-control-key')).toContainText(`${installed} cores to build`);
  await expect(plan.getByTestId('plan-copies')).toContainText('CK #1 (Hal Whitby (demo))');
  expect(await page.locator('.q-page').innerText()).not.toMatch(/\b\d{7}\b/);
  expect(await smallTargets(page, 48)).toEqual([]);
  await shot(page, 'report');

  await page.getByTestId('plan-assignee').click();
  await page.getByRole('option', { name: /Robin Tech/ }).click();
  await expect(page.getByTestId('make-work-order')).toContainText('new key CK2');
  await page.getByTestId('make-work-order').click();
  await expect(page.getByTestId('plan-made')).toBeVisible();
  await shot(page, 'plan-made');
  await page.getByTestId('plan-work-order').click();
  await expect(page.locator('.q-page')).toContainText('Lost control key CK: rebuild every core for CK2');
  await expect(page.getByTestId('wo-cores').locator('tbody tr')).toHaveCount(installed);
  expect(await page.locator('.q-page').innerText()).not.toMatch(/\b\d{7}\b/);
  await shot(page, 'work-order');
});
