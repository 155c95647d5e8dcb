/** Drives the Bench with the keyboard only, as a foot pedal or page-turner would. */
import { expect, type Page } from '@playwright/test';

/** The kind of the part on screen, from its name ("Build-up wafer 1 of 2" → build-up-wafer). */
export function partKind(part: string): string {
  const p = part.toLowerCase();
  return p.includes('bottom') ? 'bottom-pin' : p.includes('master') ? 'master-wafer' : p.includes('build-up') ? 'build-up-wafer' : p.includes('top') ? 'top-pin' : p.includes('level') ? 'level-check' : p.includes('spring') ? 'springs' : p.includes('cap') ? 'caps' : 'other';
}

/** Presses Next (Space) until the Key check shows; returns how many steps it took. */
export async function loadWithKeys(page: Page, onStep: (kind: string) => Promise<void> = async () => {}): Promise<number> {
  for (let steps = 0; steps < 80; steps++) {
    if (await page.getByTestId('key-check').isVisible()) return steps;
    await onStep(partKind((await page.getByTestId('step-part').textContent()) ?? ''));
    await page.keyboard.press('Space');
    await expect(page.getByTestId('step-part').or(page.getByTestId('key-check'))).toBeVisible();
  }
  throw new Error('loading did not reach the key check');
}

/** Passes every key of the Key check with the P key. */
export async function passAll(page: Page, onKey: () => Promise<void> = async () => {}): Promise<void> {
  await expect(page.getByTestId('key-check')).toBeVisible();
  // read in one go inside the page: the card may go away between two separate reads
  const card = () => page.evaluate(() => document.querySelector('[data-test="key-check"]')?.textContent ?? 'gone');
  for (let i = 0; i < 10 && (await page.getByTestId('key-check').isVisible()); i++) {
    await onKey();
    const before = await card();
    await page.keyboard.press('p');
    await expect.poll(card).not.toBe(before);
  }
}

/** Loads, checks, caps and checks again: one core built and passed. */
export async function buildCore(page: Page): Promise<void> {
  await loadWithKeys(page);
  await passAll(page);
  await expect(page.getByTestId('step-part')).toContainText(/cap/i);
  await page.keyboard.press('Space');
  await passAll(page);
  await expect(page.getByTestId('done')).toBeVisible();
}
