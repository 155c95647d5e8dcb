// Key control, a lost key from report to restored control, walked as its users would: a supervisor
// (office, 1440x900) reports an issued change key lost from the holder's page, reads what it opens
// and who else holds it, and turns the rekey plan into a work order in one step; the technician
// builds the new core on the Bench of a touch tablet (1280x800) and installs it in its door; the
// sync closes the report: the office sees the old key retired, the re-issue task and gives the
// holder the new key. Screenshots: test-results/screenshots/keycontrol-lost-*.png.
import { expect, test, type Page } from '@playwright/test';
import { apiGet, apiSignIn } from '../console/api';
import { buildCore } from '../support/bench';
import { demo, signIn } from '../support/session';
import { smallTargets } from '../support/touchTargets';
import { freshDemo } from '../support/freshDemo';

test.beforeAll(freshDemo);

const office = { width: 1440, height: 900 };
const shot = (page: Page, name: string) => page.screenshot({ path: `test-results/screenshots/keycontrol-lost-${name}.png`, fullPage: true });
const holder = 'Ada Quill (demo)';

test('a lost change key: reported, its exposure read, the plan made a work order, built and installed on the Bench, the old key retired and re-issued', async ({ page, browser }) => {
  test.setTimeout(240_000);
  await page.setViewportSize(office);
  await signIn(page, demo.supervisor);

  // The holder's page: report copy AB1 #1 lost.
  await page.getByRole('link', { name: 'Key holders', exact: true }).click();
  await page.getByTestId(`holder-open-${holder}`).click();
  await page.getByTestId('report-AB1 #1').click();
  const form = page.getByTestId('report-form-AB1 #1');
  await expect(form).toContainText('every door this key opens');
  await form.getByText('Lost', { exact: true }).click();
  await page.getByTestId('report-note').fill('Left on the bus on the way home');
  await shot(page, 'report-form');
  await page.getByTestId('report-confirm').click();

  // The report page: exposure, then the plan.
  await expect(page).toHaveURL(/\/key-reports\/[0-9a-f-]{36}$/);
  await expect(page.getByRole('heading', { level: 1 })).toContainText('Key AB1 #1 lost');
  await expect(page.getByTestId('report-open')).toContainText('make the rekey work order');
  const cores = page.getByTestId('exposure-cores').locator('tbody tr');
  await expect(cores.first()).toBeVisible();
  await expect(page.getByTestId('exposure-cores')).toContainText('Intended');
  await expect(page.getByTestId(`exposed-holder-${holder}`)).toContainText('Lost');
  await expect(page.getByTestId('exposure-summary')).toContainText('Computed through the engine');
  const plan = page.getByTestId('rekey-plan');
  await expect(plan.getByTestId('choice-new-change-key')).toContainText('to build');
  await expect(plan.getByTestId('choice-counts-new-change-key')).toContainText('1 core to build');
  await shot(page, 'report');
  expect(await smallTargets(page, 48), 'the report page').toEqual([]);
  // No bitting on the page: seven-digit runs are bittings in the demo profile.
  expect(await page.locator('.q-page').innerText()).not.toMatch(/\b\d{7}\b/);

  await page.getByTestId('plan-assignee').click();
  await page.getByRole('option', { name: /Robin Tech/ }).click();
  await page.getByTestId('make-work-order').click();
  await expect(page.getByTestId('plan-made')).toBeVisible();
  await expect(page.getByTestId('report-open')).toContainText('on its way to the Bench');
  await shot(page, 'plan-made');
  await page.getByTestId('plan-work-order').click();
  await expect(page).toHaveURL(/\/work-orders\/[0-9a-f-]{36}$/);
  await expect(page.locator('.q-page')).toContainText('Lost key AB1');
  const number = (await page.getByRole('heading', { level: 1 }).textContent())!.match(/#(\d+)/)![1];
  const workOrderId = page.url().split('/').pop()!;
  // Which core each door holds now: the technician names it as the one taken out.
  const lead = await apiSignIn(page.request, demo.supervisor);
  const { cores: planned } = await apiGet<{ cores: { tag: string; doorLabel: string }[] }>(page.request, lead, `/api/work-orders/${workOrderId}`);
  const { doors } = await apiGet<{ doors: { label: string; currentCoreTag: string | null }[] }>(page.request, lead, '/api/doors');
  expect(planned.length).toBeGreaterThan(0);
  for (const c of planned) await expect(page.getByTestId('wo-cores')).toContainText(c.tag);

  // The tablet: keep the work order, build each core by touch and the pedal keys, install it.
  const tablet = await browser.newContext({ viewport: { width: 1280, height: 800 }, hasTouch: true, serviceWorkers: 'allow' });
  const tab = await tablet.newPage();
  await signIn(tab, demo.technician);
  await tab.getByTestId(`keep-${number}`).tap();
  await tab.getByTestId(`open-${number}`).tap();
  for (const [i, core] of planned.entries()) {
    const door = doors.find((d) => d.label === core.doorLabel)!;
    expect(door.currentCoreTag, `door ${door.label} holds the old core`).toBeTruthy();
    await tab.getByTestId(`core-${core.tag}`).tap();
    await buildCore(tab);
    await tab.getByTestId('go-install').tap();
    await expect(tab.getByText(`On record in this door: ${door.currentCoreTag}`)).toBeVisible();
    await tab.getByTestId('removed-tag').fill(door.currentCoreTag!);
    if (i === 0) await shot(tab, 'bench-install-1280x800');
    await tab.getByTestId('confirm-install').tap();
    await expect(tab.getByTestId(`core-${core.tag}-status`)).toContainText(door.label);
  }
  await tab.getByTestId('outbox-status').tap();
  await tab.getByTestId('sync-now').tap();
  await tab.keyboard.press('Escape');
  await expect(tab.getByTestId('outbox-status')).toContainText('0 waiting', { timeout: 20_000 });
  await tablet.close();

  // The office: the report closed, the old key retired, the re-issue task done by issuing the new key.
  await page.getByRole('link', { name: 'Lost keys', exact: true }).click();
  await page.getByTestId('reports-status').click();
  await page.getByRole('option', { name: 'Closed reports' }).click();
  await page.getByTestId('report-open-AB1 #1').click();
  await expect(page.getByTestId('report-closed')).toContainText('key AB1 is retired');
  await shot(page, 'report-closed');
  const { keySystems } = await apiGet<{ keySystems: { id: string }[] }>(page.request, lead, '/api/key-systems');
  const { keys } = await apiGet<{ keys: { symbol: string; status: string }[] }>(page.request, lead, `/api/key-systems/${keySystems[0]!.id}/keys`);
  expect(keys.find((k) => k.symbol === 'AB1')!.status).toBe('retired');

  await page.getByTestId('report-tasks').click();
  const row = page.getByTestId(`task-row-${holder}`);
  await expect(row).toContainText('AB1 #1');
  await shot(page, 'tasks');
  expect(await smallTargets(page, 48), 'the re-issue tasks page').toEqual([]);
  await page.getByTestId(`task-issue-${holder}`).click();
  // The holder signs on the screen (here with the mouse) and ticks the terms.
  await expect(page.getByTestId('reissue-confirm')).toBeDisabled();
  await expect(page.getByTestId('signature-canvas')).toBeVisible();
  await page.waitForTimeout(500); // the dialog's opening transition moves the canvas
  const canvas = await page.getByTestId('signature-canvas').boundingBox();
  await page.mouse.move(canvas!.x + 40, canvas!.y + 120);
  await page.mouse.down();
  for (const [dx, dy] of [[80, -60], [160, 40], [240, -30], [320, 50]] as const) await page.mouse.move(canvas!.x + dx, canvas!.y + 120 + dy, { steps: 5 });
  await page.mouse.up();
  await expect(page.getByTestId('signature-field')).toContainText('Signed');
  await page.getByTestId('ack-accepted').click();
  await shot(page, 'reissue-form');
  await page.getByTestId('reissue-confirm').click();
  await page.getByTestId('tasks-status').click();
  await page.getByRole('option', { name: 'Done' }).click();
  await expect(page.getByTestId(`task-done-${holder}`)).toContainText('#1');
  await shot(page, 'tasks-done');
  const { holders } = await apiGet<{ holders: { id: string; name: string }[] }>(page.request, lead, `/api/holders?q=${encodeURIComponent('Ada Quill')}`);
  const { issues } = await apiGet<{ issues: { keySymbol: string; status: string; acknowledgement: { signed: boolean } }[] }>(page.request, lead, `/api/key-issues?holderId=${holders[0]!.id}`);
  expect(issues.filter((i) => i.status === 'out').map((i) => [i.keySymbol === 'AB1', i.acknowledgement.signed])).toEqual([[false, true]]);
});
