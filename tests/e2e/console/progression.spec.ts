// The administrator makes change keys by progression at the office (1440×900): total position
// or rotating constant, a chamber the master holds constant refused by name, keys the system
// audit refuses held back with the reason, and the rest saved under the master.
// Screenshots: test-results/screenshots/progression-*.png.
import { expect, test, type Page } from '@playwright/test';
import type { Key, KeySystem } from '../../../shared/schemas/records';
import { demo, signIn } from '../support/session';
import { apiGet, apiSignIn } from './api';
import { freshDemo } from '../support/freshDemo';

test.beforeAll(freshDemo);

test.use({ viewport: { width: 1440, height: 900 } });

const shot = async (page: Page, name: string, testId: string) => {
  await page.getByTestId(testId).scrollIntoViewIfNeeded();
  await page.evaluate(() => document.fonts.ready);
  await page.waitForTimeout(400);
  await page.screenshot({ path: `test-results/screenshots/progression-${name}.png` });
};

test('the admin previews rotating constant under AA, sees held-back keys and saves three', async ({ page }) => {
  test.setTimeout(90_000);
  const admin = await apiSignIn(page.request, demo.admin);
  const { keySystems } = await apiGet<{ keySystems: KeySystem[] }>(page.request, admin, '/api/key-systems');
  const system = keySystems.find((s) => s.name === 'Quillon Hill College')!;
  const keys = async () => (await apiGet<{ keys: Key[] }>(page.request, admin, `/api/key-systems/${system.id}/keys?reveal=1`)).keys;
  const before = await keys();
  const aa = before.find((k) => k.symbol === 'AA')!;

  await signIn(page, demo.admin);
  await page.goto(`/key-systems/${system.id}`);
  await page.getByTestId('tab-add').click();
  await page.getByTestId('prog-master').click();
  await page.getByRole('option', { name: /^AA / }).click();

  // Chamber 1 is where AA differs from the grand master: AA holds it constant (keying primer).
  await page.getByTestId('prog-chambers').getByText('1', { exact: true }).click();
  await page.getByTestId('prog-preview').click();
  await expect(page.getByTestId('error-banner')).toContainText('Chamber 1: the master holds it constant');
  await shot(page, 'held-chamber', 'prog-preview');
  await page.getByTestId('prog-chambers').getByText('1', { exact: true }).click();
  // Unticking the chamber takes its message away with it.
  await expect(page.getByTestId('progression').getByText('the master holds it constant')).toHaveCount(1);

  await page.getByTestId('prog-method').getByText('Rotating constant').click();
  await expect(page.getByTestId('prog-constants')).toBeVisible();
  for (const c of ['5', '6', '7']) await page.getByTestId('prog-chambers').getByText(c, { exact: true }).click();
  await page.getByTestId('prog-limit').fill('30');
  await page.getByTestId('prog-prefix').fill('RC');
  await shot(page, 'rotating-form', 'prog-method');
  await page.getByTestId('prog-preview').click();
  await expect(page.getByTestId('prog-list')).toBeVisible();
  // Rotating constant keeps one of chambers 5-7 at AA's cut, so some keys match Aster Hall cores: the audit holds them back.
  await expect(page.getByTestId('prog-held-title')).toContainText('Held back by the system audit');
  await expect(page.getByTestId('prog-held').locator('tbody tr').first()).toContainText('This key turns');
  const listed = await page.getByTestId('prog-list').locator('tbody tr').count();
  expect(listed).toBe(30);
  await shot(page, 'rotating-preview', 'prog-list');
  await shot(page, 'rotating-held', 'prog-held');

  await page.getByTestId('prog-limit').fill('3');
  await page.getByTestId('prog-preview').click();
  await expect(page.getByTestId('prog-list').locator('tbody tr')).toHaveCount(3);
  await page.getByTestId('prog-save').click();
  await expect(page.getByTestId('prog-list')).toHaveCount(0);
  const after = await keys();
  const added = after.filter((k) => /^RC\d+$/.test(k.symbol));
  expect(added).toHaveLength(3);
  for (const k of added) {
    expect(k.parentId).toBe(aa.id);
    // Chambers 1-4 kept; exactly one of 5-7 at AA's cut (rotating constant, one constant per key).
    expect(k.bitting!.slice(0, 4)).toBe(aa.bitting!.slice(0, 4));
    expect([4, 5, 6].filter((i) => k.bitting![i] === aa.bitting![i])).toHaveLength(1);
  }
  await page.getByTestId('tab-tree').click();
  await expect(page.getByTestId('key-node-RC1')).toBeVisible();
  await shot(page, 'saved', 'key-node-RC1');
});
