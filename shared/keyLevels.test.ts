import { describe, expect, it } from 'vitest';
import { compareSymbols, KEY_LEVEL_LABELS } from './keyLevels';

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
