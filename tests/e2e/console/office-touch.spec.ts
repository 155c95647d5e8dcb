// The office's touch rule (brand.md: 48 px targets outside the Bench) on every console page at 1440×900,
// as the administrator and the supervisor: dense fields, sortable headers, table paging, checkboxes,
// toggles and links in tables included. Screenshots: test-results/screenshots/office-touch-*.png.
import { expect, test, type Page } from '@playwright/test';
import type { Door, KeySystem, WorkOrder } from '../../../shared/schemas/records';
import { demo, signIn } from '../support/session';
import { smallTargets } from '../support/touchTargets';
import { apiGet, apiSignIn } from './api';
import { freshDemo } from '../support/freshDemo';

test.beforeAll(freshDemo);

test.use({ viewport: { width: 1440, height: 900 } });

async function pagesOf(page: Page): Promise<string[]> {
  const admin = await apiSignIn(page.request, demo.admin);
  const { workOrders } = await apiGet<{ workOrders: WorkOrder[] }>(page.request, admin, '/api/work-orders');
  const { keySystems } = await apiGet<{ keySystems: KeySystem[] }>(page.request, admin, '/api/key-systems');
  const { doors } = await apiGet<{ doors: Door[] }>(page.request, admin, '/api/doors');
  const wo = workOrders.find((w) => w.hasFireRated) ?? workOrders[0]!;
  const { holders } = await apiGet<{ holders: { id: string; keysOut: number }[] }>(page.request, admin, '/api/holders');
  const holder = holders.find((h) => h.keysOut > 1) ?? holders[0]!;
  const { issues } = await apiGet<{ issues: { id: string }[] }>(page.request, admin, `/api/key-issues?holderId=${holder.id}`);
  return [
    '/overview', '/work-orders', '/work-orders/new', `/work-orders/${wo.id}`, `/work-orders/${wo.id}/print`, `/work-orders/${wo.id}/tags`,
    '/completions', '/key-systems', `/key-systems/${keySystems[0]!.id}`, '/doors', `/doors/${doors[0]!.id}/history`, '/profiles', '/cautions',
    '/key-holders', `/key-holders/${holder.id}`, '/key-requests', '/key-requests/new', '/key-issues', '/key-issues?tab=chase', '/key-issues/new',
    `/key-issues/${issues[0]!.id}/receipt`, `/key-issues/cut-list?issueIds=${issues[0]!.id}`,
  ];
}

for (const role of ['admin', 'supervisor'] as const) {
  test(`every console page keeps 48 px targets for the ${role}`, async ({ page }) => {
    test.setTimeout(150_000);
    const paths = await pagesOf(page);
    if (role === 'admin') paths.push('/key-systems/new', '/users', '/audit');
    await signIn(page, demo[role]);
    for (const path of paths) {
      await page.goto(path);
      await expect(page.locator('.q-page')).toBeVisible();
      await page.waitForLoadState('networkidle');
      await page.waitForTimeout(300);
      expect(await smallTargets(page, 48), `${path} as ${role}`).toEqual([]);
    }
    await page.goto('/doors');
    await page.waitForLoadState('networkidle');
    await page.screenshot({ path: `test-results/screenshots/office-touch-doors-${role}.png` });
    await page.goto('/work-orders/new');
    await page.waitForLoadState('networkidle');
    await page.screenshot({ path: `test-results/screenshots/office-touch-work-order-new-${role}.png` });
  });
}
