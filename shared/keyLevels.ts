/**
 * One name per key level, for every screen (Bench, Key check, completion detail, key tree),
 * and the natural order of key symbols (AA2 before AA10), so lists read the same everywhere.
 */
import type { KeyLevel } from './schemas/records';
import type { KeyCheckRole } from './schemas/packet';

export const KEY_LEVEL_LABELS: Record<KeyLevel, string> = {
  ggm: 'Great grand master',
  gm: 'Grand master',
  master: 'Master',
  change: 'Change key',
};

export const CONTROL_KEY_LABEL = 'Control key';

/** What a key is in a Key check, the same on the Bench and in the completion detail. A master names its level when it is known. */
export const KEY_CHECK_ROLE_LABELS: Record<KeyCheckRole, string> = {
  change: KEY_LEVEL_LABELS.change,
  master: KEY_LEVEL_LABELS.master,
  cross: `Cross-keyed ${KEY_LEVEL_LABELS.change.toLowerCase()}`,
  control: CONTROL_KEY_LABEL,
  'must-not-turn': 'Key that must not work',
};

/** A Key check role in words: a master by its own level ("Grand master"), when known. */
export const keyCheckRoleLabel = (role: KeyCheckRole, level?: KeyLevel | null): string => (role === 'master' && level ? KEY_LEVEL_LABELS[level] : KEY_CHECK_ROLE_LABELS[role]);

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
