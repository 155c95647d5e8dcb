import { parseBitting } from './bitting';
import { KeyingError } from './errors';
import { masterConstantChambers, placementChecker, type PlacementSystem } from './placement';
import { progressionDepths } from './rules';
import type { Profile } from './types';

/** The trade's two usual schemes (keying primer, "Progression"). */
export type ProgressionMethod = 'total-position' | 'rotating-constant';
export const progressionMethods: readonly ProgressionMethod[] = ['total-position', 'rotating-constant'];

export interface ProgressOptions {
  /** Bitting of the master the change keys are progressed from. */
  topMaster: string;
  /** Chambers (1-based) that progress; every other chamber keeps the master's depth. */
  progress: number[];
  /** Total position progression when left out. */
  method?: ProgressionMethod;
  /** Rotating constant: how many progressed chambers keep the master's depth in each key (1 when left out). */
  constants?: number;
  /** Left out of the result when given (and `placement` is not). */
  control?: string;
  /** Caps how many keys are returned. */
  limit?: number;
  /**
   * The system the keys are made for and the id of the master they hang under: every key
   * must then pass checkKeyPlacement there, and a chamber the master holds constant may
   * not be progressed. Without it the master stands alone (with `control` beside it).
   */
  placement?: { system: PlacementSystem; parentId: string };
}

/** Without a limit, refuse lists no one could use rather than exhaust the tablet's memory. */
export const maxProgressionWithoutLimit = 1_000_000;

/**
 * Change keys from a master. Total position progression: each progressed chamber takes
 * every depth of the profile's progression other than the master's (for step 2: the same
 * parity), ascending, the lowest-numbered progressed chamber changing slowest, like a
 * chart read row by row. Rotating constant: in each key `constants` of the progressed
 * chambers keep the master's depth and the rest progress; which chambers stay constant
 * rotates from key to key (sets in ascending order, then the next depths for each).
 * Every key passes checkKeyPlacement (MACS, parity, hierarchy, no duplicate, not the
 * control key) or is dropped; `limit` caps the count after dropping.
 */
export function progressKeys(profile: Profile, opts: ProgressOptions): string[] {
  const top = parseBitting(profile, opts.topMaster);
  const limit = opts.limit ?? Infinity;
  if (limit !== Infinity && (!Number.isInteger(limit) || limit < 0)) {
    throw new KeyingError('progress-limit', `The limit is ${String(opts.limit)}; give a whole number of keys, 0 or more.`);
  }
  const chambers = [...new Set(opts.progress)].sort((a, b) => a - b);
  for (const c of chambers) {
    if (!Number.isInteger(c) || c < 1 || c > profile.chambers) {
      throw new KeyingError('progress-chamber', `Chamber ${String(c)} is not on this core; choose chambers 1 to ${profile.chambers} to progress.`);
    }
  }
  const { system, parentId } = opts.placement ?? {
    system: { control: opts.control ?? '', keys: [{ id: 'master', symbol: 'the master', bitting: opts.topMaster, parentId: null }] },
    parentId: 'master',
  };
  if (opts.placement) {
    const held = masterConstantChambers(profile, system, parentId).filter((c) => chambers.includes(c));
    if (held.length > 0) {
      throw new KeyingError('progress-held',
        `Chamber ${held.join(', ')}: the master holds ${held.length === 1 ? 'it' : 'them'} constant (progressed at a level above), so keys under it may not progress ${held.length === 1 ? 'it' : 'them'}; choose other chambers.`,
        held[0]);
    }
  }
  const rotating = opts.method === 'rotating-constant';
  const constants = opts.constants ?? 1;
  if (rotating && chambers.length > 0 && (!Number.isInteger(constants) || constants < 1 || constants >= chambers.length)) {
    throw new KeyingError('progress-constants', chambers.length === 1
      ? 'Rotating constant needs at least two chambers to progress (one stays at the master’s cut in each key); choose another chamber.'
      // Reached only for a count that is not 1 (with one constant, two progressed chambers or more are enough).
      : `Rotating constant keeps ${String(constants)} chambers constant per key, but ${chambers.length} are progressed; keep 1 to ${chambers.length - 1}, or progress more chambers.`);
  }
  if (chambers.length === 0) return [];

  const choices = chambers.map((c) => progressionDepths(profile, top[c - 1] as number));
  const patterns = rotating ? rotations(chambers.length, constants) : [chambers.map(() => true)];
  const counts = patterns.map((free) => free.reduce((n, f, j) => (f ? n * (choices[j] as number[]).length : n), 1));
  const possible = counts.reduce((a, b) => a + b, 0);
  if (opts.limit === undefined && possible > maxProgressionWithoutLimit) {
    throw new KeyingError('progress-too-large',
      `Progressing chambers ${chambers.join(', ')} gives ${possible.toLocaleString('en-US')} keys; set a limit of at most ${maxProgressionWithoutLimit.toLocaleString('en-US')}.`);
  }

  const check = placementChecker(profile, system);
  const keys: string[] = [];
  const depths = [...top];
  const most = Math.max(...counts);
  // Round robin over the constant patterns so the constant position rotates key to key.
  for (let r = 0; r < most && keys.length < limit; r++) {
    for (let p = 0; p < patterns.length && keys.length < limit; p++) {
      if (r >= (counts[p] as number)) continue;
      let rest = r;
      const free = patterns[p] as boolean[];
      for (let j = chambers.length - 1; j >= 0; j--) {
        const i = (chambers[j] as number) - 1;
        if (!free[j]) {
          depths[i] = top[i] as number;
          continue;
        }
        const list = choices[j] as number[];
        depths[i] = list[rest % list.length] as number;
        rest = Math.floor(rest / list.length);
      }
      const bitting = depths.join('');
      if (check({ bitting, parentId }).length === 0) keys.push(bitting);
    }
  }
  return keys;
}

/**
 * Which of n progressed chambers progress (true) in each key when k stay constant: every
 * choice of k constant chambers, the lowest-numbered constants first.
 */
function rotations(n: number, k: number): boolean[][] {
  const out: boolean[][] = [];
  const pick = (from: number, left: number, constant: number[]): void => {
    if (left === 0) {
      out.push(Array.from({ length: n }, (_, j) => !constant.includes(j)));
      return;
    }
    for (let j = from; j <= n - left; j++) pick(j + 1, left - 1, [...constant, j]);
  };
  pick(0, k, []);
  return out;
}
