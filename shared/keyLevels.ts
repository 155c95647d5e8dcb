/**
 * One name per key level, for every screen (Bench, Key check, completion detail, key tree),
 * and the natural order of key symbols (AA2 before AA10), so lists read the same everywhere.
 */
import type { KeyLevel } from './schemas/records';

export const KEY_LEVEL_LABELS: Record<KeyLevel, string> = {
  ggm: 'Great grand master',
  gm: 'Grand master',
  master: 'Master',
  change: 'Change key',
};

export const CONTROL_KEY_LABEL = 'Control key';

/** Key symbols in natural order: letters as text, runs of digits as numbers ("AA2" < "AA10"). */
export function compareSymbols(a: string, b: string): number {
  const pa = a.match(/\d+|\D+/g) ?? [];
  const pb = b.match(/\d+|\D+/g) ?? [];
  for (let i = 0; i < Math.min(pa.length, pb.length); i++) {
    const x = pa[i]!;
    const y = pb[i]!;
    const nx = /^\d/.test(x) && /^\d/.test(y);
    const d = nx ? Number(x) - Number(y) || x.length - y.length : x < y ? -1 : x > y ? 1 : 0;
    if (d !== 0) return d;
  }
  return pa.length - pb.length;
}
