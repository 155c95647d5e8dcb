import { describe, expect, test } from 'vitest';
import type { KeyCheckItem } from '@shared/schemas/packet';
import { expectWords, failureChoicesFor, failureNote, keyCheckOrder, roleName } from './keyCheck';
import { plan } from './testing/fixtures';

describe('Key check plan', () => {
  // keying-primer bench procedure step 4 (change, masters, control, must-not-turn).
  test('ordered change first, masters by level, control, then the key that must not turn', () => {
    expect(keyCheckOrder(plan).map((k) => k.role)).toEqual(['change', 'master', 'master', 'control', 'must-not-turn']);
    expect(keyCheckOrder(plan).map(roleName)).toEqual(['Change key', 'Master key', 'Grand master', 'Control key', 'Key that must not work']);
    expect(plan[0]?.role).toBe('must-not-turn');
  });

  test('a cross-keyed change key stays with the change keys, in the packet order', () => {
    const cross: KeyCheckItem = { role: 'cross', symbol: 'XAA2', level: 'change', expect: 'turns' };
    expect(keyCheckOrder([plan[2]!, cross, plan[4]!]).map((k) => k.symbol)).toEqual(['XAA2', 'AA1', 'A']);
  });

  // keying-primer: the control key turns only about 15 degrees to release the core.
  test('the words say what each key must do', () => {
    expect(expectWords.releases.must).toMatch(/15°/);
    expect(expectWords.none.must).toMatch(/NOT turn/);
  });

  test('failure choices fit the key, and the note stays within the 500 characters a record keeps', () => {
    expect(failureChoicesFor(plan[0]!).map((c) => c.id)).toEqual(['wrong-turned', 'other']);
    expect(failureChoicesFor(plan[1]!).map((c) => c.id)).toContain('no-release');
    expect(failureNote('stiff')).toBe('Turned but stiff');
    expect(failureNote('other', '  pin stuck out of chamber 2 ')).toBe('Something else: pin stuck out of chamber 2');
    expect(failureNote('other', 'x'.repeat(900))).toHaveLength(500);
  });
});
