import { describe, expect, it } from 'vitest';
import { compareSymbols, KEY_CHECK_ROLE_LABELS, KEY_LEVEL_LABELS, keyCheckRoleLabel } from './keyLevels';

describe('key symbols in natural order', () => {
  // common practice: natural sort order ("AA2 before AA10"), as file managers list numbered names
  it.each([
    [['AA10', 'AA2', 'AA1'], ['AA1', 'AA2', 'AA10']],
    [['AB1', 'AA10', 'A'], ['A', 'AA10', 'AB1']],
    [['AA02', 'AA2', 'AA3'], ['AA2', 'AA02', 'AA3']],
  ])('%j → %j', (input, sorted) => expect([...input].sort(compareSymbols)).toEqual(sorted));
});

describe('one name per key level', () => {
  // the issue: the Bench and the completion detail use the same words
  it('says Grand master, Master, Change key', () => {
    expect([KEY_LEVEL_LABELS.gm, KEY_LEVEL_LABELS.master, KEY_LEVEL_LABELS.change]).toEqual(['Grand master', 'Master', 'Change key']);
  });
});

describe('a Key check role in words', () => {
  // the issue: the tablet said "Grand master" where the completion detail said "Master key"; both use this now
  it('names a master by its own level when the level is known, the role otherwise', () => {
    expect(keyCheckRoleLabel('master', 'gm')).toBe('Grand master');
    expect(keyCheckRoleLabel('master', 'ggm')).toBe('Great grand master');
    expect(keyCheckRoleLabel('master')).toBe('Master');
    expect(keyCheckRoleLabel('change', 'gm')).toBe('Change key');
    expect(Object.values(KEY_CHECK_ROLE_LABELS)).toEqual(['Change key', 'Master', 'Cross-keyed change key', 'Control key', 'Key that must not work']);
  });
});
