import { describe, expect, it } from 'vitest';
import { nextCoreToBuild, type BuildState } from './nextCore';

// common practice: a batch is built in work-order order; anything skipped is picked up at the end
describe('the next core to build', () => {
  const ids = ['a', 'b', 'c', 'd'];
  const states = (m: Record<string, BuildState>) => (id: string) => m[id] ?? 'not-started';

  it('is the next unbuilt core after this one', () => {
    expect(nextCoreToBuild(ids, 'a', states({ a: 'finished' }))).toBe('b');
  });
  it('skips built, installed and set-aside cores', () => {
    expect(nextCoreToBuild(ids, 'a', states({ a: 'finished', b: 'installed', c: 'set-aside' }))).toBe('d');
  });
  it('wraps round to a core skipped earlier, half-built or waiting for a rebuild', () => {
    expect(nextCoreToBuild(ids, 'c', states({ a: 'rebuild', b: 'finished', c: 'finished', d: 'finished' }))).toBe('a');
    expect(nextCoreToBuild(ids, 'd', states({ a: 'finished', b: 'in-progress', c: 'finished', d: 'finished' }))).toBe('b');
  });
  it('is null when every core is built', () => {
    expect(nextCoreToBuild(ids, 'b', () => 'finished')).toBeNull();
  });
});
