import { describe, expect, it } from 'vitest';
import { TAG_INCHES, TAG_LAYOUTS, describeLayout, pageRule, pagesOf, perPage } from './tagSheets';

describe('core tag layouts', () => {
  it('a tag is 2 × 1 in with a QR code of at least 0.6 in that fits beside the text (common practice for door and core labels)', () => {
    expect(TAG_INCHES).toMatchObject({ width: 2, height: 1 });
    expect(TAG_INCHES.qr).toBeGreaterThanOrEqual(0.6);
    expect(TAG_INCHES.qr).toBeLessThan(TAG_INCHES.height);
  });

  it('every sheet grid plus its margins fills the page exactly (Letter 8.5 × 11 in, A4 210 × 297 mm: ISO 216)', () => {
    for (const l of Object.values(TAG_LAYOUTS)) {
      const width = 2 * l.margin.left + l.columns * TAG_INCHES.width + (l.columns - 1) * l.columnGap;
      const height = 2 * l.margin.top + l.rows * TAG_INCHES.height;
      expect(width, l.mode).toBeCloseTo(l.page.width, 9);
      expect(height, l.mode).toBeCloseTo(l.page.height, 9);
      // Most office printers cannot print the outer 0.2 in: a label there would be cut (common practice).
      if (l.mode !== 'label') expect(Math.min(l.margin.top, l.margin.left), l.mode).toBeGreaterThanOrEqual(0.25);
    }
    expect(TAG_LAYOUTS.a4.page.width * 25.4).toBeCloseTo(210, 9);
    expect(TAG_LAYOUTS.a4.page.height * 25.4).toBeCloseTo(297, 9);
  });

  it('the label printer gets one 2 × 1 in page per tag, without margins', () => {
    expect(pageRule(TAG_LAYOUTS.label)).toBe('@page { size: 2in 1in; margin: 0in 0in; }');
    expect(perPage(TAG_LAYOUTS.label)).toBe(1);
    expect(pagesOf(['a', 'b', 'c'], TAG_LAYOUTS.label)).toEqual([['a'], ['b'], ['c']]);
  });

  it('sheets take as many tags as the grid holds, the rest on the next sheet', () => {
    expect(pageRule(TAG_LAYOUTS.letter)).toBe('@page { size: letter; margin: 0.5in 0.25in; }');
    const tags = Array.from({ length: 41 }, (_, i) => i);
    expect(pagesOf(tags, TAG_LAYOUTS.letter).map((p) => p.length)).toEqual([40, 1]);
    expect(pagesOf(tags, TAG_LAYOUTS.a4).map((p) => p.length)).toEqual([33, 8]);
    expect(pagesOf([], TAG_LAYOUTS.a4)).toEqual([]);
  });

  it('the screen states the size, the grid and the margins of the chosen layout', () => {
    expect(describeLayout(TAG_LAYOUTS.label)).toContain('2 × 1 in (50.8 × 25.4 mm)');
    expect(describeLayout(TAG_LAYOUTS.letter)).toBe(
      'Letter (8.5 × 11 in): 4 × 10 labels of 2 × 1 in (50.8 × 25.4 mm) per sheet; margins 0.5 in (12.7 mm) top and bottom, 0.25 in (6.4 mm) left and right, no gaps between labels. Print at 100 % scale.',
    );
    expect(describeLayout(TAG_LAYOUTS.a4)).toContain('A4 (8.27 × 11.69 in): 3 × 11 labels');
    expect(describeLayout(TAG_LAYOUTS.a4)).toContain('0.5 in (12.7 mm) between columns');
  });
});
