import { describe, expect, it } from 'vitest';
import { copyName, howWords } from './keyControlWords';

describe('how a key turns a core, in words', () => {
  it.each([
    ['incidental', undefined, 'Incidental: through master wafers'],
    ['incidental', true, 'Incidental: through master wafers'],
    ['control', false, 'Removes the core (control key)'],
    ['intended', true, 'Intended: the door’s own key'],
    ['intended', false, 'Intended: a master above it'],
    ['intended', undefined, 'Intended: one of its operating keys'],
  ] as const)('%s (own key: %s) reads "%s"', (how, own, words) => {
    expect(howWords(how, own)).toBe(words);
  });

  it('names a copy by its symbol and copy number, as stamped (common practice)', () => {
    expect(copyName('AB2', 1)).toBe('AB2 #1');
    expect(copyName('A', 12)).toBe('A #12');
  });
});
