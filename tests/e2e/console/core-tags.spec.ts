// Core tags at a real label size, walked at 1440×900 from a work order: a 2 × 1 in tag with a QR code of
// at least 0.6 in, one tag per 2 × 1 in page for a label printer, Letter and A4 sheets of the same labels,
// the size stated on screen, and what the browser's print makes of it (print media and a PDF).
// Screenshots: test-results/screenshots/tags-*.png.
import { expect, test, type Page } from '@playwright/test';
import jsQR from 'jsqr';
import type { WorkOrder } from '../../../shared/schemas/records';
import { demo, signIn } from '../support/session';
import { smallTargets } from '../support/touchTargets';
import { apiGet, apiSignIn } from './api';
import { freshDemo } from '../support/freshDemo';

test.beforeAll(freshDemo);

test.use({ viewport: { width: 1440, height: 900 } });

const shot = async (page: Page, name: string) => {
  await page.evaluate(() => document.fonts.ready);
  await page.waitForTimeout(400);
  await page.screenshot({ path: `test-results/screenshots/tags-${name}.png`, fullPage: true });
};

/** A box in CSS inches: the browser lays out 96 CSS px to the inch, and prints them as true inches. */
const inches = async (page: Page, selector: string) => {
  const box = await page.locator(selector).first().evaluate((e) => e.getBoundingClientRect().toJSON() as DOMRect);
  return { width: box.width / 96, height: box.height / 96 };
};

/** Page sizes of a PDF in points (1/72 in), in page order: Chromium writes one /MediaBox per page. */
function pdfPages(pdf: Buffer): { width: number; height: number }[] {
  return [...pdf.toString('latin1').matchAll(/\/MediaBox\s*\[\s*0 0 ([\d.]+) ([\d.]+)\s*\]/g)].map((m) => ({ width: Number(m[1]), height: Number(m[2]) }));
}

/** What a phone reads from the QR code: the image drawn into a canvas and decoded (jsQR). */
async function readQr(page: Page, tag: string): Promise<string | undefined> {
  const { data, width, height } = await page.getByTestId(`tag-qr-${tag}`).evaluate(async (img: HTMLImageElement) => {
    await img.decode();
    const c = document.createElement('canvas');
    c.width = c.height = 300;
    const g = c.getContext('2d')!;
    g.drawImage(img, 0, 0, 300, 300);
    return { data: [...g.getImageData(0, 0, 300, 300).data], width: 300, height: 300 };
  });
  return jsQR(Uint8ClampedArray.from(data), width, height)?.data;
}

