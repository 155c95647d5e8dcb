// No dead ends between the office and the tablet: office users land on the Overview and
// reach the Bench only by choosing to make the device a tablet; every passphrase screen
// has a way back; the unlock screen says why it is locked; "Forgot the passphrase?" says
// what goes and keeps a half-built core, which resumes after recovery. Touch, both tablet sizes.
import { expect, test, type Browser, type Page } from '@playwright/test';
import { DEMO_PASSWORD, TABLET_PASSPHRASE, demo } from '../support/session';
import { freshDemo } from '../support/freshDemo';

test.beforeAll(freshDemo);

const sizes = [
  { width: 1280, height: 800 },
  { width: 800, height: 1280 },
];

async function tablet(browser: Browser, size = sizes[0]!): Promise<Page> {
  const ctx = await browser.newContext({ viewport: size, hasTouch: true });
  return ctx.newPage();
}

async function shot(page: Page, name: string): Promise<void> {
  const size = page.viewportSize()!;
  for (const s of sizes) {
    await page.setViewportSize(s);
    await page.waitForTimeout(150);
    await page.screenshot({ path: `test-results/screenshots/tablet-${name}-${s.width}x${s.height}.png` });
  }
  await page.setViewportSize(size);
}

async function signInOnly(page: Page, email: string): Promise<void> {
  await page.goto('/sign-in');
  await page.getByTestId('email').fill(email);
  await page.getByTestId('password').fill(DEMO_PASSWORD);
  await page.getByTestId('sign-in').tap();
}

/** Sets the passphrase and waits for the Bench (deriving the key takes a while on a busy machine). */
async function setPassphrase(page: Page, passphrase = TABLET_PASSPHRASE): Promise<void> {
  await page.getByTestId('passphrase').fill(passphrase);
  await page.getByTestId('passphrase-confirm').fill(passphrase);
  await page.getByTestId('setup').tap();
  await expect(page.getByTestId('user-menu')).toBeVisible({ timeout: 20_000 });
  await expect(page).toHaveURL(/^[^?]*\/bench$/);
}

test('a supervisor lands on the Overview, meets no Bench by accident, and can make this device a tablet on purpose', async ({ browser }) => {
  const page = await tablet(browser);
  await signInOnly(page, demo.supervisor);
  await expect(page).toHaveURL(/\/overview$/);
  await page.goto('/');
  await expect(page).toHaveURL(/\/overview$/);
  await expect(page.getByTestId('nav-bench.home')).toHaveCount(0);

  // Typing the Bench's address: a question with a way back, not the passphrase screen.
  await page.goto('/bench');
  await expect(page.getByTestId('tablet-choice')).toBeVisible();
  await expect(page.getByTestId('passphrase')).toHaveCount(0);
  await shot(page, 'office-choice');
  await page.getByTestId('unlock-back').tap();
  await expect(page).toHaveURL(/\/overview$/);

  // The explicit choice, from the user menu; the passphrase screen still has its way back.
  await page.getByTestId('user-menu').tap();
  await page.getByTestId('use-as-tablet').tap();
  await page.getByTestId('tablet-confirm').tap();
  await expect(page.getByTestId('passphrase-confirm')).toBeVisible();
  await expect(page.getByTestId('unlock-back')).toBeVisible();
  await shot(page, 'office-passphrase');
  await setPassphrase(page);
  await expect(page).toHaveURL(/\/bench$/);
  await expect(page.getByTestId('nav-bench.home')).toHaveCount(1);
  await page.close();
});

test('a technician’s passphrase screen has a way out, and the unlock screen says why it is locked', async ({ browser }) => {
  const page = await tablet(browser, sizes[1]);
  await signInOnly(page, demo.technician);
  await expect(page.getByTestId('passphrase-confirm')).toBeVisible();
  await expect(page.getByTestId('unlock-sign-out')).toContainText('Sign out');
  await setPassphrase(page);
  await expect(page).toHaveURL(/\/bench$/);

  await page.reload();
  await expect(page.getByTestId('unlock')).toBeVisible();
  await expect(page.locator('.standalone-card')).toContainText('reloaded or restarted');
  await shot(page, 'unlock-restarted');
  await page.getByTestId('passphrase').fill(TABLET_PASSPHRASE);
  await page.getByTestId('unlock').tap();
  await expect(page.getByTestId('user-menu')).toBeVisible({ timeout: 20_000 });

  // Idle: a short idle time set the way a supervisor would set it.
  await page.evaluate(() => localStorage.setItem('cw.idleMinutes', '0.05'));
  await page.reload();
  await page.getByTestId('passphrase').fill(TABLET_PASSPHRASE);
  await page.getByTestId('unlock').tap();
  await expect(page.getByTestId('user-menu')).toBeVisible({ timeout: 20_000 });
  await expect(page.getByTestId('unlock')).toBeVisible({ timeout: 15_000 });
  await expect(page.locator('.standalone-card')).toContainText(/Locked after 0\.05 idle minutes/);
  await page.evaluate(() => localStorage.removeItem('cw.idleMinutes'));
  await page.close();
});

test('forgot the passphrase: the screen says what goes and what stays, and the half-built core comes back after recovery', async ({ browser }) => {
  test.setTimeout(120_000);
  const page = await tablet(browser);
  await signInOnly(page, demo.technician);
  await setPassphrase(page);
  await expect(page).toHaveURL(/\/bench$/);
  const keep = page.locator('[data-test^="keep-"]').first();
  const number = (await keep.getAttribute('data-test'))!.replace('keep-', '');
  await keep.tap();
  await expect(page.getByTestId(`wo-${number}-offline`)).toContainText('On this tablet');
  await page.getByTestId(`open-${number}`).tap();
  const core = page.locator('[data-test^="core-CR-"]:not([data-test$="-status"])').first();
  const tag = (await core.getAttribute('data-test'))!.replace('core-', '');
  await core.tap();
  for (let i = 0; i < 4; i++) await page.getByTestId('next').tap();
  const where = await page.getByTestId('step-progress').textContent();
  await page.waitForTimeout(300); // each move is saved just after it is drawn

  await page.reload();
  await expect(page.getByTestId('unlock-forgot')).toBeVisible();
  await page.getByTestId('unlock-forgot').tap();
  const dialog = page.getByRole('dialog');
  await expect(dialog).toContainText('Wiped now: 1 work order kept on this tablet');
  await expect(dialog).toContainText('Kept: Bench progress on 1 half-built core');
  await shot(page, 'forgot-dialog');
  await dialog.getByRole('button', { name: 'Wipe the work orders and sign in' }).tap();
  await expect(page.getByTestId('unlock-wiped')).toBeVisible({ timeout: 20_000 });

  await signInOnly(page, demo.technician);
  await expect(page.getByTestId('passphrase-confirm')).toBeVisible();
  await setPassphrase(page, 'a new brass passphrase');
  await expect(page).toHaveURL(/\/bench$/);
  await page.getByTestId(`keep-${number}`).tap();
  await page.getByTestId(`open-${number}`).tap();
  await expect(page.getByTestId(`core-${tag}-status`)).not.toContainText('To build');
  await page.getByTestId(`core-${tag}`).tap();
  await expect(page.getByTestId('step-progress')).toHaveText(where!);
  await shot(page, 'recovered-core');
  await page.close();
});
