// A supervisor plans a work order for three doors and assigns it; the technician's e-mail is
// captured; the technician (a second browser context: the tablet) builds one core on the
// Bench and syncs it; the supervisor reads it, key checks included, in the Completion log.
import { expect, test } from '@playwright/test';
import type { Packet } from '../../../shared/schemas/packet';
import { buildCore } from '../support/bench';
import { demo, signIn } from '../support/session';
import { apiGet, apiSignIn, waitForMail } from './api';
import { freshDemo } from '../support/freshDemo';

test.beforeAll(freshDemo);

test('a supervisor plans and assigns a work order; the technician builds a core on the Bench; the Completion log shows it', async ({ page, browser }) => {
  await signIn(page, demo.supervisor);
  await expect(page).toHaveURL(/\/overview/);
  await page.getByTestId('overview-new-work-order').click();
  await expect(page).toHaveURL(/\/work-orders\/new/);

  await page.getByTestId('wo-title').fill('Cinder Works: fourth-floor offices');
  await page.getByTestId('wo-assignee').click();
  await page.getByRole('option', { name: /Robin Tech/ }).click();
  await page.getByTestId('door-search').fill('CW-10');
  for (const label of ['CW-104', 'CW-105', 'CW-106']) await page.getByTestId(`pick-${label}`).click();
  await expect(page.getByTestId('chosen-doors').locator('tbody tr')).toHaveCount(3);

  // CW-106 is fire-rated: the cautions must be acknowledged before saving.
  await expect(page.getByTestId('fire-cautions')).toContainText('CW-106');
  await expect(page.getByTestId('wo-save')).toBeDisabled();
  await page.getByTestId('fire-ack').click();
  await expect(page.getByTestId('wo-save')).toBeEnabled();
  await page.getByTestId('wo-save').click();

  await expect(page).toHaveURL(/\/work-orders\/[0-9a-f-]{36}$/);
  const workOrderId = page.url().split('/').pop()!;
  await expect(page.getByTestId('wo-cores').locator('tbody tr')).toHaveCount(3);
  await expect(page.getByTestId('wo-assignee-name')).toContainText('Robin Tech');
  const number = (await page.getByRole('heading', { level: 1 }).textContent())!.match(/#(\d+)/)![1];

  const mail = await waitForMail(page.request, demo.technician, new RegExp(`Work order #${number} assigned to you`));
  expect(mail.text).toContain('3 core(s)');
  expect(mail.text).not.toMatch(/\b\d{7}\b/); // no bitting in the mail

  // The technician, in a second browser context (the tablet), keeps the work order and builds one core on the Bench.
  const tablet = await browser.newContext({ viewport: { width: 1280, height: 800 }, serviceWorkers: 'allow' });
  const tab = await tablet.newPage();
  await signIn(tab, demo.technician);
  await tab.getByTestId(`keep-${number}`).click();
  await tab.getByTestId(`open-${number}`).click();
  const first = tab.locator('[data-test^="core-CR-"]:not([data-test$="-status"])').first();
  const tag = (await first.getAttribute('data-test'))!.replace('core-', '');
  await first.click();
  await buildCore(tab);
  await tab.getByTestId('outbox-status').click();
  await tab.getByTestId('sync-now').click();
  await expect(tab.getByTestId('outbox-status')).toContainText('0 waiting', { timeout: 20_000 });
  await tablet.close();
  const { packet } = await apiGet<{ packet: Packet }>(page.request, await apiSignIn(page.request, demo.supervisor), `/api/work-orders/${workOrderId}/charts`);
  const core = packet.cores.find((c) => c.tag === tag)!;

  await page.goto(`/completions?workOrderId=${workOrderId}`);
  await expect(page.getByTestId('sync-note')).toContainText('work still on a tablet appears after its next sync');
  const row = page.getByTestId(`completion-row-${core.tag}`);
  await expect(row).toBeVisible();
  await expect(page.getByTestId('completion-table').locator('tbody tr')).toHaveCount(1);
  await row.click();
  const panel = page.getByTestId('completion-panel');
  await expect(panel.getByTestId('completion-detail')).toContainText(core.tag);
  const change = core.keyCheck.find((k) => k.role === 'change')!;
  await expect(panel.getByTestId(`key-check-${change.symbol}-before-cap`)).toContainText('Passed');
  await expect(panel.getByTestId(`key-check-CONTROL-after-cap`)).toContainText('Passed');

  // The CSV export carries the same filter and the bearer token.
  const download = page.waitForEvent('download');
  await panel.getByTestId('completion-close').click();
  await page.getByTestId('export-csv').click();
  expect((await download).suggestedFilename()).toMatch(/^completion-log-.*\.csv$/);
});
