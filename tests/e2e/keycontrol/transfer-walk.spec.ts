// A key copy passed on at the supervisor's desk (1440×900): Fin, who is leaving, hands AB3 #1 to Hal.
// From Fin's page: Transfer, the new holder chosen, the acknowledgement typed and ticked; the receipt
// keeps the copy number and says whom it came from; Fin's history shows it passed on, his keys to
// return no longer list it; Hal's page holds it and what he can open now includes its door; the door
// lists Hal, not Fin. Screenshots: test-results/screenshots/kc-transfer-*.png.
import { expect, test, type Page } from '@playwright/test';
import type { HolderList } from '../../../shared/schemas/keyControl';
import type { DoorAccess } from '../../../shared/schemas/keyControlExposure';
import { demo, signIn } from '../support/session';
import { smallTargets } from '../support/touchTargets';
import { apiGet, apiSignIn } from '../console/api';
import { freshDemo } from '../support/freshDemo';

test.beforeAll(freshDemo);

test.use({ viewport: { width: 1440, height: 900 } });

const shot = async (page: Page, name: string) => {
  await page.evaluate(() => document.fonts.ready);
  await page.waitForTimeout(400);
  await page.screenshot({ path: `test-results/screenshots/kc-transfer-${name}.png`, fullPage: true });
};

test('a copy passes from a holder who is leaving to a colleague, keeping its copy number', async ({ page }) => {
  test.setTimeout(120_000);
  const api = await apiSignIn(page.request, demo.supervisor);
  const { holders } = await apiGet<HolderList>(page.request, api, '/api/holders');
  const fin = holders.find((h) => h.name === 'Fin Hart (demo)')!;
  const hal = holders.find((h) => h.name === 'Hal Whitby (demo)')!;

  await signIn(page, demo.supervisor);
  await page.getByTestId('nav-holders.list').click();
  await page.getByTestId('holder-row-Fin Hart (demo)').getByRole('link').first().click();
  await expect(page.getByTestId('to-return-AB3 #1')).toBeVisible();
  await expect(page.getByTestId('transfer-AB3 #1')).toBeVisible();
  expect(await smallTargets(page, 48)).toEqual([]);
  await shot(page, 'holder-before');

  await page.getByTestId('transfer-AB3 #1').click();
  await expect(page).toHaveURL(/\/key-issues\/[0-9a-f-]+\/transfer$/);
  await expect(page.getByTestId('transfer-copy')).toHaveText('AB3 #1');
  // Only active holders other than Fin can receive it: Fin is not offered, nor anyone leaving.
  await page.getByTestId('transfer-holder').click();
  await expect(page.getByRole('option', { name: /Fin Hart/ })).toHaveCount(0);
  await page.getByTestId('transfer-holder').fill('Whitby');
  await page.getByRole('option', { name: /Hal Whitby/ }).click();
  await expect(page.getByTestId('ack-name')).toHaveValue('Hal Whitby (demo)');
  await expect(page.getByTestId('ack-accepted')).toContainText('I received key AB3 #1');
  // Signing is the default: without a signature the form says what to do and sends nothing.
  await page.getByTestId('transfer-save').click();
  await expect(page.getByText('The holder signs in the box first')).toBeVisible();
  await page.getByTestId('ack-mode-typed').click();
  // Typed and ticked needs no signature: the message goes.
  await expect(page.getByText('The holder signs in the box first')).toHaveCount(0);
  await page.getByTestId('ack-name').fill('Hal Whitby');
  await page.getByTestId('ack-accepted').click();
  expect(await smallTargets(page, 48)).toEqual([]);
  await shot(page, 'form');
  await page.getByTestId('transfer-save').click();

  // The receipt: the same copy number, now Hal's, passed on from Fin; no bitting on it.
  await expect(page.getByTestId('receipt-transferred')).toContainText('AB3 #1 passed from Fin Hart (demo) to Hal Whitby (demo)');
  await expect(page.getByTestId('receipt-key')).toHaveText('AB3 #1');
  await expect(page.getByTestId('receipt-holder')).toContainText('Hal Whitby (demo)');
  await expect(page.getByTestId('receipt-from')).toHaveText('Fin Hart (demo)');
  await expect(page.getByTestId('receipt-signature')).toContainText('Hal Whitby');
  await shot(page, 'receipt');

  // Hal holds it, received from Fin, and can open its door now.
  await page.getByTestId('print-back').click();
  await expect(page).toHaveURL(new RegExp(`/key-holders/${hal.id}$`));
  await expect(page.getByTestId('issue-status-AB3 #1')).toContainText('Out');
  await expect(page.getByTestId('passed-from-AB3 #1')).toContainText('from Fin Hart (demo)');
  await expect(page.getByTestId('access-BL-103').filter({ hasText: 'AB3 #1' })).toBeVisible();
  await shot(page, 'new-holder');

  // Fin's history keeps the record, passed on to Hal; his keys to return no longer list it.
  await page.getByTestId('passed-from-AB3 #1').getByRole('link').click();
  await expect(page).toHaveURL(new RegExp(`/key-holders/${fin.id}$`));
  await expect(page.getByTestId('issue-status-AB3 #1')).toContainText('Passed on');
  await expect(page.getByTestId('passed-to-AB3 #1')).toContainText('to Hal Whitby (demo)');
  await expect(page.getByTestId('transfer-AB3 #1')).toHaveCount(0);
  await expect(page.getByTestId('to-return-AB3 #1')).toHaveCount(0);
  await expect(page.getByTestId('to-return-AD2 #1')).toBeVisible();
  await expect(page.getByTestId('holder-access').filter({ hasText: 'AB3 #1' })).toHaveCount(0);
  await shot(page, 'old-holder');

  // Who can open the door: Hal with AB3 #1, and Fin not at all (his other copy, AD2, does not turn it).
  const door = (await apiGet<{ doors: { id: string; label: string }[] }>(page.request, api, '/api/doors?q=BL-103')).doors.find((d) => d.label === 'BL-103')!;
  const access = await apiGet<DoorAccess>(page.request, api, `/api/doors/${door.id}/access`);
  expect(access.holders.filter((x) => x.keySymbol === 'AB3').map((x) => x.holderId)).toEqual([hal.id]);
  await page.goto(`/doors/${door.id}/history`);
  await expect(page.getByTestId('door-access-Hal Whitby (demo)')).toContainText('AB3 #1');
  await expect(page.getByTestId('door-access-Fin Hart (demo)')).toHaveCount(0);
  await shot(page, 'door-access');
});
