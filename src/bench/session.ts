/**
 * One core's Bench session as a pure state machine. The state is plain JSON (no Dates,
 * no classes) so the offline layer can keep it after every step and a reload resumes
 * exactly where the technician stood. Every operation returns a new state; one that does
 * not apply in the current phase returns the same object, so a stray pedal press is harmless.
 *
 * loading → key-check-before-cap → capping → key-check-after-cap → done
 * A failed check closes the attempt (kept in `attempts`) and waits in 'rebuild' until
 * startRebuild() begins a new attempt at loading, or setAside() gives up.
 */
import type { Profile } from '@shared/keying';
import type { KeyCheckItem, PacketCore } from '@shared/schemas/packet';
import { BUILD_ATTEMPT_LIMIT, type BenchStep, type CompletionRecord, type KeyCheckResult } from '@shared/schemas/sync';
import { keyCheckOrder } from './keyCheck';
import { capStep, loadingSteps, type LoadingStep } from './steps';

export const BENCH_SESSION_VERSION = 1;
/** The record allows at most this many attempts (defined once in shared/schemas/sync.ts). */
export { BUILD_ATTEMPT_LIMIT };

export type BenchPhase = 'loading' | 'key-check-before-cap' | 'capping' | 'key-check-after-cap' | 'rebuild' | 'done';
export type Outcome = 'passed' | 'failed';

/** A chamber being loaded again; when its last part is in, loading carries on at `resumeAt`. */
export interface RedoState {
  chamber: number;
  resumeAt: number;
}

/** One undoable move of the current attempt, with what back() needs to restore. */
export type TrailEntry =
  | { t: 'step'; i: number; redo: RedoState | null }
  | { t: 'redo'; cursor: number; redo: RedoState | null }
  | { t: 'cap' }
  | { t: 'check' };

export interface SessionAttempt {
  n: number;
  startedAt: string;
  finishedAt: string | null;
  result: Outcome | null;
  steps: BenchStep[];
  keyChecks: KeyCheckResult[];
}

export interface BenchSession {
  v: typeof BENCH_SESSION_VERSION;
  coreId: string;
  plan: LoadingStep[];
  checks: KeyCheckItem[];
  phase: BenchPhase;
  /** Index into `plan` of the step shown while loading. */
  cursor: number;
  /** Index into `checks` of the key shown during a Key check. */
  checkIndex: number;
  redo: RedoState | null;
  trail: TrailEntry[];
  attempts: SessionAttempt[];
  startedAt: string;
  updatedAt: string;
  finishedAt: string | null;
  result: Outcome | null;
  notes: string | null;
}

const iso = (now: Date): string => now.toISOString();

function newAttempt(n: number, now: Date): SessionAttempt {
  return { n, startedAt: iso(now), finishedAt: null, result: null, steps: [], keyChecks: [] };
}

/** Starts a session; throws when the chart cannot be loaded (see benchBlocker). */
export function startSession(core: PacketCore, profile: Profile, now: Date): BenchSession {
  return {
    v: BENCH_SESSION_VERSION,
    coreId: core.id,
    plan: loadingSteps(core.pinning, profile),
    checks: keyCheckOrder(core.keyCheck),
    phase: 'loading',
    cursor: 0,
    checkIndex: 0,
    redo: null,
    trail: [],
    attempts: [newAttempt(1, now)],
    startedAt: iso(now),
    updatedAt: iso(now),
    finishedAt: null,
    result: null,
    notes: null,
  };
}

const current = (s: BenchSession): SessionAttempt => s.attempts[s.attempts.length - 1] as SessionAttempt;

function withAttempt(s: BenchSession, change: (a: SessionAttempt) => SessionAttempt): SessionAttempt[] {
  return [...s.attempts.slice(0, -1), change(current(s))];
}

function chamberRange(s: BenchSession, chamber: number): { first: number; last: number } | null {
  const first = s.plan.findIndex((step) => step.chamber === chamber);
  if (first < 0) return null;
  return { first, last: s.plan.findLastIndex((step) => step.chamber === chamber) };
}

