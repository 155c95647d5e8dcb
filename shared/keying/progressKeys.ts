import { formatBitting, parseBitting } from './bitting';
import { KeyingError } from './errors';
import { macsBreak, progressionDepths } from './rules';
import type { Profile } from './types';

export interface ProgressOptions {
  /** Bitting of the top master the change keys are progressed from. */
  topMaster: string;
  /** Chambers (1-based) that progress; every other chamber keeps the top master's depth. */
  progress: number[];
  /** Left out of the result when given. */
  control?: string;
  /** Caps how many keys are returned. */
  limit?: number;
}

/** Without a limit, refuse lists no one could use rather than exhaust the tablet's memory. */
export const maxProgressionWithoutLimit = 1_000_000;

/**
 * Total position progression from the top master. Each progressed chamber takes every
 * depth of the profile's progression other than the top master's (for step 2: the same
 * parity); the order is ascending, the lowest-numbered progressed chamber changing
 * slowest, like a chart read row by row. Keys that break the maximum adjacent cut, and
 * the control key, are dropped; `limit` caps the count after dropping.
 */
export function progressKeys(profile: Profile, opts: ProgressOptions): string[] {
  const top = parseBitting(profile, opts.topMaster);
  const control = opts.control === undefined ? undefined : formatBitting(parseBitting(profile, opts.control));
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
  if (chambers.length === 0) return [];

  const choices = chambers.map((c) => progressionDepths(profile, top[c - 1] as number));
  const possible = choices.reduce((n, list) => n * list.length, 1);
  if (opts.limit === undefined && possible > maxProgressionWithoutLimit) {
    throw new KeyingError('progress-too-large',
      `Progressing chambers ${chambers.join(', ')} gives ${possible.toLocaleString('en-US')} keys; set a limit of at most ${maxProgressionWithoutLimit.toLocaleString('en-US')}.`);
  }
  if (possible === 0) return [];

  const keys: string[] = [];
  const depths = [...top];
  const counter = new Array<number>(chambers.length).fill(0);
  // Odometer over the progressed chambers: the last one turns fastest.
  for (;;) {
    for (let j = 0; j < chambers.length; j++) {
      depths[(chambers[j] as number) - 1] = (choices[j] as number[])[counter[j] as number] as number;
    }
    if (keys.length >= limit) break;
    if (macsBreak(profile, depths) < 0) {
      const bitting = formatBitting(depths);
      if (bitting !== control) keys.push(bitting);
    }
    let j = chambers.length - 1;
    while (j >= 0) {
      counter[j] = (counter[j] as number) + 1;
      if ((counter[j] as number) < (choices[j] as number[]).length) break;
      counter[j] = 0;
      j--;
    }
    if (j < 0) break;
  }
  return keys;
}
