/**
 * Core tags at a real label size: every tag is 2 × 1 in with a QR code of at least 0.6 in, printed
 * one per page on a label printer or as a grid on a Letter or A4 sheet. Sizes are in inches (CSS
 * inches print true at 100 % scale); each layout's margins are stated so a sheet of labels can be matched.
 */

export const TAG_INCHES = { width: 2, height: 1, qr: 0.75 } as const;

export type TagMode = 'label' | 'letter' | 'a4';

export interface TagLayout {
  mode: TagMode;
  /** The button's word. */
  name: string;
  /** `@page` size: a CSS keyword or two lengths. */
  pageSize: string;
  page: { width: number; height: number };
  margin: { top: number; left: number };
  columns: number;
  rows: number;
  columnGap: number;
}

const MM = 1 / 25.4;

/** A grid of 2 × 1 in labels centred on a page: the margins follow from the page and the grid. */
function sheet(mode: TagMode, name: string, pageSize: string, page: TagLayout['page'], columns: number, rows: number, columnGap: number): TagLayout {
  const left = (page.width - columns * TAG_INCHES.width - (columns - 1) * columnGap) / 2;
  const top = (page.height - rows * TAG_INCHES.height) / 2;
  return { mode, name, pageSize, page, margin: { top, left }, columns, rows, columnGap };
}

export const TAG_LAYOUTS: Record<TagMode, TagLayout> = {
  label: { mode: 'label', name: 'Label printer', pageSize: '2in 1in', page: { width: 2, height: 1 }, margin: { top: 0, left: 0 }, columns: 1, rows: 1, columnGap: 0 },
  letter: sheet('letter', 'Letter sheet', 'letter', { width: 8.5, height: 11 }, 4, 10, 0),
  a4: sheet('a4', 'A4 sheet', 'A4', { width: 210 * MM, height: 297 * MM }, 3, 11, 0.5),
};

export const isTagMode = (v: unknown): v is TagMode => typeof v === 'string' && v in TAG_LAYOUTS;

export const perPage = (l: TagLayout) => l.columns * l.rows;

/** The tags of each printed page, in order. */
export function pagesOf<T>(items: readonly T[], l: TagLayout): T[][] {
  const n = perPage(l);
  const pages: T[][] = [];
  for (let i = 0; i < items.length; i += n) pages.push(items.slice(i, i + n));
  return pages;
}

// Rounded down: a printable area a hair too small would push the last row of labels onto a new page.
const inch = (v: number) => `${Math.floor(v * 10_000) / 10_000}in`;
const mm = (v: number) => Math.round(v * 254) / 10; // 0.25 in is 6.35 mm: shown 6.4, not a float's 6.3
const both = (v: number) => `${Number(v.toFixed(2))} in (${mm(v)} mm)`;

/** The `@page` rule that makes the browser's print produce exactly this layout. */
export function pageRule(l: TagLayout): string {
  return `@page { size: ${l.pageSize}; margin: ${inch(l.margin.top)} ${inch(l.margin.left)}; }`;
}

/** What the screen says about the chosen size, so the right labels go into the printer. */
export function describeLayout(l: TagLayout): string {
  const tag = `${TAG_INCHES.width} × ${TAG_INCHES.height} in (${mm(TAG_INCHES.width)} × ${mm(TAG_INCHES.height)} mm)`;
  if (l.mode === 'label') return `Label printer: one ${tag} label per page, no margins. Print at 100 % scale.`;
  const page = `${l.name.replace(' sheet', '')} (${Number(l.page.width.toFixed(2))} × ${Number(l.page.height.toFixed(2))} in)`;
  const gap = l.columnGap ? `, ${both(l.columnGap)} between columns` : ', no gaps between labels';
  return `${page}: ${l.columns} × ${l.rows} labels of ${tag} per sheet; margins ${both(l.margin.top)} top and bottom, ${both(l.margin.left)} left and right${gap}. Print at 100 % scale.`;
}
