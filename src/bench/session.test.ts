import { describe, expect, test } from 'vitest';
import { CompletionRecord } from '@shared/schemas/sync';
import { back, finish, next, recordKeyCheck, redoChamber, redoableChambers, setAside, startRebuild, startSession, type BenchSession } from './session';
import { canBack, currentCheck, currentStep, partStatus, progress } from './sessionView';
import { clock, packetCore, sfic6 } from './testing/fixtures';

const ids = { clientId: '7d1f3a52-8b4e-4f6a-9c0d-1e2f3a4b5c6d', workOrderId: '2a3b4c5d-6e7f-4a8b-9c0d-e1f2a3b4c5d6' };

function nextTimes(s: BenchSession, n: number, now: () => Date): BenchSession {
  for (let i = 0; i < n; i++) s = next(s, now());
  return s;
}
function passAll(s: BenchSession, now: () => Date): BenchSession {
  while (currentCheck(s)) s = recordKeyCheck(s, 'passed', now());
  return s;
}
/** Loading done, both Key checks passed and capped: the keying-primer bench procedure, steps 2 to 5. */
function buildCore(s: BenchSession, now: () => Date): BenchSession {
  s = nextTimes(s, s.plan.length, now);
  s = passAll(s, now);
  s = next(s, now());
  return passAll(s, now);
}

describe('Bench session: loading', () => {
  // keying-primer bench procedure: each part in order, then the Key check.
  test('next walks the plan and then starts the Key check before capping', () => {
    const now = clock();
    let s = startSession(packetCore(), sfic6, now());
    expect(currentStep(s)?.id).toBe(s.plan[0]?.id);
    expect(progress(s)).toEqual({ k: 1, n: s.plan.length });
    s = nextTimes(s, s.plan.length - 1, now);
    expect(currentStep(s)?.kind).toBe('springs');
    s = next(s, now());
    expect(s.phase).toBe('key-check-before-cap');
    expect(s.attempts[0]?.steps).toHaveLength(s.plan.length);
    expect(s.attempts[0]?.steps.map((x) => x.kind)).toEqual(s.plan.map((x) => x.kind));
  });

  // Common practice (undo): back removes exactly the last move and nothing else.
  test('back undoes the last step, and back at the start does nothing', () => {
    const now = clock();
    const start = startSession(packetCore(), sfic6, now());
    expect(canBack(start)).toBe(false);
    expect(back(start, now())).toBe(start);
    const two = nextTimes(start, 2, now);
    const one = back(two, now());
    expect(one.cursor).toBe(1);
    expect(one.attempts[0]?.steps).toHaveLength(1);
    expect(partStatus(one)[one.plan[1]!.id]).toBe('current');
  });

  // BenchStep.redo in shared/schemas/sync.ts: the earlier steps stay in the record.
  test('redo a chamber from the level check: its parts again with redo marks, then back to the level check', () => {
    const now = clock();
    let s = startSession(packetCore(), sfic6, now());
    const levelAt = s.plan.findIndex((x) => x.kind === 'level-check');
    s = nextTimes(s, levelAt, now);
    expect(redoableChambers(s)).toEqual([1, 2, 3, 4, 5, 6]);
    s = redoChamber(s, 2, now());
    const chamber2 = s.plan.filter((x) => x.chamber === 2);
    expect(currentStep(s)?.id).toBe(chamber2[0]?.id);
    // While chamber 2 is emptied, its parts are out again and the others stay in.
    expect(partStatus(s)[chamber2.at(-1)!.id]).toBe('pending');
    expect(partStatus(s)[s.plan[0]!.id]).toBe('done');
    expect(redoableChambers(s)).toEqual([2]);
    expect(redoChamber(s, 4, now())).toBe(s);
    s = nextTimes(s, chamber2.length, now);
    expect(currentStep(s)?.kind).toBe('level-check');
    const steps = s.attempts[0]!.steps;
    expect(steps).toHaveLength(levelAt + chamber2.length);
    expect(steps.slice(levelAt).every((x) => x.redo === true && x.chamber === 2)).toBe(true);
    expect(steps.slice(0, levelAt).some((x) => x.redo)).toBe(false);
  });

  // Common practice (undo): back across a redo restores where the technician stood.
  test('back right after redo cancels it; back inside a redo steps back inside the chamber', () => {
    const now = clock();
    let s = nextTimes(startSession(packetCore(), sfic6, now()), 10, now);
    const before = s;
    s = redoChamber(s, 1, now());
    expect(back(s, now()).cursor).toBe(before.cursor);
    expect(back(s, now()).redo).toBeNull();
    s = nextTimes(s, 2, now);
    const undone = back(s, now());
    expect(undone.cursor).toBe(1);
    expect(undone.redo?.chamber).toBe(1);
    expect(undone.attempts[0]!.steps).toHaveLength(11);
  });

  test('a chamber not yet started cannot be redone', () => {
    const now = clock();
    const s = nextTimes(startSession(packetCore(), sfic6, now()), 2, now);
    expect(redoChamber(s, 5, now())).toBe(s);
    expect(redoChamber(s, 9, now())).toBe(s);
  });
});

