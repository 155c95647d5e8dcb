// Key holders at the office desk (1440×900, the supervisor): the list and its search, a holder added by
// hand, a CSV import refused whole for one bad row then taken whole, a department with its authoriser,
// a holder's keys and what they can open, a key returned, someone marked leaving with the keys to return,
// and who can open a door (intended and incidental). Screenshots: test-results/screenshots/kc-holders-*.png.
import { expect, test, type Page } from '@playwright/test';
import type { DoorAccess, HolderAccess } from '../../../shared/schemas/keyControlExposure';
import type { HolderList } from '../../../shared/schemas/keyControl';
import type { Door, Key, KeySystem } from '../../../shared/schemas/records';
import { demo, signIn } from '../support/session';
import { smallTargets } from '../support/touchTargets';
import { apiGet, apiSignIn, bearer, csv } from '../console/api';
import { freshDemo } from '../support/freshDemo';

test.beforeAll(freshDemo);

test.use({ viewport: { width: 1440, height: 900 } });

const shot = async (page: Page, name: string) => {
  await page.evaluate(() => document.fonts.ready);
  await page.waitForTimeout(400);
  await page.screenshot({ path: `test-results/screenshots/kc-holders-${name}.png`, fullPage: true });
};

const howWords = { intended: 'Intended', incidental: 'Incidental', control: 'Removes the core' } as const;

