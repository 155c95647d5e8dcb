// A shop whose kit stocks wafers 2-10 only (a custom profile): its build-ups over 10 units
// are two wafers, and each seam is one more break at the control shear line. The seams
// show on the printed chart and tray (office, 1440×900) and on the Bench's tray, step
// card and Core view (tablet, 1280×800 landscape and 800×1280 portrait, touch).
// Screenshots: test-results/screenshots/seams-*.png.
import { expect, test, type Browser, type Page } from '@playwright/test';
import type { WorkOrder } from '../../../shared/schemas/records';
import { partKind } from '../support/bench';
import { demo, signIn } from '../support/session';
import { apiGet, apiSignIn, bearer, type ApiSession } from './api';
import { freshDemo } from '../support/freshDemo';

test.beforeAll(freshDemo);

const range = (a: number, b: number) => Array.from({ length: b - a + 1 }, (_, i) => a + i);
const shot = async (page: Page, name: string) => {
  await page.evaluate(() => document.fonts.ready);
  await page.waitForTimeout(400);
  await page.screenshot({ path: `test-results/screenshots/seams-${name}.png` });
};

async function post<T>(page: Page, s: ApiSession, path: string, data: unknown): Promise<T> {
  const res = await page.request.post(path, { headers: bearer(s), data });
  expect(res.status(), `${path}: ${await res.text()}`).toBe(201);
  return (await res.json()) as T;
}

/**
 * Our own example: control 2666666 over grand master A 0444444, master AA 0244444 and change
 * key AA1 0222444. Chamber 1 needs 12 units over depth 0: 10 + 2, whose seam is the control
 * line of depth 0; chambers 2-7 need 12 over depth 4: 9 + 3, seam at depth 3 (10 + 2 would
 * seam at depth 4, which the keys of the core have).
 */
async function plan(page: Page): Promise<{ number: number; id: string }> {
  const admin = await apiSignIn(page.request, demo.admin);
  await post(page, admin, '/api/profiles', {
    id: 'sfic-7-kit10', label: 'SFIC 7-pin, .0125 in steps, stack 23, wafers 2-10', chambers: 7, minDepth: 0, maxDepth: 9,
    stackUnits: 23, sleeveUnits: 10, minWaferUnits: 2, step: 2, maxAdjacentCut: 9,
    bottomPins: range(0, 9), wafers: range(2, 10), topPins: range(3, 13), chamberOneAt: 'back',
  });
  const { keySystem } = await post<{ keySystem: { id: string } }>(page, admin, '/api/key-systems', { name: 'Seam Street Workshop', profileId: 'sfic-7-kit10', control: '2666666' });
  const add = async (key: object) => (await post<{ ids: string[] }>(page, admin, `/api/key-systems/${keySystem.id}/keys`, key)).ids[0]!;
  const a = await add({ symbol: 'A', level: 'gm', bitting: '0444444' });
  const aa = await add({ symbol: 'AA', level: 'master', parentId: a, bitting: '0244444' });
  const aa1 = await add({ symbol: 'AA1', level: 'change', parentId: aa, bitting: '0222444' });
  const { door } = await post<{ door: { id: string } }>(page, admin, '/api/doors', { site: 'Seam Street', building: 'Workshop', label: 'SS-101', keySystemId: keySystem.id, keyId: aa1 });
  const users = await apiGet<{ users: { id: string; email: string }[] }>(page.request, admin, '/api/users');
  const tech = users.users.find((u) => u.email === demo.technician)!;
  const { workOrder } = await post<{ workOrder: WorkOrder }>(page, admin, '/api/work-orders', {
    title: 'Seam Street: workshop door', purpose: 'other', keySystemId: keySystem.id, assigneeId: tech.id, doors: [{ doorId: door.id, keyId: aa1 }],
  });
  return { number: workOrder.number, id: workOrder.id };
}

async function tablet(browser: Browser, viewport: { width: number; height: number }, number: number, name: string): Promise<void> {
  const context = await browser.newContext({ viewport, hasTouch: true, isMobile: false, serviceWorkers: 'allow' });
  const tab = await context.newPage();
  await signIn(tab, demo.technician);
  await tab.getByTestId(`keep-${number}`).tap();
  await tab.getByTestId(`open-${number}`).tap();
  await tab.getByTestId('open-tray').tap();
  await expect(tab.getByTestId('tray-two-wafer')).toContainText('seam at the control line of depth 0');
  await shot(tab, `${name}-tray`);
  await tab.goBack();
  await tab.locator('[data-test^="core-"]:not([data-test$="-status"])').first().tap();
  // Step with the keyboard (a pedal) to the first build-up wafer of two.
  for (let i = 0; i < 40; i++) {
    const part = (await tab.getByTestId('step-part').textContent()) ?? '';
    if (partKind(part) === 'build-up-wafer' && part.includes('1 of 2')) break;
    await tab.keyboard.press('Space');
  }
  await expect(tab.getByTestId('step-part')).toContainText('Build-up wafer 1 of 2');
  await expect(tab.getByTestId('step-seam')).toContainText('the seam, at the control line of depth 0');
  await shot(tab, `${name}-step-lower`);
  await tab.keyboard.press('Space');
  await expect(tab.getByTestId('step-part')).toContainText('Build-up wafer 2 of 2');
  await expect(tab.getByTestId('step-seam')).toContainText('Upper wafer of two');
  await expect(tab.getByTestId('core-view').getByTestId('seam-1')).toHaveCount(1);
  await shot(tab, `${name}-step-upper`);
  await context.close();
}

test('two-wafer build-ups and their seams on the chart, the tray and the Bench', async ({ page, browser }) => {
  test.setTimeout(150_000);
  await page.setViewportSize({ width: 1440, height: 900 });
  const wo = await plan(page);

  await signIn(page, demo.supervisor);
  await page.goto(`/work-orders/${wo.id}/print`);
  const chart = page.locator('[data-test^="chart-"]').first();
  await expect(chart.getByTestId('seam-1')).toHaveText('seam: depth 0 releases');
  await expect(chart.getByTestId('control-openings')).toContainText('releases for');
  await expect(chart).toContainText('10 + 2');
  await expect(page.getByTestId('tray-two-wafer')).toContainText('seam at the control line of depth 0');
  await shot(page, 'office-chart');

  await tablet(browser, { width: 1280, height: 800 }, wo.number, 'landscape');
  await tablet(browser, { width: 800, height: 1280 }, wo.number, 'portrait');
});
