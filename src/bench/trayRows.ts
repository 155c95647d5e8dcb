/**
 * The Tray as rows of a table: one row per part kind and size, one count per chamber,
 * and the total. Two-wafer build-ups are spelled out so nobody pulls one thick wafer.
 */
import { partKinds, type PartKind, type Tray, type TwoWaferBuildUp } from '@shared/keying';

export interface TrayRow {
  kind: PartKind;
  kindLabel: string;
  size: number;
  /** Count per chamber, chamber 1 first; 0 where that chamber takes none. */
  perChamber: number[];
  total: number;
}

export const trayKindLabels: Record<PartKind, string> = {
  bottom: 'Bottom pin',
  master: 'Master wafer',
  buildUp: 'Build-up wafer',
  top: 'Top pin',
};

export function trayRows(tray: Tray): TrayRow[] {
  const chambers = [...tray.perChamber].sort((a, b) => a.chamber - b.chamber);
  return partKinds.flatMap((kind) =>
    tray.totals[kind].map(({ size, count }) => ({
      kind,
      kindLabel: trayKindLabels[kind],
      size,
      perChamber: chambers.map((ch) => ch[kind].find((c) => c.size === size)?.count ?? 0),
      total: count,
    })),
  );
}

/**
 * "Chamber 3, build-up 14: stack the 9 first, then the 5 on top (×2) · seam at the control
 * line of depth 3": which wafer goes lower, by size. The seam is one more break: a key cut
 * to that depth there lines up the control shear line, so the words say which depth.
 */
export function twoWaferWords(b: TwoWaferBuildUp): string {
  const seam = b.seamReleases?.length ? ` · seam at the control line of depth ${b.seamReleases.join(', ')}` : '';
  return `Chamber ${b.chamber}, build-up ${b.total}: stack the ${b.wafers[0]} first, then the ${b.wafers[1]} on top (×${b.count})${seam}`;
}
