/**
 * The words the screens use for the trade's things. The level names and the symbol order are
 * defined once in keyLevels.ts; this module gives them the names the office code uses and adds
 * the cross-keyed name. "Position" is a place on a key, "chamber" a place in a core.
 */
import { CONTROL_KEY_LABEL, KEY_LEVEL_LABELS, compareSymbols } from './keyLevels';

export type LevelWord = keyof typeof KEY_LEVEL_LABELS;

export const levelNames = KEY_LEVEL_LABELS;
export const CONTROL_KEY = CONTROL_KEY_LABEL;
export const CROSS_KEY = `Cross-keyed ${KEY_LEVEL_LABELS.change.toLowerCase()}`;

/** Natural order for key symbols, door labels and core tags: AA2 before AA10. */
export const naturalCompare = compareSymbols;
/** A copy of `list` in natural order of `by(item)`. */
export const naturally = <T>(list: readonly T[], by: (item: T) => string): T[] => [...list].sort((x, y) => naturalCompare(by(x), by(y)));

/** The roles by name on every screen and in mail: never the stored value ("admin"). */
export const ROLE_LABELS = { technician: 'Technician', supervisor: 'Supervisor', admin: 'Administrator' } as const satisfies Record<'technician' | 'supervisor' | 'admin', string>;
export const roleOptions = (Object.keys(ROLE_LABELS) as (keyof typeof ROLE_LABELS)[]).map((value) => ({ label: ROLE_LABELS[value], value }));
