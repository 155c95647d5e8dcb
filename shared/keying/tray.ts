import { hasErrors } from './errors';
import { buildUpSeam } from './keyOperates';
import type { CorePinning, Profile } from './types';

export type PartKind = 'bottom' | 'master' | 'buildUp' | 'top';
export const partKinds: readonly PartKind[] = ['bottom', 'master', 'buildUp', 'top'];

export interface SizeCount {
  size: number;
  count: number;
}

/** Part counts by kind, each list ascending by size. */
export type PartCounts = Record<PartKind, SizeCount[]>;

export interface TrayChamber extends PartCounts {
  chamber: number;
}

/** A build-up made of two wafers, lower one first, so the tray can say to stack them. */
export interface TwoWaferBuildUp {
  chamber: number;
  total: number;
  wafers: [number, number];
  count: number;
  /**
   * Depths whose control line the seam between the two wafers meets, over the cores
   * counted (ascending): a key cut to one of them there lines up the control shear line
   * in this chamber. Empty when the seam is out of every key's reach.
   */
  seamReleases: number[];
}

export interface Tray {
  /** Pinnings counted. */
  cores: number;
  /** Indexes (in the input) of pinnings left out because they have errors. */
  skipped: number[];
  perChamber: TrayChamber[];
  totals: PartCounts;
  twoWaferBuildUps: TwoWaferBuildUp[];
}

type Tally = Record<PartKind, Map<number, number>>;

const newTally = (): Tally => ({ bottom: new Map(), master: new Map(), buildUp: new Map(), top: new Map() });

function bump(map: Map<number, number>, size: number): void {
  map.set(size, (map.get(size) ?? 0) + 1);
}

function toCounts(tally: Tally): PartCounts {
  const list = (map: Map<number, number>): SizeCount[] =>
    [...map].sort((a, b) => a[0] - b[0]).map(([size, count]) => ({ size, count }));
  return { bottom: list(tally.bottom), master: list(tally.master), buildUp: list(tally.buildUp), top: list(tally.top) };
}

/**
 * The pick list for a batch of cores: per chamber and in total, how many of each part
 * size to pull. A pinning with errors is never counted (its chart is wrong); its index
 * is listed in `skipped` so the work order can say which cores still need fixing.
 */
export function trayFor(profile: Profile, pinnings: CorePinning[]): Tray {
  const perChamber = Array.from({ length: profile.chambers }, newTally);
  const totals = newTally();
  const pairs = new Map<string, TwoWaferBuildUp>();
  const skipped: number[] = [];
  let cores = 0;

  pinnings.forEach((pinning, index) => {
    if (hasErrors(pinning) || pinning.chambers.length !== profile.chambers) {
      skipped.push(index);
      return;
    }
    cores++;
    for (const ch of pinning.chambers) {
      const tally = perChamber[ch.chamber - 1] as Tally;
      for (const t of [tally, totals]) {
        bump(t.bottom, ch.bottom);
        for (const m of ch.masters) bump(t.master, m);
        for (const w of ch.buildUp) bump(t.buildUp, w);
        bump(t.top, ch.top);
      }
      if (ch.buildUp.length === 2) {
        const [lower, upper] = ch.buildUp as [number, number];
        const id = `${ch.chamber}:${lower}+${upper}`;
        const entry = pairs.get(id) ?? { chamber: ch.chamber, total: lower + upper, wafers: [lower, upper], count: 0, seamReleases: [] };
        entry.count++;
        const depth = buildUpSeam(ch, profile)?.releasesDepth;
        if (depth != null && !entry.seamReleases.includes(depth)) entry.seamReleases = [...entry.seamReleases, depth].sort((a, b) => a - b);
        pairs.set(id, entry);
      }
    }
  });

  const twoWaferBuildUps = [...pairs.values()].sort(
    (a, b) => a.chamber - b.chamber || a.total - b.total || a.wafers[0] - b.wafers[0],
  );
  return {
    cores,
    skipped,
    perChamber: perChamber.map((tally, i) => ({ chamber: i + 1, ...toCounts(tally) })),
    totals: toCounts(totals),
    twoWaferBuildUps,
  };
}