test('core tags print at 2 × 1 in on a label printer and on Letter and A4 sheets', async ({ page }) => {
  test.setTimeout(120_000);
  const lead = await apiSignIn(page.request, demo.supervisor);
  const { workOrders } = await apiGet<{ workOrders: WorkOrder[] }>(page.request, lead, '/api/work-orders');
  const wo = workOrders.find((w) => w.status !== 'done')!;
  const { cores } = await apiGet<{ cores: { tag: string; doorLabel: string; keySymbol: string }[] }>(page.request, lead, `/api/work-orders/${wo.id}`);
  const first = [...cores].sort((a, b) => a.tag.localeCompare(b.tag, 'en', { numeric: true }))[0]!;

  await signIn(page, demo.supervisor);
  await page.goto(`/work-orders/${wo.id}`);
  await page.getByTestId('print-tags').click();
  await expect(page).toHaveURL(new RegExp(`/work-orders/${wo.id}/tags`));
  await expect(page.locator('[data-test^="tag-qr-"]')).toHaveCount(cores.length);

  // Label printer (the default): the size is stated, every tag is 2 × 1 in, the QR code 0.75 in.
  await expect(page.getByTestId('tag-size')).toContainText('Label printer: one 2 × 1 in (50.8 × 25.4 mm) label per page');
  expect(await inches(page, '.core-tag')).toEqual({ width: 2, height: 1 });
  const qr = await inches(page, `[data-test="tag-qr-${first.tag}"]`);
  expect(qr.width).toBeGreaterThanOrEqual(0.6);
  expect(qr.height).toBeGreaterThanOrEqual(0.6);
  // The tag: tag id, door, the change key's symbol, in natural order; the QR code holds the tag id and door only.
  const tag = page.getByTestId(`tag-${first.tag}`);
  await expect(tag).toContainText(first.tag);
  await expect(tag).toContainText(`Door ${first.doorLabel}`);
  await expect(page.getByTestId(`tag-key-${first.tag}`)).toHaveText(`Key ${first.keySymbol}`);
  await expect(page.locator('[data-test^="tag-CR-"]').first()).toHaveAttribute('data-test', `tag-${first.tag}`);
  expect(await readQr(page, first.tag)).toBe(`CORE ${first.tag}\nDOOR ${first.doorLabel}`);
  expect(await smallTargets(page, 48)).toEqual([]);
  await shot(page, 'label-printer');

  // On paper: one 2 × 1 in page per tag, nothing but the tag on it.
  await page.emulateMedia({ media: 'print' });
  await expect(page.getByTestId('print')).toBeHidden();
  await expect(page.getByTestId('tag-size')).toBeHidden();
  expect(await inches(page, '[data-test="tag-page"]')).toEqual({ width: 2, height: 1 });
  await shot(page, 'label-printer-paper');
  const labels = pdfPages(await page.pdf({ preferCSSPageSize: true }));
  expect(labels).toHaveLength(cores.length);
  for (const p of labels) expect(p).toEqual({ width: 144, height: 72 });
  await page.emulateMedia({ media: 'screen' });

  // A Letter sheet: 4 × 10 labels, its margins stated, drawn at its real size on screen.
  await page.getByTestId('tag-mode-letter').click();
  await expect(page).toHaveURL(/size=letter/);
  await expect(page.getByTestId('tag-size')).toHaveText(/Letter \(8\.5 × 11 in\): 4 × 10 labels of 2 × 1 in .* margins 0\.5 in \(12\.7 mm\) top and bottom, 0\.25 in \(6\.4 mm\) left and right/);
  expect(await inches(page, '[data-test="tag-page"]')).toEqual({ width: 8.5, height: 11 });
  expect(await inches(page, '.core-tag')).toEqual({ width: 2, height: 1 });
  const sheet = await page.getByTestId('tag-page').first().boundingBox();
  const firstTag = await tag.boundingBox();
  expect({ left: (firstTag!.x - sheet!.x) / 96, top: (firstTag!.y - sheet!.y) / 96 }).toEqual({ left: 0.25, top: 0.5 });
  await shot(page, 'letter');
  await page.emulateMedia({ media: 'print' });
  await shot(page, 'letter-paper');
  const letter = pdfPages(await page.pdf({ preferCSSPageSize: true }));
  expect(letter).toEqual(Array.from({ length: Math.ceil(cores.length / 40) }, () => ({ width: 612, height: 792 })));
  await page.emulateMedia({ media: 'screen' });

  // An A4 sheet: 3 × 11 labels with 0.5 in between columns.
  await page.getByTestId('tag-mode-a4').click();
  await expect(page).toHaveURL(/size=a4/);
  await expect(page.getByTestId('tag-size')).toContainText('A4 (8.27 × 11.69 in): 3 × 11 labels of 2 × 1 in');
  const a4 = await inches(page, '[data-test="tag-page"]');
  expect(a4.width * 25.4).toBeCloseTo(210, 0);
  expect(a4.height * 25.4).toBeCloseTo(297, 0);
  await shot(page, 'a4');
  await page.emulateMedia({ media: 'print' });
  const a4Pages = pdfPages(await page.pdf({ preferCSSPageSize: true }));
  expect(a4Pages).toHaveLength(Math.ceil(cores.length / 33));
  for (const p of a4Pages) {
    expect(p.width / 72 * 25.4).toBeCloseTo(210, 0);
    expect(p.height / 72 * 25.4).toBeCloseTo(297, 0);
  }
  await page.emulateMedia({ media: 'screen' });

  // The size stays in the address: a reload prints on the same labels.
  await page.reload();
  await expect(page.getByTestId('tag-size')).toContainText('A4 (8.27 × 11.69 in)');
});