function toRecordStep(step: LoadingStep, now: Date, redo: boolean): BenchStep {
  return { kind: step.kind, chamber: step.chamber, size: step.size, at: iso(now), ...(redo ? { redo: true } : {}) };
}

/** Done with the current step: the part is in, or the checkpoint is done. */
export function next(s: BenchSession, now: Date): BenchSession {
  if (s.phase === 'capping') {
    return {
      ...s, phase: 'key-check-after-cap', checkIndex: 0, updatedAt: iso(now),
      trail: [...s.trail, { t: 'cap' }],
      attempts: withAttempt(s, (a) => ({ ...a, steps: [...a.steps, toRecordStep(capStep, now, false)] })),
    };
  }
  if (s.phase !== 'loading') return s;
  const step = s.plan[s.cursor] as LoadingStep;
  let cursor = s.cursor + 1;
  let redo = s.redo;
  if (redo && cursor > (chamberRange(s, redo.chamber)?.last ?? -1)) {
    cursor = redo.resumeAt;
    redo = null;
  }
  const loaded = cursor >= s.plan.length;
  return {
    ...s, cursor, redo, updatedAt: iso(now),
    phase: loaded ? 'key-check-before-cap' : 'loading',
    checkIndex: 0,
    trail: [...s.trail, { t: 'step', i: s.cursor, redo: s.redo }],
    attempts: withAttempt(s, (a) => ({ ...a, steps: [...a.steps, toRecordStep(step, now, s.redo !== null)] })),
  };
}

/** Undo the last move of this attempt. A recorded failure or a finished core is never undone. */
export function back(s: BenchSession, now: Date): BenchSession {
  if (s.phase === 'rebuild' || s.phase === 'done') return s;
  const last = s.trail[s.trail.length - 1];
  if (!last) return s;
  const base = { ...s, trail: s.trail.slice(0, -1), updatedAt: iso(now) };
  switch (last.t) {
    case 'redo':
      return { ...base, cursor: last.cursor, redo: last.redo };
    case 'step':
      return {
        ...base, phase: 'loading', cursor: last.i, redo: last.redo, checkIndex: 0,
        attempts: withAttempt(s, (a) => ({ ...a, steps: a.steps.slice(0, -1) })),
      };
    case 'cap':
      return { ...base, phase: 'capping', attempts: withAttempt(s, (a) => ({ ...a, steps: a.steps.slice(0, -1) })) };
    case 'check': {
      const attempt = current(s);
      const undone = attempt.keyChecks[attempt.keyChecks.length - 1] as KeyCheckResult;
      const keyChecks = attempt.keyChecks.slice(0, -1);
      return {
        ...base,
        phase: undone.phase === 'before-cap' ? 'key-check-before-cap' : 'key-check-after-cap',
        checkIndex: keyChecks.filter((k) => k.phase === undone.phase).length,
        attempts: withAttempt(s, (a) => ({ ...a, keyChecks })),
      };
    }
  }
}

/** Chambers that redoChamber() accepts now: those with a part in, or the one being redone. */
export function redoableChambers(s: BenchSession): number[] {
  if (s.phase !== 'loading') return [];
  if (s.redo) return [s.redo.chamber];
  const started = s.plan.slice(0, s.cursor).map((step) => step.chamber);
  return [...new Set(started.filter((c): c is number => c !== null))];
}

/**
 * Empty a chamber and load it again from its bottom pin. The earlier steps stay in the
 * record; the new ones carry `redo: true`. Loading then carries on where it stood.
 */
export function redoChamber(s: BenchSession, chamber: number, now: Date): BenchSession {
  const range = chamberRange(s, chamber);
  if (!range || !redoableChambers(s).includes(chamber)) return s;
  const resumeAt = s.redo ? s.redo.resumeAt : Math.max(s.cursor, range.last + 1);
  return {
    ...s, cursor: range.first, redo: { chamber, resumeAt }, updatedAt: iso(now),
    trail: [...s.trail, { t: 'redo', cursor: s.cursor, redo: s.redo }],
  };
}

