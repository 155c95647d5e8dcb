import { describe, expect, test } from 'vitest';
import { next, recordKeyCheck, redoChamber, startSession } from './session';
import { deserialise, serialise, up } from './sessionData';
import { clock, packetCore, sfic6 } from './testing/fixtures';

// code-style.md: anything kept in IndexedDB carries `v` and an up() migration.
describe('stored Bench session', () => {
  test('a session mid-redo and mid-check survives a JSON round trip unchanged', () => {
    const now = clock();
    let s = startSession(packetCore(), sfic6, now());
    for (let i = 0; i < 6; i++) s = next(s, now());
    s = redoChamber(s, 1, now());
    s = next(s, now());
    const mid = s;
    expect(deserialise(serialise(mid))).toEqual(mid);
    for (let i = 0; i < 99; i++) s = next(s, now());
    s = recordKeyCheck(s, 'failed', now(), 'Would not turn');
    expect(up(JSON.parse(serialise(s)))).toEqual(s);
  });

  test('up refuses data without a version, from a newer app, or that does not check', () => {
    const s = startSession(packetCore(), sfic6, clock()());
    const { v: _v, ...noVersion } = s;
    expect(() => up(noVersion)).toThrow(/no version/);
    expect(() => up({ ...s, v: 2 })).toThrow(/newer version \(v2\)/);
    expect(() => up({ ...s, phase: 'polishing' })).toThrow();
    expect(() => up({ ...s, attempts: [] })).toThrow();
    expect(() => up(null)).toThrow(/no version/);
  });
});
