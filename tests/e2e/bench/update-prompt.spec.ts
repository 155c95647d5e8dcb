// S12 of ../shared/design/reliability.md: an app update while a core is half built waits for
// the technician's consent (vite-plugin-pwa docs: registerType 'prompt' versus autoUpdate).
import { readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { expect, test } from '@playwright/test';
import { ownServer, type OwnServer } from '../support/ownServer';
import { demo, signIn } from '../support/session';
import { freshDemo } from '../support/freshDemo';

test.beforeAll(freshDemo);

let server: OwnServer;
const swFile = path.join(process.env.CW_STATIC_DIR ?? 'dist', 'sw.js');
let original = '';

test.beforeAll(async () => {
  server = await ownServer();
  await server.start();
  original = readFileSync(swFile, 'utf8');
});
test.afterAll(async () => {
  writeFileSync(swFile, original);
  await server.kill();
});

test('a new version is offered, never loaded under a half-built core', async ({ browser }) => {
  const ctx = await browser.newContext({ baseURL: server.base, serviceWorkers: 'allow', viewport: { width: 1280, height: 800 } });
  const page = await ctx.newPage();
  await signIn(page, demo.technician);
  await page.getByTestId('keep-3').click();
  await page.getByTestId('open-3').click();
  await page.locator('[data-test^="core-CR-"]').first().click();
  for (let i = 0; i < 3; i++) {
    await page.keyboard.press('Space');
    await page.waitForTimeout(100);
  }
  const stepBefore = await page.getByTestId('step-part').textContent();
  const progressBefore = await page.getByText(/Step \d+ of \d+/).textContent();
  await page.evaluate(() => {
    (window as unknown as { cwMarker: number }).cwMarker = 42; // gone if the page reloads
  });
  await page.evaluate(async () => (await navigator.serviceWorker.ready).active?.state);

  // A new release lands on the server: a changed service worker.
  writeFileSync(swFile, `${original}\n// release ${Date.now()}\n`);
  await page.evaluate(async () => (await navigator.serviceWorker.getRegistration())?.update());
  await expect(page.getByTestId('update-prompt')).toBeVisible({ timeout: 20_000 });
  await page.screenshot({ path: 'test-results/screenshots/bench-update-prompt-1280x800.png' });
  await page.waitForTimeout(1500);
  expect(await page.evaluate(() => (window as unknown as { cwMarker?: number }).cwMarker)).toBe(42);
  await expect(page.getByTestId('step-part')).toHaveText(stepBefore!);
  await expect(page.getByText(/Step \d+ of \d+/)).toHaveText(progressBefore!);

  // "Later": the technician carries on where they were.
  await page.getByRole('button', { name: 'Later' }).click();
  await expect(page.getByTestId('update-prompt')).toBeHidden();
  await page.keyboard.press('Space');
  await expect(page.getByText(/Step \d+ of \d+/)).not.toHaveText(progressBefore!);
  expect(await page.evaluate(() => (window as unknown as { cwMarker?: number }).cwMarker)).toBe(42);
  await ctx.close();
});
