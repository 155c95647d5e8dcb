// A screenshot of every console page at 1440×900, for review: test-results/screenshots/console-<page>.png.
import { expect, test, type Page } from '@playwright/test';
import type { Door, KeySystem, WorkOrder } from '../../../shared/schemas/records';
import { demo, signIn } from '../support/session';
import { apiGet, apiSignIn } from './api';
import { freshDemo } from '../support/freshDemo';

test.beforeAll(freshDemo);

test.use({ viewport: { width: 1440, height: 900 } });

const shot = async (page: Page, name: string) => {
  // Let fonts load and Quasar's transitions (dialogs, tabs, field messages) finish, so the shot shows what a person sees.
  await page.evaluate(() => document.fonts.ready);
  await page.waitForTimeout(400);
  await page.screenshot({ path: `test-results/screenshots/console-${name}.png` });
};

test('screenshots of each console page', async ({ page }) => {
  test.setTimeout(120_000);
  const admin = await apiSignIn(page.request, demo.admin);
  const { workOrders } = await apiGet<{ workOrders: WorkOrder[] }>(page.request, admin, '/api/work-orders');
  const { keySystems } = await apiGet<{ keySystems: KeySystem[] }>(page.request, admin, '/api/key-systems');
  const { doors } = await apiGet<{ doors: Door[] }>(page.request, admin, '/api/doors');
  const wo = workOrders.find((w) => w.status !== 'done') ?? workOrders[0]!;
  const done = workOrders.find((w) => w.status === 'done') ?? wo;
  const door = doors.find((d) => d.currentCoreTag) ?? doors[0]!;

  await signIn(page, demo.supervisor);
  await expect(page.getByTestId('progress-chart')).toBeVisible();
  await shot(page, 'overview');

  await page.goto('/work-orders');
  await expect(page.getByTestId('work-order-table').locator('tbody tr').first()).toBeVisible();
  await shot(page, 'work-orders');

  await page.goto('/work-orders/new');
  await page.getByTestId('door-search').fill('AH-1');
  await page.getByTestId('pick-AH-106').click();
  await page.getByTestId('pick-AH-105').click();
  await shot(page, 'work-order-new');
  await page.getByTestId('fire-cautions').scrollIntoViewIfNeeded();
  await shot(page, 'work-order-new-cautions');

  await page.goto(`/work-orders/${wo.id}`);
  await expect(page.getByTestId('wo-cores').locator('tbody tr').first()).toBeVisible();
  await shot(page, 'work-order-detail');

  await page.goto(`/work-orders/${wo.id}/print`);
  await expect(page.getByTestId('tray')).toBeVisible();
  await shot(page, 'print-charts');
  // What the printer gets: the print stylesheet drops the navigation and buttons.
  await page.emulateMedia({ media: 'print' });
  await shot(page, 'print-charts-paper');
  await page.emulateMedia({ media: 'screen' });

  await page.goto(`/work-orders/${wo.id}/tags`);
  await expect(page.locator('[data-test^="tag-qr-"]').first()).toBeVisible();
  await shot(page, 'print-tags');

  await page.goto(`/completions?workOrderId=${done.id}`);
  await expect(page.getByTestId('completion-table').locator('tbody tr').first()).toBeVisible();
  await shot(page, 'completions');
  await page.getByTestId('completion-table').locator('tbody tr').first().click();
  await expect(page.getByTestId('completion-detail')).toBeVisible();
  await shot(page, 'completion-detail');

  await page.goto(`/doors/${door.id}/history`);
  await expect(page.getByTestId('door-history').locator('tbody tr').first()).toContainText('CR-');
  await shot(page, 'door-history');

  await page.getByTestId('user-menu').click();
  await page.getByTestId('sign-out').click();
  await signIn(page, demo.admin);

  await page.goto('/key-systems');
  await expect(page.getByTestId('key-system-table').locator('tbody tr').first()).toBeVisible();
  await shot(page, 'key-systems');

  await page.goto(`/key-systems/${keySystems[0]!.id}`);
  await expect(page.getByTestId('key-node-A')).toBeVisible();
  await shot(page, 'key-system-detail');
  await page.getByTestId('show-bittings').click();
  await expect(page.getByTestId('reveal-banner')).toBeVisible();
  await expect(page.getByTestId('bitting-A')).toBeVisible();
  await shot(page, 'key-system-revealed');
  await page.getByTestId('hide-bittings').click();
  await page.getByTestId('tab-add').click();
  await shot(page, 'key-system-add');
  await page.getByTestId('prog-master').click();
  await page.getByRole('option', { name: /^AB / }).click();
  await page.getByTestId('prog-limit').fill('6');
  await page.getByTestId('prog-chambers').getByText('6', { exact: true }).click();
  await page.getByTestId('prog-chambers').getByText('7', { exact: true }).click();
  await page.getByTestId('prog-preview').click();
  await expect(page.getByTestId('prog-list')).toBeVisible();
  await page.getByTestId('prog-list').scrollIntoViewIfNeeded();
  await shot(page, 'key-system-progression');
  await page.getByTestId('tab-system-audit').click();
  await expect(page.getByTestId('system-audit-report')).toBeVisible();
  await shot(page, 'key-system-audit-report');

  await page.goto('/profiles');
  await expect(page.getByTestId('profile-table').locator('tbody tr').first()).toBeVisible();
  await shot(page, 'profiles');
  // A bad profile: the server's messages show beside the fields.
  await page.getByTestId('profile-new').click();
  await page.getByTestId('profile-id').fill('X');
  await page.getByTestId('profile-label').fill('Test profile');
  await page.getByTestId('profile-save').click();
  await expect(page.getByTestId('profile-form')).toContainText('an id is 3 to 40 lower-case letters');
  await shot(page, 'profile-form');
  await page.keyboard.press('Escape');

  await page.goto('/doors');
  await expect(page.getByTestId('doors-table').locator('tbody tr').first()).toBeVisible();
  await shot(page, 'doors');

  await page.goto('/users');
  await expect(page.getByTestId('users-table').locator('tbody tr').first()).toBeVisible();
  await shot(page, 'users');

  await page.goto('/audit-trail');
  await expect(page.getByTestId('audit-table').locator('tbody tr').first()).toBeVisible();
  await shot(page, 'audit');

  await page.goto('/dev/mailbox');
  await expect(page.getByTestId('mailbox')).toBeVisible();
  await shot(page, 'mailbox');

  await page.evaluate(() => localStorage.removeItem('cw.session'));
  await page.goto('/set-password?token=screenshot-token-not-real-000');
  await expect(page.getByTestId('new-password')).toBeVisible();
  await shot(page, 'set-password');
});
