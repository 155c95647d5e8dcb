import { describe, expect, test } from 'vitest';
import { brass, copper, partFill, partInk, topPinFill } from './coreColours';

// WCAG 2.2 relative luminance and contrast ratio (SC 1.4.3: 4.5:1 for normal text).
function luminance(hex: string): number {
  const [r, g, b] = [1, 3, 5].map((i) => parseInt(hex.slice(i, i + 2), 16) / 255).map((c) => (c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4)) as [number, number, number];
  return 0.2126 * r + 0.7152 * g + 0.0722 * b;
}
const contrast = (a: string, b: string): number => {
  const [hi, lo] = [luminance(a), luminance(b)].sort((x, y) => y - x) as [number, number];
  return (hi + 0.05) / (lo + 0.05);
};

describe('Core view colours', () => {
  test.each([
    ['bottom', null, brass], ['master', 1, copper[0]], ['master', 2, copper[1]], ['master', 3, copper[2]], ['master', 4, copper[3]], ['top', null, topPinFill],
  ] as const)('%s level %s: its label reaches 4.5:1 (WCAG 1.4.3)', (kind, level, fill) => {
    expect(partFill(kind, level, 'url(#h)')).toBe(fill);
    expect(contrast(partInk(kind, level), fill)).toBeGreaterThanOrEqual(4.5);
  });

  // brand.md: master levels in copper tones getting darker by level; control hatched, not a colour.
  test('copper gets darker by level and the build-up is the hatch pattern', () => {
    const l = copper.map(luminance);
    for (let i = 1; i < l.length; i++) expect(l[i]).toBeLessThan(l[i - 1] as number);
    expect(partFill('buildUp', null, 'url(#h)')).toBe('url(#h)');
  });
});
