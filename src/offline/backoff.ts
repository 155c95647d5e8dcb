/** Retry spacing after a failed sync: doubling from 2 s, capped at 5 min, with jitter so tablets that lost the same server do not return in step. */
export const BACKOFF_BASE_MS = 2_000;
export const BACKOFF_CAP_MS = 5 * 60_000;

/** "Equal jitter": somewhere in the upper half of the doubled delay; failures counts from 1. */
export function backoffDelay(failures: number, random: () => number = Math.random): number {
  const ceiling = Math.min(BACKOFF_CAP_MS, BACKOFF_BASE_MS * 2 ** Math.max(0, failures - 1));
  return Math.round(ceiling / 2 + (random() * ceiling) / 2);
}
