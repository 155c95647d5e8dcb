// CSV imports are all-or-nothing: one bad row shows its error and nothing is saved; the fixed
// file commits every row. For doors (Doors page) and for a bitting list (Key system page).
import { expect, test } from '@playwright/test';
import type { Door, Key, KeySystem } from '../../../shared/schemas/records';
import { demo, signIn } from '../support/session';
import { apiGet, apiSignIn, csv } from './api';
import { freshDemo } from '../support/freshDemo';

test.beforeAll(freshDemo);

const doorHeader = 'site,building,floor,room,label,fire_rated,key_system,key_symbol';
const site = 'Quillon Hill College';

test('the admin imports doors: a bad row is shown and nothing saved; the fixed file adds them all', async ({ page }) => {
  const admin = await apiSignIn(page.request, demo.admin);
  const count = async () => (await apiGet<{ doors: Door[] }>(page.request, admin, '/api/doors')).doors.length;
  const before = await count();

  await signIn(page, demo.admin);
  await page.goto('/doors');
  await page.getByTestId('doors-import-open').click();
  await page.getByTestId('csv-file-doors').setInputFiles(
    csv('doors.csv', [doorHeader, `${site},Annex,1,101,AX-101,no,${site},AA1`, `${site},Annex,1,102,AX-102,yes,${site},ZZ99`, `${site},Annex,1,103,AX-103,no,,`]),
  );
  await expect(page.getByTestId('import-error-row-3')).toContainText('ZZ99');
  await expect(page.getByTestId('import-commit-doors')).toBeDisabled();
  expect(await count()).toBe(before);

  await page.getByTestId('csv-file-doors').setInputFiles(
    csv('doors.csv', [doorHeader, `${site},Annex,1,101,AX-101,no,${site},AA1`, `${site},Annex,1,102,AX-102,yes,${site},AA2`, `${site},Annex,1,103,AX-103,no,,`]),
  );
  await expect(page.getByTestId('import-summary-doors')).toContainText('ready to import');
  await page.getByTestId('import-commit-doors').click();
  await expect(page.getByTestId('import-done-doors')).toContainText('Imported 3 doors');
  expect(await count()).toBe(before + 3);
  await page.getByTestId('doors-search').fill('AX-10');
  await expect(page.getByTestId('door-row-AX-102')).toContainText('Fire-rated');
  await expect(page.getByTestId('doors-table').locator('tbody tr')).toHaveCount(3);
});

test('the admin imports a bitting list: a bad row is shown and nothing saved; the fixed file adds keys to the tree', async ({ page }) => {
  const admin = await apiSignIn(page.request, demo.admin);
  const { keySystems } = await apiGet<{ keySystems: KeySystem[] }>(page.request, admin, '/api/key-systems');
  const system = keySystems.find((s) => s.name === site)!;
  const count = async () => (await apiGet<{ keys: Key[] }>(page.request, admin, `/api/key-systems/${system.id}/keys`)).keys.length;
  const before = await count();

  await signIn(page, demo.admin);
  await page.goto('/key-systems');
  await page.getByTestId(`key-system-row-${site}`).click();
  await page.getByTestId('tab-import').click();
  await page.getByTestId('csv-file-keys').setInputFiles(csv('keys.csv', ['symbol,level,parent,bitting', 'AAX1,change,AA,2428402', 'AAX2,change,AA,24284']));
  await expect(page.getByTestId('import-error-row-3')).toContainText('takes 7');
  await expect(page.getByTestId('import-commit-keys')).toBeDisabled();
  expect(await count()).toBe(before);

  await page.getByTestId('csv-file-keys').setInputFiles(csv('keys.csv', ['symbol,level,parent,bitting', 'AAX1,change,AA,2428402', 'AAX2,change,AA,2428442']));
  await expect(page.getByTestId('import-summary-keys')).toContainText('ready to import');
  await page.getByTestId('import-commit-keys').click();
  await expect(page.getByTestId('import-done-keys')).toContainText('Imported 2 keys');
  expect(await count()).toBe(before + 2);
  await page.getByTestId('tab-tree').click();
  await expect(page.getByTestId('key-node-AAX1')).toBeVisible();
  await expect(page.getByTestId('key-node-AAX2')).toBeVisible();
  // Bittings stay hidden until asked for.
  await expect(page.getByTestId('bitting-AAX1')).toHaveCount(0);
});
