// The office's records, walked at 1440×900: a key's panel (the doors it operates, intended or
// incidental), the audit trail in names and words with its filters in the URL and an export, the
// completion detail with the key checks first and the steps folded, the "had a failed key check"
// filter. Screenshots: test-results/screenshots/office-*.png.
import { expect, test, type Page } from '@playwright/test';
import type { KeySystem, WorkOrder } from '../../../shared/schemas/records';
import { demo, signIn } from '../support/session';
import { apiGet, apiSignIn } from './api';
import { freshDemo } from '../support/freshDemo';

test.beforeAll(freshDemo);

test.use({ viewport: { width: 1440, height: 900 } });

const shot = async (page: Page, name: string) => {
  await page.evaluate(() => document.fonts.ready);
  await page.waitForTimeout(400);
  await page.screenshot({ path: `test-results/screenshots/office-${name}.png` });
};
const uuid = /[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}/i;

test('an administrator opens a key, reads the audit trail by person and action, and exports it', async ({ page }) => {
  test.setTimeout(120_000);
  const admin = await apiSignIn(page.request, demo.admin);
  const { keySystems } = await apiGet<{ keySystems: KeySystem[] }>(page.request, admin, '/api/key-systems');
  const ks = keySystems.find((k) => k.name === 'Quillon Hill College')!;
  await signIn(page, demo.admin);
  await page.goto(`/key-systems/${ks.id}`);
  await page.getByTestId('key-node-AA').click();
  await expect(page.getByTestId('key-panel')).toBeVisible();
  await expect(page.getByTestId('key-operates').locator('tbody tr').first()).toContainText(/Intended/);
  // Bittings stay hidden until shown (and showing is audited on the page, not here).
  await expect(page.getByTestId('key-panel-bitting')).toHaveText(/^•+$/);
  await shot(page, 'key-panel');
  await page.getByTestId('key-panel-close').click();
  // Showing bittings is the audited act the log below must name.
  await page.getByTestId('show-bittings').click();
  await page.getByTestId('key-node-AA').click();
  await expect(page.getByTestId('key-panel-bitting')).toHaveText(/^\d{7}$/);
  await page.getByTestId('key-panel-close').click();

  await page.goto('/audit-trail');
  await expect(page.getByTestId('audit-table').locator('tbody tr').first()).toBeVisible();
  await page.getByTestId('audit-action').click();
  await page.getByRole('option', { name: 'Bittings seen' }).click();
  await expect(page).toHaveURL(/action=bittings\./);
  await expect(page.getByTestId('audit-table')).toContainText('Saw bittings');
  await expect(page.getByTestId('audit-table')).toContainText('Key system Quillon Hill College');
  expect(await page.getByTestId('audit-table').innerText()).not.toMatch(uuid);
  await shot(page, 'audit-trail');
  // The filter survives a reload: it lives in the URL.
  await page.reload();
  await expect(page.getByTestId('audit-action')).toHaveValue('Bittings seen');
  const download = page.waitForEvent('download');
  await page.getByTestId('audit-export').click();
  expect((await download).suggestedFilename()).toMatch(/^audit-trail-.*\.csv$/);
  await page.goto('/audit-trail?action=audit.exported');
  await expect(page.getByTestId('audit-table')).toContainText('Exported the audit trail');
});

test('a supervisor reads a completion: result and key checks first, the steps folded; the failed-check filter is in the URL', async ({ page }) => {
  test.setTimeout(90_000);
  const lead = await apiSignIn(page.request, demo.supervisor);
  const { workOrders } = await apiGet<{ workOrders: WorkOrder[] }>(page.request, lead, '/api/work-orders');
  const done = workOrders.find((w) => w.status === 'done')!;
  await signIn(page, demo.supervisor);
  await page.goto(`/completions?workOrderId=${done.id}`);
  await page.getByTestId('filter-had-failed').click();
  await expect(page).toHaveURL(/hadFailedCheck=1/);
  await shot(page, 'completions-had-failed');
  await page.goto(`/completions?workOrderId=${done.id}`);
  await page.getByTestId('completion-table').locator('tbody tr').first().click();
  const detail = page.getByTestId('completion-detail');
  await expect(detail).toBeVisible();
  await expect(page.getByTestId('completion-summary')).toContainText(/Passed|Failed/);
  await expect(page.getByTestId('steps-1')).toBeHidden();
  await shot(page, 'completion-detail');
  await page.getByTestId('steps-fold').click();
  await expect(page.getByTestId('steps-1')).toBeVisible();
  await shot(page, 'completion-detail-steps');
});
