// The system audit at the office (1440×900): the demo campus opens with a few lines of
// design information, the groups of change keys one position apart sit behind a
// disclosure, and the administrator acknowledges a finding with a note. Screenshots:
// test-results/screenshots/system-audit-*.png.
import { expect, test, type Page } from '@playwright/test';
import type { KeySystem } from '../../../shared/schemas/records';
import { demo, signIn } from '../support/session';
import { apiGet, apiSignIn } from './api';
import { freshDemo } from '../support/freshDemo';

test.beforeAll(freshDemo);

test.use({ viewport: { width: 1440, height: 900 } });

const shot = async (page: Page, name: string) => {
  await page.evaluate(() => document.fonts.ready);
  await page.waitForTimeout(400);
  await page.screenshot({ path: `test-results/screenshots/system-audit-${name}.png` });
};

test('the administrator acknowledges a finding with a note; the supervisor sees it acknowledged', async ({ page }) => {
  test.setTimeout(90_000);
  const admin = await apiSignIn(page.request, demo.admin);
  const { keySystems } = await apiGet<{ keySystems: KeySystem[] }>(page.request, admin, '/api/key-systems');
  const system = keySystems.find((s) => s.name === 'Quillon Hill College')!;

  await signIn(page, demo.admin);
  await page.goto(`/key-systems/${system.id}?tab=system-audit`);
  const report = page.getByTestId('system-audit-report');
  await expect(report).toBeVisible();
  // A handful of lines, not one warning per pair of change keys.
  await expect(page.getByTestId('system-audit-count-warning')).toHaveText(/(^|\D)0 warnings/);
  await expect(page.getByTestId('system-audit-count-error')).toHaveText(/(^|\D)0 errors/);
  const apart = report.getByTestId('finding-change-keys-one-apart');
  await expect(apart).toHaveCount(1);
  await expect(apart).toContainText('differ in one position only');
  await shot(page, 'opens');

  await apart.getByTestId('finding-details').click();
  await expect(apart.locator('ul.details li').first()).toContainText('chamber');
  await shot(page, 'details');

  await apart.getByTestId('acknowledge').click();
  const dialog = page.getByTestId('acknowledge-dialog');
  await expect(dialog).toBeVisible();
  await expect(dialog.getByTestId('acknowledge-save')).toBeDisabled();
  await dialog.getByTestId('acknowledge-note').fill('Two-step design: one position apart is the accepted minimum on this campus.');
  await shot(page, 'dialog');
  await dialog.getByTestId('acknowledge-save').click();
  await expect(dialog).toBeHidden();
  await expect(page.getByTestId('system-audit-count-acknowledged')).toHaveText(/1 acknowledged/);
  await expect(report.getByTestId('system-audit-info').getByTestId('finding-change-keys-one-apart')).toHaveCount(0);
  await page.getByTestId('system-audit-acknowledged').getByText(/^Acknowledged \(1\)/).click();
  await expect(page.getByTestId('finding-acknowledged')).toContainText('Acknowledged by Alex Admin (demo)');
  await expect(page.getByTestId('finding-acknowledged')).toContainText('accepted minimum on this campus');
  await shot(page, 'acknowledged');

  // The supervisor reads the same report but cannot acknowledge.
  await page.getByTestId('user-menu').click();
  await page.getByTestId('sign-out').click();
  await signIn(page, demo.supervisor);
  await page.goto(`/key-systems/${system.id}?tab=system-audit`);
  await expect(page.getByTestId('system-audit-count-acknowledged')).toHaveText(/1 acknowledged/);
  await expect(page.getByTestId('acknowledge')).toHaveCount(0);
  await shot(page, 'supervisor');
});