describe('Bench session: Key check, capping, finish', () => {
  // keying-primer bench procedure step 4: change key and each master turn, the control
  // key turns about 15 degrees, a key that must not work does not.
  test('keys come in order: change, masters lowest first, control, must-not-turn', () => {
    const s = startSession(packetCore(), sfic6, clock()());
    expect(s.checks.map((c) => c.symbol)).toEqual(['AA1', 'AA', 'A', 'CONTROL', 'AB3']);
  });

  // keying-primer bench procedure steps 4-6; record shape from shared/schemas/sync.ts.
  test('a clean build: checked, capped, checked again, and a record that parses', () => {
    const now = clock();
    let s = startSession(packetCore(), sfic6, now());
    s = nextTimes(s, s.plan.length, now);
    s = passAll(s, now);
    expect(s.phase).toBe('capping');
    expect(currentStep(s)?.kind).toBe('cap');
    s = next(s, now());
    expect(s.phase).toBe('key-check-after-cap');
    expect(partStatus(s).cap).toBe('done');
    s = passAll(s, now);
    expect(s.phase).toBe('done');
    const record = CompletionRecord.parse(finish(s, ids));
    expect(record.result).toBe('passed');
    expect(record.attempts).toHaveLength(1);
    expect(record.attempts[0]?.keyChecks.map((k) => k.phase)).toEqual([...Array(5).fill('before-cap'), ...Array(5).fill('after-cap')]);
    expect(record.attempts[0]?.steps.at(-1)?.kind).toBe('cap');
    expect(record.finishedAt > record.startedAt).toBe(true);
  });

  // keying-primer cautions: a failed test is recorded, not hidden.
  test('a failed check keeps the first attempt and a rebuild makes a second', () => {
    const now = clock();
    let s = nextTimes(startSession(packetCore(), sfic6, now()), 999, now);
    s = recordKeyCheck(s, 'passed', now());
    s = recordKeyCheck(s, 'failed', now(), 'Turned but stiff');
    expect(s.phase).toBe('rebuild');
    expect(back(s, now())).toBe(s);
    expect(next(s, now())).toBe(s);
    s = startRebuild(s, now());
    expect(s.phase).toBe('loading');
    expect(s.cursor).toBe(0);
    expect(s.attempts).toHaveLength(2);
    s = buildCore(s, now);
    const record = CompletionRecord.parse(finish(s, ids));
    expect(record.result).toBe('passed');
    expect(record.attempts.map((a) => [a.n, a.result])).toEqual([[1, 'failed'], [2, 'passed']]);
    expect(record.attempts[0]?.keyChecks.at(-1)).toMatchObject({ symbol: 'AA', result: 'failed', note: 'Turned but stiff' });
    expect(record.attempts[1]!.startedAt >= record.attempts[0]!.finishedAt).toBe(true);
  });

  // keys.ts: a Key check result is a judgement, so the pedal's "next" never records one.
  test('next during a Key check changes nothing', () => {
    const now = clock();
    const s = nextTimes(startSession(packetCore(), sfic6, now()), 999, now);
    expect(s.phase).toBe('key-check-before-cap');
    expect(next(s, now())).toBe(s);
    expect(s.attempts[0]?.keyChecks).toEqual([]);
  });

  test('back during a Key check undoes the last result, then returns to the springs', () => {
    const now = clock();
    let s = nextTimes(startSession(packetCore(), sfic6, now()), 999, now);
    s = recordKeyCheck(s, 'passed', now());
    s = back(s, now());
    expect(s.checkIndex).toBe(0);
    expect(s.attempts[0]?.keyChecks).toEqual([]);
    s = back(s, now());
    expect(s.phase).toBe('loading');
    expect(currentStep(s)?.kind).toBe('springs');
  });

  // shared/schemas/sync.ts CompletionRecord: failed means set aside for a rebuild.
  test('set aside: the record says failed and keeps the reason', () => {
    const now = clock();
    let s = nextTimes(startSession(packetCore(), sfic6, now()), 3, now);
    s = setAside(s, now(), 'Plug scored, core goes back to stock');
    expect(next(s, now())).toBe(s);
    const record = CompletionRecord.parse(finish(s, ids));
    expect(record).toMatchObject({ result: 'failed', notes: 'Plug scored, core goes back to stock' });
    expect(record.attempts[0]).toMatchObject({ result: 'failed' });
    expect(record.attempts[0]?.steps).toHaveLength(3);
  });

  test('finish refuses a core that is not done', () => {
    const s = startSession(packetCore(), sfic6, clock()());
    expect(() => finish(s, ids)).toThrow(/not finished/);
  });
});
