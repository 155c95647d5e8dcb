// The Core view's "now" pointer on a touch tablet at 1280x800 and 800x1280: through the first
// chambers' parts, the pointer and its word never overlap another chamber's stack, a chamber
// number or a part label. Screenshots: test-results/screenshots/core-view-pointer-*.png.
import { expect, test, type Page } from '@playwright/test';
import { demo, signIn } from '../support/session';
import { freshDemo } from '../support/freshDemo';

test.beforeAll(freshDemo);

const sizes = [
  { width: 1280, height: 800 },
  { width: 800, height: 1280 },
];

/** Boxes (screen px) of the pointer and what it must stay clear of: other chambers' parts, the numbers, the labels. */
const overlaps = (page: Page) =>
  page.evaluate(() => {
    const svg = document.querySelector('[data-test="core-view"]')!;
    const pointer = svg.querySelector('[data-test="core-view-pointer"]');
    if (!pointer) return { current: null, hits: [] as string[] };
    const current = svg.querySelector('.part.current')!.getAttribute('data-part')!;
    const chamberOf = (id: string) => id.split('-')[0];
    const box = (e: Element) => e.getBoundingClientRect();
    const meet = (a: DOMRect, b: DOMRect) => Math.min(a.right, b.right) - Math.max(a.left, b.left) > 0.5 && Math.min(a.bottom, b.bottom) - Math.max(a.top, b.top) > 0.5;
    const others = [
      ...[...svg.querySelectorAll('.part')].filter((g) => chamberOf(g.getAttribute('data-part')!) !== chamberOf(current)).map((g) => ({ what: `part ${g.getAttribute('data-part')}`, r: box(g.querySelector('rect')!) })),
      ...[...svg.querySelectorAll('.num, .labels text, .shear text')].map((t) => ({ what: `text "${t.textContent?.trim()}"`, r: box(t) })),
    ];
    const hits: string[] = [];
    for (const mine of [pointer.querySelector('polygon')!, pointer.querySelector('text')!]) {
      for (const o of others) if (meet(box(mine), o.r)) hits.push(`${mine.tagName} over ${o.what}`);
    }
    return { current, hits };
  });

test('the "now" pointer stays clear of the next chamber at both tablet sizes', async ({ browser }) => {
  test.setTimeout(120_000);
  const ctx = await browser.newContext({ viewport: sizes[0], hasTouch: true });
  const page = await ctx.newPage();
  await signIn(page, demo.technician);
  await page.getByTestId('keep-2').tap();
  await expect(page.getByTestId('wo-2-offline')).toContainText('On this tablet');
  await page.getByTestId('open-2').tap();
  await page.locator('[data-test^="core-CR-"]:not([data-test$="-status"]):not([data-test$="-fire"])').first().tap();
  await expect(page.getByTestId('core-view')).toBeVisible();

  const seen = new Set<string>();
  for (let step = 0; step < 12; step++) {
    for (const size of sizes) {
      await page.setViewportSize(size);
      await page.waitForTimeout(150);
      const { current, hits } = await overlaps(page);
      expect(current, 'a part is current while loading').not.toBeNull();
      seen.add(current!);
      expect(hits, `${current} at ${size.width}x${size.height}`).toEqual([]);
      if (step < 2 || step === 5) await page.screenshot({ path: `test-results/screenshots/core-view-pointer-${step}-${size.width}x${size.height}.png` });
    }
    await page.keyboard.press('Space');
    await expect(page.getByTestId('step-part')).toBeVisible();
  }
  // Parts of more than one chamber were pointed at (the first chambers of a 6- or 7-chamber core).
  expect(new Set([...seen].map((id) => id.split('-')[0])).size).toBeGreaterThan(1);
  await ctx.close();
});
