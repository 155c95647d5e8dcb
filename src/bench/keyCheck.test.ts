import { describe, expect, test } from 'vitest';
import type { KeyCheckItem } from '@shared/schemas/packet';
import { expectWords, failureChoicesFor, failureNote, keyCheckOrder, mustNotTurnWhy, roleName } from './keyCheck';
import { plan } from './testing/fixtures';

describe('Key check plan', () => {
  // keying-primer bench procedure step 4 (change, masters, control, must-not-turn).
  test('ordered change first, masters by level, control, then the key that must not turn', () => {
    expect(keyCheckOrder(plan).map((k) => k.role)).toEqual(['change', 'master', 'master', 'control', 'must-not-turn']);
    expect(keyCheckOrder(plan).map(roleName)).toEqual(['Change key', 'Master', 'Grand master', 'Control key', 'Key that must not work']);
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

describe('must-not-turn keys say which and why', () => {
  // keying-primer bench procedure step 4; the issue: "says which and why on the Key check card"
  test('a sibling change key: the neighbouring door under the same master', () => {
    expect(mustNotTurnWhy({ role: 'must-not-turn', symbol: 'AA3', level: 'change', expect: 'none', why: { relation: 'sibling', ownMaster: 'AA', otherMaster: null } })).toMatch(/change key under the same master AA: the neighbouring door/);
  });
  test('the master of another area', () => {
    expect(mustNotTurnWhy({ role: 'must-not-turn', symbol: 'AB', level: 'master', expect: 'none', why: { relation: 'other-master', ownMaster: 'AA', otherMaster: 'AB' } })).toMatch(/master of another area AB.*under AA/);
  });
  test('nothing for keys that must turn, or a plan from before the reason existed', () => {
    expect(mustNotTurnWhy({ role: 'change', symbol: 'AA1', level: 'change', expect: 'turns' })).toBeNull();
    expect(mustNotTurnWhy({ role: 'must-not-turn', symbol: 'AA3', level: 'change', expect: 'none' })).toBeNull();
  });
});
