import { expect, type Page } from '@playwright/test';

export const DEMO_PASSWORD = 'corewright-demo';
export const demo = {
  technician: 'tech@demo.corewright.test',
  supervisor: 'lead@demo.corewright.test',
  admin: 'admin@demo.corewright.test',
} as const;

export async function signIn(page: Page, email: string, password = DEMO_PASSWORD): Promise<void> {
  await page.goto('/sign-in');
  await page.getByTestId('email').fill(email);
  await page.getByTestId('password').fill(password);
  await page.getByTestId('sign-in').click();
  await expect(page.getByTestId('user-menu')).toBeVisible();
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