function close(a: SessionAttempt, result: Outcome, now: Date): SessionAttempt {
  return { ...a, finishedAt: iso(now), result };
}

/** The result of the key shown by currentCheck(). A failure needs a note from the technician. */
export function recordKeyCheck(s: BenchSession, result: Outcome, now: Date, note?: string): BenchSession {
  if (s.phase !== 'key-check-before-cap' && s.phase !== 'key-check-after-cap') return s;
  const item = s.checks[s.checkIndex];
  if (!item) return s;
  const phase = s.phase === 'key-check-before-cap' ? 'before-cap' : 'after-cap';
  const trimmed = note?.trim().slice(0, 500);
  const entry: KeyCheckResult = { phase, role: item.role, symbol: item.symbol, result, at: iso(now), ...(trimmed ? { note: trimmed } : {}) };
  const attempts = withAttempt(s, (a) => ({ ...a, keyChecks: [...a.keyChecks, entry] }));
  const base = { ...s, attempts, trail: [...s.trail, { t: 'check' as const }], updatedAt: iso(now) };
  if (result === 'failed') {
    return { ...base, phase: 'rebuild', attempts: [...attempts.slice(0, -1), close(attempts[attempts.length - 1]!, 'failed', now)] };
  }
  const checkIndex = s.checkIndex + 1;
  if (checkIndex < s.checks.length) return { ...base, checkIndex };
  if (phase === 'before-cap') return { ...base, phase: 'capping', checkIndex: 0 };
  return {
    ...base, phase: 'done', checkIndex, result: 'passed', finishedAt: iso(now),
    attempts: [...attempts.slice(0, -1), close(attempts[attempts.length - 1]!, 'passed', now)],
  };
}

export function canRebuild(s: BenchSession): boolean {
  return s.phase === 'rebuild' && s.attempts.length < BUILD_ATTEMPT_LIMIT;
}

/** After a failed check: empty the core and start a new attempt from the first part. */
export function startRebuild(s: BenchSession, now: Date): BenchSession {
  if (!canRebuild(s)) return s;
  return {
    ...s, phase: 'loading', cursor: 0, checkIndex: 0, redo: null, trail: [], updatedAt: iso(now),
    attempts: [...s.attempts, newAttempt(s.attempts.length + 1, now)],
  };
}

/** Give up on this core: it is recorded as failed, with the technician's reason. */
export function setAside(s: BenchSession, now: Date, note?: string): BenchSession {
  if (s.phase === 'done') return s;
  const open = current(s).finishedAt === null;
  const words = note?.trim().slice(0, 2000);
  return {
    ...s, phase: 'done', result: 'failed', finishedAt: iso(now), updatedAt: iso(now), redo: null,
    notes: words ? words : null,
    attempts: open ? withAttempt(s, (a) => close(a, 'failed', now)) : s.attempts,
  };
}

/**
 * The completion record for the outbox. The ids come from the caller: the client id is
 * made once per record (the idempotency key), so this function stays pure.
 */
export function finish(s: BenchSession, ids: { clientId: string; workOrderId: string }): CompletionRecord {
  if (s.phase !== 'done' || s.result === null || s.finishedAt === null) throw new Error('This core is not finished: finish the Key check or set it aside first.');
  return {
    clientId: ids.clientId,
    kind: 'completion',
    coreId: s.coreId,
    workOrderId: ids.workOrderId,
    startedAt: s.startedAt,
    finishedAt: s.finishedAt,
    result: s.result,
    attempts: s.attempts.map((a) => ({
      n: a.n, startedAt: a.startedAt, finishedAt: a.finishedAt ?? s.finishedAt!, result: a.result ?? 'failed', steps: a.steps, keyChecks: a.keyChecks,
    })),
    ...(s.notes ? { notes: s.notes } : {}),
  };
}
