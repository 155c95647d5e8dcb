/**
 * Fills for the Core view's parts (brand.md): the change key's part solid brass, master
 * wafers copper getting darker by level, build-ups hatched. Each part also carries its
 * label (B, M1, BU, T), so colour is never the only cue.
 */
import type { PartStepKind } from './steps';

export const brass = '#B8892B';
/** Copper tones, lightest first: master wafer 1 (lowest level) to 4. */
export const copper = ['#C98A5E', '#8F5530', '#6E3D1E', '#4E2A12'] as const;
export const topPinFill = '#AEB9BE';

export function partFill(kind: PartStepKind, level: number | null, hatch: string): string {
  if (kind === 'bottom') return brass;
  if (kind === 'master') return copper[Math.min((level ?? 1) - 1, copper.length - 1)] as string;
  if (kind === 'buildUp') return hatch;
  return topPinFill;
}

/** Text on the part: paper on the darker coppers, near-black elsewhere; each at least 4.5:1 (WCAG 1.4.3). */
export function partInk(kind: PartStepKind, level: number | null): string {
  return kind === 'master' && (level ?? 1) >= 2 ? '#F6F3EC' : '#1B2327';
}
