// A key issued on a touch tablet, landscape (1280×800) and portrait (800×1280): the holder signs on the
// screen with a finger (real touch events on the signature canvas), and the printable receipt names the
// key by symbol and copy number and holds no bitting. Screenshots: test-results/screenshots/kc-tablet-*.png.
import { expect, test, type Page } from '@playwright/test';
import type { Key, KeySystem } from '../../../shared/schemas/records';
import type { HolderList, KeyIssueAnswer } from '../../../shared/schemas/keyControl';
import { demo, signIn } from '../support/session';
import { smallTargets } from '../support/touchTargets';
import { apiGet, apiSignIn } from '../console/api';
import { freshDemo } from '../support/freshDemo';

test.beforeAll(freshDemo);

/** A finger stroke over the element, through Chromium's touch input (the page sees touch pointer events). */
async function drawWithFinger(page: Page, selector: string, points: [number, number][]): Promise<void> {
  const box = (await page.locator(selector).boundingBox())!;
  const cdp = await page.context().newCDPSession(page);
  const at = ([fx, fy]: [number, number]) => [{ x: box.x + fx * box.width, y: box.y + fy * box.height, id: 1, radiusX: 4, radiusY: 4, force: 0.6 }];
  await cdp.send('Input.dispatchTouchEvent', { type: 'touchStart', touchPoints: at(points[0]!) });
  for (const p of points.slice(1)) await cdp.send('Input.dispatchTouchEvent', { type: 'touchMove', touchPoints: at(p) });
  // The finger rests before it lifts: lifted while still moving, the browser starts a fling, and the next
  // tap (on "Issue the key") would only stop that fling instead of pressing the button.
  await page.waitForTimeout(150);
  await cdp.send('Input.dispatchTouchEvent', { type: 'touchMove', touchPoints: at(points.at(-1)!) });
  await page.waitForTimeout(150);
  await cdp.send('Input.dispatchTouchEvent', { type: 'touchEnd', touchPoints: [] });
  await cdp.detach();
}

/** A made-up scrawl: a long stroke over the box, left to right. */
const scrawl: [number, number][] = Array.from({ length: 40 }, (_, i) => [0.08 + i * 0.021, 0.5 + 0.3 * Math.sin(i / 2.5)]);

for (const [name, viewport, symbol] of [
  ['landscape', { width: 1280, height: 800 }, 'AA3'],
  ['portrait', { width: 800, height: 1280 }, 'AA4'],
] as const) {
  test.describe(`on a ${name} tablet`, () => {
    test.use({ viewport, hasTouch: true });

    test(`a key issued with a signature drawn on the screen (${name})`, async ({ page }) => {
      test.setTimeout(90_000);
      const shot = async (step: string) => {
        await page.evaluate(() => document.fonts.ready);
        await page.waitForTimeout(400);
        await page.screenshot({ path: `test-results/screenshots/kc-tablet-${name}-${step}.png` });
      };
      const api = await apiSignIn(page.request, demo.supervisor);
      const { keySystems } = await apiGet<{ keySystems: KeySystem[] }>(page.request, api, '/api/key-systems');
      const { keys } = await apiGet<{ keys: Key[] }>(page.request, api, `/api/key-systems/${keySystems[0]!.id}/keys?reveal=1`);
      const bittings = keys.map((k) => k.bitting!).filter(Boolean);
      const hal = (await apiGet<HolderList>(page.request, api, '/api/holders?q=Whitby')).holders[0]!;

      await signIn(page, demo.supervisor);
      await page.goto(`/key-holders/${hal.id}`);
      await page.getByTestId('holder-issue').tap();
      await expect(page).toHaveURL(/\/key-issues\/new\?holderId=/);
      await expect(page.locator('.q-field', { has: page.getByTestId('issue-holder') })).toContainText('Hal Whitby (demo)');
      await page.getByTestId('issue-key').fill(symbol);
      await page.getByRole('option', { name: `${symbol} (Change key)` }).tap();
      await expect(page.getByTestId('acknowledgement')).toContainText(`I received key ${symbol}.`);
      // Signing first is asked for when the box is empty.
      await page.getByTestId('ack-accepted').tap();
      await page.getByTestId('issue-save').tap();
      await expect(page.getByTestId('error-banner')).toContainText('signs in the box first');
      await page.getByTestId('signature-canvas').scrollIntoViewIfNeeded();
      await drawWithFinger(page, '[data-test="signature-canvas"]', scrawl);
      await expect(page.getByTestId('signature-field')).toContainText('Signed');
      // Once signed, the form no longer says what was missing.
      await expect(page.getByText('signs in the box first')).toHaveCount(0);
      // Ink on the canvas, where the finger went.
      const inked = await page.locator('[data-test="signature-canvas"]').evaluate((c: HTMLCanvasElement) => {
        const data = c.getContext('2d')!.getImageData(0, 0, c.width, c.height).data;
        let n = 0;
        for (let i = 3; i < data.length; i += 4) if (data[i]! > 0) n++;
        return n;
      });
      expect(inked).toBeGreaterThan(200);
      expect(await smallTargets(page, 48)).toEqual([]);
      await shot('signed');
      await page.getByTestId('issue-save').tap();

      await expect(page).toHaveURL(/\/key-issues\/[0-9a-f-]{36}\/receipt/);
      await expect(page.getByTestId('receipt-key')).toHaveText(`${symbol} #1`);
      const img = page.getByTestId('receipt-signature-image');
      await expect(img).toHaveAttribute('src', /^data:image\/png;base64,/);
      expect(await img.evaluate((i: HTMLImageElement) => i.complete && i.naturalWidth > 0)).toBe(true);
      const text = await page.locator('body').innerText();
      expect(bittings.filter((b) => text.includes(b))).toEqual([]);
      expect((await img.getAttribute('src'))!.length).toBeLessThan(60_000);
      const id = /\/key-issues\/([0-9a-f-]{36})\/receipt/.exec(page.url())![1]!;
      const { issue } = await apiGet<KeyIssueAnswer>(page.request, api, `/api/key-issues/${id}`);
      expect(issue).toMatchObject({ holderName: 'Hal Whitby (demo)', keySymbol: symbol, copyNumber: 1, acknowledgement: { signed: true } });
      expect(issue.signature).toBe(await img.getAttribute('src'));
      expect(await smallTargets(page, 48)).toEqual([]);
      await shot('receipt');
    });
  });
}
