/**
 * The Key check plan as the technician meets it: the order the keys are tried and the
 * words for what each one must do. The packet names keys by symbol only.
 */
import type { KeyCheckItem, KeyCheckRole } from '@shared/schemas/packet';
import type { KeyLevel } from '@shared/schemas/records';
import { KEY_CHECK_ROLE_LABELS, KEY_LEVEL_LABELS, keyCheckRoleLabel } from '@shared/keyLevels';

// Keys that must turn come first, lowest level up, so a fault shows on the simplest key;
// the control key next; the key that must not turn last (keying-primer bench procedure).
const roleRank: Record<KeyCheckRole, number> = { change: 0, cross: 0, master: 1, control: 2, 'must-not-turn': 3 };
const levelRank: Record<KeyLevel, number> = { change: 0, master: 1, gm: 2, ggm: 3 };

/** The plan in checking order; ties keep the packet's order (Array.prototype.sort is stable). */
export function keyCheckOrder(plan: readonly KeyCheckItem[]): KeyCheckItem[] {
  const rank = (item: KeyCheckItem): number => roleRank[item.role] * 10 + (item.role === 'master' && item.level ? levelRank[item.level] : 0);
  return [...plan].sort((a, b) => rank(a) - rank(b));
}

export const roleWords: Record<KeyCheckRole, string> = KEY_CHECK_ROLE_LABELS;

/** The level's one name (shared/keyLevels.ts) when the packet says it: "Grand master", "Master". */
export function roleName(item: KeyCheckItem): string {
  return keyCheckRoleLabel(item.role, item.level);
}

/** Which key this is and why it must not turn, from the plan's `why`; null for a plan without one. */
export function mustNotTurnWhy(item: KeyCheckItem): string | null {
  const why = item.why;
  if (item.role !== 'must-not-turn' || !why) return null;
  const level = item.level ? KEY_LEVEL_LABELS[item.level].toLowerCase() : 'key';
  const own = why.ownMaster ? ` ${why.ownMaster}` : '';
  if (why.relation === 'sibling') return `A ${level} under the same master${own}: the neighbouring door’s key. If it turns, one door’s key opens another.`;
  const other = why.otherMaster ? ` ${why.otherMaster}` : '';
  if (item.level === 'master') return `The master of another area${other}: it must open only its own area’s doors, not this door under${own || ' another master'}.`;
  return `A ${level} under another master${other}: if it turns, keys cross from one area into another.`;
}

/** What must happen, in the words a locksmith uses at the bench. */
export const expectWords: Record<KeyCheckItem['expect'], { must: string; detail: string }> = {
  turns: {
    must: 'Must turn the plug',
    detail: 'Turn it fully both ways; it should move smoothly and return to the start.',
  },
  releases: {
    must: 'Must turn about 15° and stop',
    detail: 'That short turn releases the core. Turn it back and take the key out; leave the core in place for now.',
  },
  none: {
    must: 'Must NOT turn',
    detail: 'Insert it fully and try gently both ways: the plug must not move.',
  },
};

export interface FailureChoice {
  id: 'no-turn' | 'stiff' | 'wrong-turned' | 'no-release' | 'other';
  label: string;
}

export const failureChoices: readonly FailureChoice[] = [
  { id: 'no-turn', label: 'Would not turn' },
  { id: 'stiff', label: 'Turned but stiff' },
  { id: 'wrong-turned', label: 'A key that must not work turned' },
  { id: 'no-release', label: 'Control key would not release' },
  { id: 'other', label: 'Something else' },
];

/** The note kept with a failed check: the choice, then the technician's words, within the record's 500 characters. */
export function failureNote(choice: FailureChoice['id'], text = ''): string {
  const label = failureChoices.find((c) => c.id === choice)?.label ?? 'Something else';
  const words = text.trim();
  return (words ? `${label}: ${words}` : label).slice(0, 500);
}

/** Only the choices that can happen with this key (a must-not-turn key cannot be "stiff"). */
export function failureChoicesFor(item: KeyCheckItem): FailureChoice[] {
  const fits: Record<KeyCheckItem['expect'], FailureChoice['id'][]> = {
    turns: ['no-turn', 'stiff', 'other'],
    releases: ['no-release', 'no-turn', 'stiff', 'other'],
    none: ['wrong-turned', 'other'],
  };
  return failureChoices.filter((c) => fits[item.expect].includes(c.id));
}
