/** Measures every interactive element on the page: the Bench's touch rule is 56 px each way (brand.md). */
import type { Page } from '@playwright/test';

export interface SmallTarget {
  what: string;
  width: number;
  height: number;
}

/** Visible interactive elements smaller than `min` px in either direction; an input counts by its field box. */
export function smallTargets(page: Page, min = 56): Promise<SmallTarget[]> {
  return page.evaluate((min) => {
    const selector = 'button, a[href], [role="button"], [role="radio"], [role="checkbox"], [role="switch"], [role="tab"], input:not([type="hidden"]), textarea, select, .q-item--clickable, [tabindex]:not([tabindex="-1"])';
    const out: { what: string; width: number; height: number }[] = [];
    const seen = new Set<Element>();
    for (const el of document.querySelectorAll(selector)) {
      const target = el.matches('input, textarea') ? (el.closest('.q-field__control, .plain-field__control') ?? el) : el;
      if (seen.has(target)) continue;
      seen.add(target);
      const style = getComputedStyle(target);
      const box = target.getBoundingClientRect();
      if (!box.width || !box.height || style.visibility === 'hidden' || target.closest('[aria-hidden="true"]')) continue;
      // off-canvas (a closed drawer): not reachable by touch
      if (box.right <= 0 || box.left >= window.innerWidth) continue;
      if (box.width + 0.5 < min || box.height + 0.5 < min) {
        const label = (target.getAttribute('aria-label') ?? target.getAttribute('data-test') ?? target.textContent ?? '').trim().replace(/\s+/g, ' ').slice(0, 40);
        out.push({ what: `${target.tagName.toLowerCase()}.${[...target.classList].slice(0, 3).join('.')} "${label}"`, width: Math.round(box.width), height: Math.round(box.height) });
      }
    }
    return out;
  }, min);
}
