// Case T4 of ../shared/design/reliability.md, walked as its users would: the technician on a
// touch tablet builds a core and chooses another door than the planned one (a rust stop that asks
// why), the office sees the mismatch everywhere the core appears and a supervisor marks it reviewed.
// The pin sizes of the completion stay hidden until an audited reveal (T9).
import { expect, test, type Page } from '@playwright/test';
import { apiGet, apiSignIn, bearer } from '../console/api';
import { buildCore } from '../support/bench';
import { demo, signIn } from '../support/session';
import { freshDemo } from '../support/freshDemo';

test.beforeAll(freshDemo);

const tablets = [
  { width: 1280, height: 800 },
  { width: 800, height: 1280 },
];
const office = { width: 1440, height: 900 };
const shot = (page: Page, name: string) => page.screenshot({ path: `test-results/screenshots/${name}.png` });

test('a core installed in another door: a stop with a reason on the tablet, a mismatch to review in the office', async ({ page, browser, request }) => {
  test.setTimeout(180_000);
  // A store room on the second floor of Aster Hall keyed to the floor's master: that key turns a lab core.
  const admin = await apiSignIn(request, demo.admin);
  const lead = await apiSignIn(request, demo.supervisor);
  const { doors } = await apiGet<{ doors: { id: string; label: string; keyId: string; keySystemId: string }[] }>(request, lead, '/api/doors?q=AH-313');
  const lab = doors.find((d) => d.label === 'AH-313')!;
  const { keys } = await apiGet<{ keys: { id: string; symbol: string }[] }>(request, lead, `/api/key-systems/${lab.keySystemId}/keys`);
  const master = keys.find((k) => k.symbol === 'AA')!;
  const store = await request.post('/api/doors', { headers: bearer(admin), data: { site: 'Quillon Hill College', building: 'Aster Hall', floor: '3', room: '3ST', label: 'AH-3STORE', keySystemId: lab.keySystemId, keyId: master.id } });
  expect(store.status(), await store.text()).toBe(201);
  const storeId = ((await store.json()) as { door: { id: string } }).door.id;
  const tech = await apiSignIn(request, demo.technician);
  const created = await request.post('/api/work-orders', {
    headers: bearer(lead),
    data: { title: 'Aster Hall: store room and lab 313', purpose: 'maintenance', keySystemId: lab.keySystemId, assigneeId: tech.userId, doors: [{ doorId: lab.id, keyId: lab.keyId }, { doorId: storeId, keyId: master.id }] },
  });
  expect(created.status(), await created.text()).toBe(201);
  const wo = ((await created.json()) as { workOrder: { id: string; number: number } }).workOrder;
  const { cores } = await apiGet<{ cores: { id: string; tag: string; doorLabel: string }[] }>(request, lead, `/api/work-orders/${wo.id}`);
  const labCore = cores.find((c) => c.doorLabel === 'AH-313')!;

  // The tablet, by touch: build the lab core, then take it to the store room instead.
  const tablet = await browser.newContext({ viewport: tablets[0], hasTouch: true, serviceWorkers: 'allow' });
  const tab = await tablet.newPage();
  await signIn(tab, demo.technician);
  await tab.getByTestId(`keep-${wo.number}`).tap();
  await tab.getByTestId(`open-${wo.number}`).tap();
  await tab.getByTestId(`core-${labCore.tag}`).tap();
  await buildCore(tab);
  await tab.getByTestId('go-install').tap();
  await expect(tab.getByTestId('confirm-install')).toBeEnabled();
  await expect(tab.getByTestId('install-other-door')).toHaveCount(0);
  await tab.getByTestId('install-door').tap();
  await tab.getByRole('option', { name: /AH-3STORE/ }).tap();

  const stop = tab.getByTestId('install-other-door');
  await expect(stop).toBeVisible();
  await expect(stop).toContainText(`Core ${labCore.tag} was built for door AH-313, not AH-3STORE`);
  // A stop, not the brass primary action: the confirm button is rust and waits for a reason.
  const confirm = tab.getByTestId('confirm-install');
  await expect(confirm).toBeDisabled();
  expect(await confirm.evaluate((el) => getComputedStyle(el).backgroundColor)).toBe('rgb(180, 70, 46)');
  expect(await stop.evaluate((el) => getComputedStyle(el).borderTopColor)).toBe('rgb(180, 70, 46)');
  for (const size of tablets) {
    await tab.setViewportSize(size);
    await tab.waitForTimeout(200);
    await shot(tab, `bench-install-other-door-${size.width}x${size.height}`);
    const box = await confirm.boundingBox();
    expect(box!.height).toBeGreaterThanOrEqual(56); // brand.md: Bench targets at least 56 px
  }
  await tab.setViewportSize(tablets[0]!);
  // Going back to the planned door is one tap and clears the stop.
  await tab.getByTestId('use-planned-door').tap();
  await expect(stop).toHaveCount(0);
  await tab.getByTestId('install-door').tap();
  await tab.getByRole('option', { name: /AH-3STORE/ }).tap();
  await tab.getByTestId('mismatch-reason').fill('Lab 313 door is on order; the store room needs a core today');
  await expect(confirm).toBeEnabled();
  await shot(tab, 'bench-install-other-door-reason-1280x800');
  await confirm.tap();
  await expect(tab.getByTestId(`core-${labCore.tag}-status`)).toContainText('AH-3STORE');
  await tab.getByTestId('outbox-status').tap();
  await tab.getByTestId('sync-now').tap();
  await tab.keyboard.press('Escape');
  await expect(tab.getByTestId('outbox-status')).toContainText('0 waiting', { timeout: 20_000 });
  await tablet.close();

  // The office at 1440x900.
  await page.setViewportSize(office);
  await signIn(page, demo.supervisor);
  const item = page.getByTestId(`overview-mismatch-${labCore.tag}`);
  await expect(item).toContainText(`is in AH-3STORE, planned for AH-313`);
  await shot(page, 'console-overview-mismatch');
  await item.click();
  await expect(page).toHaveURL(new RegExp(`/completions\\?coreId=${labCore.id}`));
  const doorCell = page.getByTestId(`completion-door-${labCore.tag}`);
  await expect(doorCell).toContainText('AH-3STORE');
  await expect(doorCell.getByTestId('mismatch-chip')).toContainText('Door mismatch: built for AH-313');
  await shot(page, 'console-completion-log-mismatch');

  await page.getByTestId(`completion-row-${labCore.tag}`).click();
  const panel = page.getByTestId('completion-panel');
  await expect(panel.getByTestId('completion-where')).toContainText('Installed in door AH-3STORE · built for AH-313');
  await expect(panel.getByTestId('mismatch-reason')).toContainText('Lab 313 door is on order');
  // Pin sizes stay sealed until an audited reveal.
  await expect(panel.getByTestId('steps-1')).not.toContainText('size');
  await shot(page, 'console-completion-detail-mismatch');
  await panel.getByTestId('reveal-pin-sizes').click();
  await expect(panel.getByTestId('reveal-banner')).toBeVisible();
  await expect(panel.getByTestId('steps-1')).toContainText('size');
  await panel.getByTestId('mark-reviewed').click();
  await expect(panel.getByTestId('mismatch-reviewed')).toContainText('Reviewed by Sam Lead (demo)');
  await shot(page, 'console-completion-detail-reviewed');
  await panel.getByTestId('completion-close').click();
  await expect(doorCell.getByTestId('mismatch-chip')).toContainText('Mismatch reviewed');

  await page.goto(`/doors/${storeId}/history`);
  await expect(page.getByTestId('door-history')).toContainText(labCore.tag);
  await expect(page.getByTestId('door-history').getByTestId('mismatch-chip')).toContainText('Mismatch reviewed: built for AH-313');
  await shot(page, 'console-door-history-mismatch');
  await page.goto(`/work-orders/${wo.id}`);
  await expect(page.getByTestId(`wo-core-door-${labCore.tag}`)).toHaveText('AH-3STORE');
  await shot(page, 'console-work-order-mismatch');
  await page.goto('/overview');
  await expect(page.getByTestId('overview-mismatches')).toContainText('Door mismatches to review (0)');
});
