import { describe, expect, test } from 'vitest';
import { builtInProfiles } from '../profiles';
import type { Profile } from '../types';
import { auditSystem } from './auditSystem';
import type { SystemAuditFinding, SystemAuditInput } from './types';

/*
 * Who turns a core against who is meant to, on systems of our own where the answer is
 * counted by hand (common practice: a key record and a core record that disagree are both
 * checked against the core as pinned). Eight rooms, each pinned for its change key and the
 * master A; X is cut like A and on no record; D is cut like AA1 and named only by its own
 * record for Room 101; F and G are named by their records for rooms not pinned for them.
 */
const sfic6 = builtInProfiles['sfic-6'] as Profile;
const rooms = [1, 2, 3, 4, 5, 6, 7, 8];
// Each change key differs from A in chambers 1 and 2 with its own pair of cuts, so no change key turns another room.
const pairs = ['02', '06', '20', '26', '28', '60', '62', '68'];
const change = (r: number): string => `${pairs[r - 1]!}4444`;

const system: SystemAuditInput = {
  control: '135791',
  keys: [
    { id: 'k-a', symbol: 'A', bitting: '444444', level: 'master', opens: rooms.map((r) => `C${r}`) },
    ...rooms.map((r) => ({ id: `k-aa${r}`, symbol: `AA${r}`, bitting: change(r), level: 'change' as const, opens: [`C${r}`] })),
    { id: 'k-x', symbol: 'X', bitting: '444444', level: 'change', opens: [] },
    { id: 'k-d', symbol: 'D', bitting: change(1), level: 'change', opens: ['C1'] },
    { id: 'k-f', symbol: 'F', bitting: '040404', level: 'change', opens: ['C2', 'C3'] },
    { id: 'k-g', symbol: 'G', bitting: '060606', level: 'change', opens: ['C4'] },
  ],
  cores: rooms.map((r) => ({ id: `C${r}`, label: `Room 10${r}`, operating: [`k-aa${r}`, 'k-a'] })),
};

// Audited inside each test (not once on import), so mutation testing counts every test that reads a finding.
const audit = (): SystemAuditFinding[] => auditSystem(sfic6, system);
const of = (code: SystemAuditFinding['code'], symbol: string) => audit().filter((f) => f.code === code && f.keys?.[0] === symbol);

describe('access findings counted by hand', () => {
  test('the key on no record that turns every room: one finding, the first five rooms named and how many more', () => {
    const [x] = of('unintended-access', 'X');
    expect(x).toMatchObject({ keys: ['X'], keyIds: ['k-x'], cores: rooms.map((r) => `C${r}`), data: { cores: 8 } });
    expect(x?.message).toBe('Key X turns 8 cores it is not meant to operate: Room 101, Room 102, Room 103, Room 104, Room 105 and 3 more.');
  });

  test('keys meant to turn a room and pinned for it raise nothing', () => {
    for (const symbol of ['A', ...rooms.map((r) => `AA${r}`)]) {
      expect(audit().filter((f) => f.keys?.[0] === symbol && ['unintended-access', 'intended-key-fails', 'records-disagree'].includes(f.code))).toEqual([]);
    }
  });

  test('a key named only by its own record, which turns the room anyway: the records disagree', () => {
    expect(of('records-disagree', 'D').map((f) => f.cores)).toEqual([['C1']]);
    expect(of('unintended-access', 'D')).toEqual([]);
    expect(of('intended-key-fails', 'D')).toEqual([]);
  });

  test('a key named by its record for rooms not pinned for it fails there: "it" for one room, "them" for two', () => {
    expect(of('intended-key-fails', 'G').map((f) => f.message)).toEqual(['Key G is meant to operate Room 104 but does not turn it: the core is not pinned for this key.']);
    expect(of('intended-key-fails', 'F').map((f) => f.message)).toEqual(['Key F is meant to operate Room 102 and Room 103 but does not turn them: the core is not pinned for this key.']);
    expect(of('intended-key-fails', 'F')[0]).toMatchObject({ cores: ['C2', 'C3'], data: { cores: 2 } });
    // G's pair comes after F's two in the list of failures: its count is its own.
    expect(of('intended-key-fails', 'G')[0]).toMatchObject({ cores: ['C4'], data: { cores: 1 } });
  });
});

describe('a large system: more (key, core) pairs than the first buffer holds', () => {
  test('1,100 rooms pinned for the master alone: its twin X turns all of them, named in room order', () => {
    const n = 1100;
    const big: SystemAuditInput = {
      control: '135791',
      keys: [
        { id: 'k-a', symbol: 'A', bitting: '444444', level: 'master', opens: [] },
        { id: 'k-x', symbol: 'X', bitting: '444444', level: 'change', opens: [] },
      ],
      cores: Array.from({ length: n }, (_, i) => ({ id: `C${i}`, operating: ['k-a'] })),
    };
    const all = auditSystem(sfic6, big);
    const x = all.find((f) => f.code === 'unintended-access' && f.keys?.[0] === 'X');
    expect(x?.data).toEqual({ cores: n });
    expect(x?.cores).toEqual(Array.from({ length: n }, (_, i) => `C${i}`));
    const a = all.find((f) => f.code === 'records-disagree' && f.keys?.[0] === 'A');
    expect(a?.cores).toHaveLength(n);
  });
});
