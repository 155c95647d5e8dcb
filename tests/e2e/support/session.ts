import { expect, type Page } from '@playwright/test';

export const DEMO_PASSWORD = 'corewright-demo';
export const demo = {
  technician: 'tech@demo.corewright.test',
  supervisor: 'lead@demo.corewright.test',
  admin: 'admin@demo.corewright.test',
} as const;

/** The passphrase the browser tests give the tablet's vault. */
export const TABLET_PASSPHRASE = 'brass slate paper teal';

/**
 * Signs in. A technician lands on the Bench, which first asks for the tablet's passphrase
 * (set on first use, typed after a reload): the helper answers it.
 */
export async function signIn(page: Page, email: string, password = DEMO_PASSWORD): Promise<void> {
  await page.goto('/sign-in');
  await page.getByTestId('email').fill(email);
  await page.getByTestId('password').fill(password);
  await page.getByTestId('sign-in').click();
  await expect(page.getByTestId('user-menu').or(page.getByTestId('passphrase'))).toBeVisible();
  if (await page.getByTestId('passphrase').isVisible()) await answerVault(page);
  await expect(page.getByTestId('user-menu')).toBeVisible();
}

/** Sets up or unlocks the tablet's vault on the unlock page. */
export async function answerVault(page: Page, passphrase = TABLET_PASSPHRASE): Promise<void> {
  await page.getByTestId('passphrase').fill(passphrase);
  if (await page.getByTestId('passphrase-confirm').isVisible()) {
    await page.getByTestId('passphrase-confirm').fill(passphrase);
    await page.getByTestId('setup').click();
  } else await page.getByTestId('unlock').click();
}

/** Resolves once the service worker is active, so the next load can come from its cache. */
export async function serviceWorkerReady(page: Page): Promise<void> {
  await page.evaluate(async () => {
    const reg = await navigator.serviceWorker.ready;
    return reg.active?.state;
  });
}

export async function loadedFontFamilies(page: Page): Promise<string[]> {
  return page.evaluate(async () => {
    await document.fonts.ready;
    return [...document.fonts].filter((f) => f.status === 'loaded').map((f) => f.family.replace(/"/g, ''));
  });
}