test('a supervisor keeps the key holders: search, add, import, departments, leaving, returns', async ({ page }) => {
  test.setTimeout(150_000);
  const api = await apiSignIn(page.request, demo.supervisor);
  await signIn(page, demo.supervisor);
  await expect(page.getByTestId('nav-group-Key control')).toBeVisible();
  await page.getByTestId('nav-holders.list').click();
  await expect(page).toHaveURL(/\/key-holders$/);
  await expect(page.getByTestId('holder-row-Fin Hart (demo)')).toContainText('Leaving');
  await expect(page.getByTestId('holder-row-Bo Linden (demo)')).toContainText('QH-1002');
  expect(await smallTargets(page, 48)).toEqual([]);
  await shot(page, 'list');

  // Search goes to the server (?q=): only the holder named.
  await page.getByTestId('holders-search').fill('Linden');
  await expect(page.getByTestId('holders-table').locator('tbody tr')).toHaveCount(1);
  await expect(page.getByTestId('holder-row-Bo Linden (demo)')).toBeVisible();
  await page.getByTestId('holders-search').fill('');

  // Add by hand: a missing name is named, nothing saved; then saved into a new department.
  await page.getByTestId('holder-add').click();
  await page.getByTestId('holder-department').fill('Grounds Crew');
  await page.getByTestId('holder-department').press('Enter');
  await page.getByTestId('holder-save').click();
  await expect(page.getByTestId('holder-form')).toContainText('name');
  await page.getByTestId('holder-name').fill('Iris Fenwick (demo)');
  await page.getByTestId('holder-email').fill('iris.fenwick@demo.corewright.test');
  await page.getByTestId('holder-badge').fill('QH-4001');
  await page.getByTestId('holder-save').click();
  await expect(page).toHaveURL(/\/key-holders\/[0-9a-f-]{36}$/);
  await expect(page.locator('h1')).toContainText('Iris Fenwick (demo)');
  await expect(page.getByTestId('holder-status')).toContainText('Active');
  await expect(page.getByTestId('issues-table')).toContainText('No key has been issued');
  await shot(page, 'added');
  // Edited: a badge id taken by someone else is refused beside the field; then a new e-mail is saved.
  await page.getByTestId('holder-edit').click();
  await page.getByTestId('holder-badge').fill('QH-1002');
  await page.getByTestId('holder-save').click();
  await expect(page.getByTestId('holder-form')).toContainText('already used');
  await page.getByTestId('holder-badge').fill('QH-4001');
  await page.getByTestId('holder-email').fill('iris.f@demo.corewright.test');
  await page.getByTestId('holder-save').click();
  await expect(page.getByTestId('holder-form')).toHaveCount(0);
  await expect(page.locator('.q-card').first()).toContainText('iris.f@demo.corewright.test');

  // CSV import: one bad row (a badge id taken) refuses the whole file; fixed, all rows land.
  await page.goto('/key-holders');
  await page.getByTestId('holders-import-open').click();
  const before = (await apiGet<HolderList>(page.request, api, '/api/holders')).holders.length;
  const file = page.getByTestId('csv-file-key holders');
  await file.setInputFiles(csv('holders.csv', ['name,department,email,badge_id', 'Jo Pike (demo),Grounds Crew,jo.pike@demo.corewright.test,QH-4002', 'Kit Marsh (demo),Facilities,,QH-1001']));
  await expect(page.getByTestId('import-error-row-3')).toContainText('QH-1001');
  await expect(page.getByTestId('import-commit-key holders')).toBeDisabled();
  await shot(page, 'import-refused');
  expect((await apiGet<HolderList>(page.request, api, '/api/holders')).holders.length).toBe(before);
  await file.setInputFiles(csv('holders.csv', ['name,department,email,badge_id', 'Jo Pike (demo),Grounds Crew,jo.pike@demo.corewright.test,QH-4002', 'Kit Marsh (demo),Facilities,,QH-4003']));
  await expect(page.getByTestId('import-summary-key holders')).toContainText('ready to import');
  await page.getByTestId('import-commit-key holders').click();
  await expect(page.getByTestId('import-done-key holders')).toContainText('Imported 2 key holders');
  await expect(page.getByTestId('holder-row-Kit Marsh (demo)')).toContainText('Facilities');
  expect((await apiGet<HolderList>(page.request, api, '/api/holders')).holders.length).toBe(before + 2);

  // Departments and their authorisers; a new one with its authoriser. (The import folds away: its
  // file input is a 1 px stand-in for the "Choose CSV file" button.)
  await page.getByTestId('holders-import-open').locator('.q-item').first().click();
  await page.getByTestId('departments-open').click();
  await expect(page.getByTestId('department-Library Services')).toContainText('Morgan Vale (demo)');
  await expect(page.getByTestId('department-Grounds Crew')).toContainText('nobody yet');
  await page.getByTestId('department-name').fill('Music School');
  await page.getByTestId('authoriser-name').fill('Lou Carver (demo)');
  await page.getByTestId('authoriser-email').fill('lou.carver@demo.corewright.test');
  await page.getByTestId('department-add').click();
  await expect(page.getByTestId('department-Music School')).toContainText('Lou Carver (demo)');
  expect(await smallTargets(page, 48)).toEqual([]);
  await shot(page, 'departments');

  // Bo Linden: two keys out, one overdue; what they can open through the engine; the overdue copy comes back.
  await page.getByTestId('holder-open-Bo Linden (demo)').click();
  await expect(page.getByTestId('issue-status-AB5 #1')).toContainText('Overdue');
  await expect(page.getByTestId('issue-status-AB2 #1')).toContainText('Out');
  const bo = (await apiGet<HolderList>(page.request, api, '/api/holders?q=Linden')).holders[0]!;
  const { doors } = await apiGet<HolderAccess>(page.request, api, `/api/holders/${bo.id}/access`);
  expect(doors.length).toBeGreaterThan(0);
  for (const d of doors) await expect(page.getByTestId(`access-${d.doorLabel}`).filter({ hasText: `${d.keySymbol} #${d.copyNumber}` })).toContainText(howWords[d.how]);
  expect(await smallTargets(page, 48)).toEqual([]);
  await shot(page, 'holder-detail');
  await page.getByTestId('return-AB5 #1').click();
  await page.locator('.q-dialog input').fill('Brought back to the key office (demo).');
  await page.getByTestId('return-confirm').click();
  await expect(page.getByTestId('issue-status-AB5 #1')).toContainText('Returned');
  await expect(page.getByTestId('return-AB5 #1')).toHaveCount(0);
  await shot(page, 'returned');

  // Fin Hart is leaving: the keys to return are listed.
  await page.goto('/key-holders');
  await page.getByTestId('holder-open-Fin Hart (demo)').click();
  await expect(page.getByTestId('keys-to-return')).toContainText('2 keys to return');
  await expect(page.getByTestId('to-return-AD2 #1')).toBeVisible();
  await expect(page.getByTestId('to-return-AB3 #1')).toBeVisible();
  await expect(page.getByTestId('holder-issue')).toHaveCount(0);

  // Ada Quill marked leaving here: asked first, then her key to return.
  await page.goto('/key-holders');
  await page.getByTestId('holder-open-Ada Quill (demo)').click();
  await page.getByTestId('holder-leaving').click();
  await expect(page.locator('.q-dialog')).toContainText('Mark Ada Quill (demo) as leaving?');
  await page.getByTestId('holder-leaving-confirm').click();
  await expect(page.getByTestId('holder-status')).toContainText('Leaving');
  await expect(page.getByTestId('keys-to-return')).toContainText('1 key to return');
  await expect(page.getByTestId('to-return-AB1 #1')).toBeVisible();
  await shot(page, 'leaving');
  // Her key comes back; then she is marked gone.
  await page.getByTestId('return-AB1 #1').click();
  await page.getByTestId('return-confirm').click();
  await expect(page.getByTestId('keys-to-return')).toContainText('every key is back');
  await page.getByTestId('holder-left').click();
  await expect(page.locator('.q-dialog')).toContainText('Every key is back');
  await page.getByTestId('holder-left-confirm').click();
  await expect(page.getByTestId('holder-status')).toHaveText('Left');
  await expect(page.getByTestId('keys-to-return')).toContainText('is gone');

  // Who can open a door: the door of one of Bo's incidental openings if there is one, else any he opens.
  const still = (await apiGet<HolderAccess>(page.request, api, `/api/holders/${bo.id}/access`)).doors;
  const door = still.find((d) => d.how === 'incidental') ?? still[0]!;
  await page.goto(`/doors/${door.doorId}/history`);
  const access = await apiGet<DoorAccess>(page.request, api, `/api/doors/${door.doorId}/access`);
  expect(access.holders.some((h) => h.holderId === bo.id)).toBe(true);
  await expect(page.getByTestId('door-access')).toContainText(`core ${access.coreTag}`);
  await expect(page.getByTestId('door-access-table').locator('tbody tr')).toHaveCount(access.holders.length);
  for (const h of access.holders) await expect(page.getByTestId(`door-access-${h.name}`).filter({ hasText: `${h.keySymbol} #${h.copyNumber}` })).toContainText(howWords[h.how]);
  expect(await smallTargets(page, 48)).toEqual([]);
  await shot(page, 'door-access');
});

