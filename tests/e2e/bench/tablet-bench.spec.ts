// The Bench on a touch tablet at 1280x800 and 800x1280: every interactive element at least
// 56 px each way (brand.md), the fire-rated mark on each core, the must-not-turn keys saying
// which and why, and "Build the next core" going to the next unbuilt core. Work order 2
// (Aster Hall), so the offline spec's work order 3 stays as it expects.
import { expect, test, type Page } from '@playwright/test';
import { loadWithKeys } from '../support/bench';
import { TABLET_PASSPHRASE, demo, signIn } from '../support/session';
import { smallTargets } from '../support/touchTargets';
import { freshDemo } from '../support/freshDemo';

test.beforeAll(freshDemo);

const sizes = [
  { width: 1280, height: 800 },
  { width: 800, height: 1280 },
];
let page: Page;

/** At both sizes: a screenshot, and a real assertion that nothing interactive is under 56 px. */
async function walk(name: string, fullPage = false): Promise<void> {
  for (const size of sizes) {
    await page.setViewportSize(size);
    await page.waitForTimeout(200);
    await page.screenshot({ path: `test-results/screenshots/tablet-${name}-${size.width}x${size.height}.png`, fullPage });
    expect(await smallTargets(page), `${name} at ${size.width}x${size.height}`).toEqual([]);
  }
  await page.setViewportSize(sizes[0]!);
}

const cardText = () => page.evaluate(() => document.querySelector('[data-test="key-check"]')?.textContent ?? 'gone');

test.describe.configure({ mode: 'serial' });

test.beforeAll(async ({ browser }) => {
  const ctx = await browser.newContext({ viewport: sizes[0], hasTouch: true });
  page = await ctx.newPage();
  await signIn(page, demo.technician);
});
test.afterAll(async () => page.context().close());

test('build a core of a fire-rated work order by touch: marks, must-not-turn reasons, build the next core, 56 px everywhere', async () => {
  test.setTimeout(180_000);
  await expect(page).toHaveURL(/\/bench$/);
  await page.getByTestId('keep-2').tap();
  await expect(page.getByTestId('wo-2-offline')).toContainText('On this tablet');
  await walk('bench-home');

  await page.getByTestId('open-2').tap();
  await expect(page.getByTestId('fire-caution')).toBeVisible();
  const fire = page.locator('[data-test$="-fire"]');
  await expect(fire).toHaveCount(1); // Aster Hall: room 212 is the fire-rated stair door
  await expect(fire).toContainText('Fire-rated door');
  await walk('work-order');

  await page.getByTestId('open-tray').tap();
  await expect(page.getByTestId('tray')).toBeVisible();
  await expect(page.locator('[data-test^="tray-core-CR-"]')).toHaveCount(6); // core by core, beside the totals
  await walk('tray', true);
  await page.goBack();

  const cores = page.locator('[data-test^="core-CR-"]:not([data-test$="-status"]):not([data-test$="-fire"])');
  const tags = (await cores.evaluateAll((els) => els.map((e) => e.getAttribute('data-test')!.replace('core-', ''))));
  await cores.first().tap();
  await expect(page.getByTestId('core-tag')).toHaveText(tags[0]!);
  await walk('core-step');
  // Part labels in the Core view: at least 12 px on screen at 1280x800 (their font size times the drawing's scale).
  const labelPx = await page.evaluate(() => {
    const svg = document.querySelector<SVGSVGElement>('[data-test="core-view"]')!;
    const scale = svg.getBoundingClientRect().width / svg.viewBox.baseVal.width;
    return Math.min(...[...svg.querySelectorAll('.labels text')].map((t) => parseFloat(getComputedStyle(t).fontSize) * scale));
  });
  expect(labelPx).toBeGreaterThanOrEqual(12);

  await loadWithKeys(page);
  await walk('key-check');
  // Through the Key check by touch; the two keys that must not turn say which and why.
  const reasons: string[] = [];
  for (let i = 0; i < 12 && (await page.getByTestId('key-check').isVisible()); i++) {
    if ((await page.getByTestId('check-role').textContent())?.includes('must not')) {
      reasons.push((await page.getByTestId('check-why').textContent()) ?? '');
      if (reasons.length === 1) await walk('key-check-must-not-turn');
    }
    const before = await cardText();
    await page.getByTestId('check-pass').tap();
    await expect.poll(cardText).not.toBe(before);
  }
  expect(reasons).toHaveLength(2);
  expect(reasons[0]).toMatch(/change key under the same master/);
  expect(reasons[1]).toMatch(/another area|another master/);

  await expect(page.getByTestId('step-part')).toContainText(/cap/i);
  await page.getByTestId('next').tap();
  for (let i = 0; i < 12 && (await page.getByTestId('key-check').isVisible()); i++) {
    const before = await cardText();
    await page.getByTestId('check-pass').tap();
    await expect.poll(cardText).not.toBe(before);
  }
  await expect(page.getByTestId('done')).toBeVisible();
  await expect(page.getByTestId('build-next')).toContainText(tags[1]!);
  await walk('done');

  await page.getByTestId('build-next').tap();
  await expect(page.getByTestId('core-tag')).toHaveText(tags[1]!);
  await expect(page.getByTestId('step-chamber')).toBeVisible();

  await page.getByLabel('Back to the work order').tap();
  await expect(page.getByTestId(`core-${tags[0]}-status`)).toContainText('Built and checked');
  await page.getByTestId('open-install').tap();
  await walk('install');

  await page.reload();
  await expect(page.getByTestId('unlock')).toBeVisible();
  await walk('unlock');
  await page.getByTestId('passphrase').fill(TABLET_PASSPHRASE);
  await page.getByTestId('unlock').tap();
});
