// A supervisor plans a work order for three doors and assigns it; the technician's e-mail is
// captured; one core's completion lands through the sync API (the tablet's outbox protocol)
// and the supervisor reads it, key checks included, in the Completion log.
import { randomUUID } from 'node:crypto';
import { expect, test } from '@playwright/test';
import type { Packet } from '../../../shared/schemas/packet';
import type { CompletionRecord } from '../../../shared/schemas/sync';
import { demo, signIn } from '../support/session';
import { apiGet, apiSignIn, bearer, waitForMail } from './api';

test('a supervisor plans and assigns a work order; a synced completion shows in the Completion log', async ({ page }) => {
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

  // The technician finishes one core. The lead may swap this for the real Bench once it exists.
  const tech = await apiSignIn(page.request, demo.technician);
  const { packet } = await apiGet<{ packet: Packet }>(page.request, tech, `/api/work-orders/${workOrderId}/packet`);
  const core = packet.cores[0]!;
  const t0 = Date.now() - 20 * 60_000;
  const at = (min: number) => new Date(t0 + min * 60_000).toISOString();
  const checks = (phase: 'before-cap' | 'after-cap', from: number) =>
    core.keyCheck.map((k, i) => ({ phase, role: k.role, symbol: k.symbol, result: 'passed' as const, at: at(from + i * 0.2) }));
  const record: CompletionRecord = {
    clientId: randomUUID(),
    kind: 'completion',
    coreId: core.id,
    workOrderId,
    startedAt: at(0),
    finishedAt: at(15),
    result: 'passed',
    attempts: [
      {
        n: 1,
        startedAt: at(0),
        finishedAt: at(15),
        result: 'passed',
        steps: core.pinning.chambers.map((ch, i) => ({ kind: 'bottom' as const, chamber: ch.chamber, size: ch.bottom, at: at(1 + i * 0.5) })),
        keyChecks: [...checks('before-cap', 8), ...checks('after-cap', 12)],
      },
    ],
    notes: 'Built in the end-to-end test.',
  };
  const sync = await page.request.post('/api/sync', { headers: bearer(tech), data: { deviceId: tech.deviceId, records: [record] } });
  expect(sync.status()).toBe(200);
  expect(((await sync.json()) as { accepted: string[] }).accepted).toEqual([record.clientId]);

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
  await expect(panel.getByTestId('completion-notes')).toContainText('end-to-end');

  // The CSV export carries the same filter and the bearer token.
  const download = page.waitForEvent('download');
  await panel.getByTestId('completion-close').click();
  await page.getByTestId('export-csv').click();
  expect((await download).suggestedFilename()).toMatch(/^completion-log-.*\.csv$/);
});
