// The audit trail at the office (1440×900): the old /audit address leads to /audit-trail with its
// filters; person, action, page size and page live in the URL, so Back and Forward step through
// them and a reload keeps them; the server pages; the CSV export holds exactly the filtered events.
// Screenshots: test-results/screenshots/audit-trail-*.png.
import { readFile } from 'node:fs/promises';
import { expect, test, type Page } from '@playwright/test';
import { demo, signIn } from '../support/session';
import { apiGet, apiSignIn } from './api';
import { freshDemo } from '../support/freshDemo';

test.beforeAll(freshDemo);

test.use({ viewport: { width: 1440, height: 900 } });

const shot = async (page: Page, name: string) => {
  await page.evaluate(() => document.fonts.ready);
  await page.waitForTimeout(300);
  await page.screenshot({ path: `test-results/screenshots/audit-trail-${name}.png` });
};
const rows = (page: Page) => page.getByTestId('audit-table').locator('tbody tr');

test('an administrator filters the audit trail in the URL, pages it, steps back and forward, reloads and exports it', async ({ page }) => {
  test.setTimeout(120_000);
  // Thirty sign-ins by the supervisor: more audit events than one page of 25 holds.
  for (let i = 0; i < 30; i++) await apiSignIn(page.request, demo.supervisor);
  const admin = await apiSignIn(page.request, demo.admin);
  const lead = (await apiGet<{ users: { id: string; email: string }[] }>(page.request, admin, '/api/users')).users.find((u) => u.email === demo.supervisor)!;
  const tz = new Date().getTimezoneOffset();
  const { total } = await apiGet<{ total: number }>(page.request, admin, `/api/audit-events?action=auth.&actorId=${lead.id}&pageSize=1&tz=${tz}`);
  expect(total).toBeGreaterThanOrEqual(30);

  await signIn(page, demo.admin);
  // The old address still works, and keeps its filter.
  await page.goto('/audit?action=auth.');
  await expect(page).toHaveURL(/\/audit-trail\?action=auth\.$/);
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Audit trail');
  await expect(page.getByTestId('audit-action')).toHaveValue('Sign-ins and sign-outs');
  await expect(rows(page).first()).toContainText('Signed in');

  // Person: a new entry in the history, the action kept.
  await page.getByTestId('audit-person').click();
  await page.getByRole('option', { name: /Sam Lead/ }).click();
  await expect(page).toHaveURL(new RegExp(`actorId=${lead.id}`));
  await expect(page).toHaveURL(/action=auth\./);
  await expect(rows(page)).toHaveCount(Math.min(total, 50));
  for (const text of await rows(page).allInnerTexts()) expect(text).toMatch(/Sam Lead \(demo\)[\s\S]*Signed in/);

  // 25 a page, then page 2: both in the URL; the server answers the rest.
  await page.locator('.q-table__bottom .q-select').click();
  await page.getByRole('option', { name: '25', exact: true }).click();
  await expect(page).toHaveURL(/pageSize=25/);
  await expect(rows(page)).toHaveCount(25);
  await page.locator('.q-table__bottom').getByRole('button', { name: 'Next page' }).click();
  await expect(page).toHaveURL(/pageSize=25&page=2|page=2&pageSize=25/);
  await expect(rows(page)).toHaveCount(Math.min(total - 25, 25));
  await expect(page.locator('.q-table__bottom')).toContainText(`26–${Math.min(total, 50)} of ${total}`);
  await shot(page, 'filtered-page-2');

  // Back: page 1, then 50 a page, then the action alone; Forward returns to page 2.
  await page.goBack();
  await expect(page).not.toHaveURL(/page=2/);
  await expect(rows(page)).toHaveCount(25);
  await page.goBack();
  await expect(page).not.toHaveURL(/pageSize/);
  await expect(rows(page)).toHaveCount(Math.min(total, 50));
  await page.goBack();
  await expect(page).toHaveURL(/\/audit-trail\?action=auth\.$/);
  await expect(page.getByTestId('audit-person')).toHaveValue('');
  await page.goForward();
  await page.goForward();
  await page.goForward();
  await expect(page).toHaveURL(/page=2/);
  await expect(rows(page)).toHaveCount(Math.min(total - 25, 25));

  // A reload keeps all of it: the filters, the page size and the page.
  await page.reload();
  await expect(page.getByTestId('audit-person')).toHaveValue(/^Sam Lead/);
  await expect(page.getByTestId('audit-action')).toHaveValue('Sign-ins and sign-outs');
  await expect(rows(page)).toHaveCount(Math.min(total - 25, 25));
  await shot(page, 'after-reload');

  // The CSV holds the filtered events, every one of them (not just the page shown).
  const download = page.waitForEvent('download');
  await page.getByTestId('audit-export').click();
  const file = await download;
  expect(file.suggestedFilename()).toMatch(/^audit-trail-\d{4}-\d{2}-\d{2}\.csv$/);
  const lines = (await readFile(await file.path(), 'utf8')).trim().split(/\r?\n/);
  expect(lines).toHaveLength(total + 1);
  for (const line of lines.slice(1)) expect(line).toMatch(/Sam Lead \(demo\).*Signed in/);

  // Clear drops every filter and goes back to page 1 (the page size stays), in one step Back can undo.
  await page.getByTestId('audit-clear').click();
  await expect(page).toHaveURL(/\/audit-trail\?pageSize=25$/);
  await expect(page.getByTestId('audit-clear')).toHaveCount(0);
  await shot(page, 'cleared');
  await page.goBack();
  await expect(page.getByTestId('audit-person')).toHaveValue(/^Sam Lead/);
});

test('the menu names the audit trail and leads to it', async ({ page }) => {
  await signIn(page, demo.admin);
  await expect(page.getByTestId('nav-auditTrail.list')).toHaveText(/Audit trail/);
  await page.getByTestId('nav-auditTrail.list').click();
  await expect(page).toHaveURL(/\/audit-trail$/);
  await expect(page).toHaveTitle(/Audit trail/);
  await expect(rows(page).first()).toBeVisible();
  await shot(page, 'menu');
});