test('a key that turns a door only through its master wafers is shown as incidental, on the door and on the holder', async ({ page }) => {
  test.setTimeout(90_000);
  const admin = await apiSignIn(page.request, demo.admin);
  const { keySystems } = await apiGet<{ keySystems: KeySystem[] }>(page.request, admin, '/api/key-systems');
  const systemId = keySystems[0]!.id;
  const { keys } = await apiGet<{ keys: Key[] }>(page.request, admin, `/api/key-systems/${systemId}/keys?reveal=1`);
  // BL-101's core is pinned for AB1, AB and A: AB1's cuts with AB's in chamber 6 meet a shear point in
  // every chamber without being one of its keys (the keying primer's incidental openings).
  const ab1 = keys.find((k) => k.symbol === 'AB1')!.bitting!.split('');
  const ab = keys.find((k) => k.symbol === 'AB')!;
  const mixed = [...ab1.slice(0, 5), ab.bitting![5], ab1[6]].join('');
  const added = await page.request.post(`/api/key-systems/${systemId}/keys`, { headers: bearer(admin), data: { symbol: 'ABX', level: 'change', parentId: ab.id, bitting: mixed } });
  expect(added.status(), await added.text()).toBe(201);
  const { ids } = (await added.json()) as { ids: string[] };
  const hal = (await apiGet<HolderList>(page.request, admin, '/api/holders?q=Whitby')).holders[0]!;
  const issued = await page.request.post('/api/key-issues', { headers: bearer(admin), data: { holderId: hal.id, keyId: ids[0], acknowledgement: { name: 'Hal Whitby', accepted: true } } });
  expect(issued.status(), await issued.text()).toBe(201);
  const { doors } = await apiGet<{ doors: Door[] }>(page.request, admin, '/api/doors');
  const bl101 = doors.find((d) => d.label === 'BL-101')!;

  await signIn(page, demo.supervisor);
  await page.goto(`/doors/${bl101.id}/history`);
  await expect(page.getByTestId('door-access-Hal Whitby (demo)')).toContainText('ABX #1');
  await expect(page.getByTestId('door-access-Hal Whitby (demo)')).toContainText('Incidental: through master wafers');
  // Incidental holders first; the door's own key and the masters above it after them.
  await expect(page.getByTestId('door-access-table').locator('tbody tr').first()).toContainText('Hal Whitby (demo)');
  // (Ada Quill, the door's own key AB1, returned it in the walk above.)
  await expect(page.getByTestId('door-access-Ada Quill (demo)')).toHaveCount(0);
  await expect(page.getByTestId('door-access-Eve Sandoval (demo)')).toContainText('Intended: a master above it');
  await shot(page, 'door-incidental');
  await page.getByTestId('door-access-Hal Whitby (demo)').getByRole('link').click();
  await expect(page.getByTestId('access-BL-101')).toContainText('Incidental: through master wafers');
  await shot(page, 'holder-incidental');
});
