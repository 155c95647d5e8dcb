/**
 * Read-only questions the Bench screens ask of a session: what to show now, how far
 * along it is, and which parts of the Core view are in. Pure, so they are tested in node.
 */
import type { KeyCheckItem } from '@shared/schemas/packet';
import type { BenchSession } from './session';
import { capStep, type LoadingStep } from './steps';

export type PartStatus = 'done' | 'current' | 'pending';

/** The loading or capping step to show, or null during a Key check, a rebuild or when done. */
export function currentStep(s: BenchSession): LoadingStep | null {
  if (s.phase === 'capping') return capStep;
  return s.phase === 'loading' ? (s.plan[s.cursor] ?? null) : null;
}

export function currentCheck(s: BenchSession): KeyCheckItem | null {
  if (s.phase !== 'key-check-before-cap' && s.phase !== 'key-check-after-cap') return null;
  return s.checks[s.checkIndex] ?? null;
}

/** "Step k of n" while loading, "key k of n" during a Key check; null otherwise. */
export function progress(s: BenchSession): { k: number; n: number } | null {
  if (s.phase === 'loading') return { k: s.cursor + 1, n: s.plan.length };
  if (currentCheck(s)) return { k: s.checkIndex + 1, n: s.checks.length };
  return null;
}

export function canBack(s: BenchSession): boolean {
  return s.phase !== 'rebuild' && s.phase !== 'done' && s.trail.length > 0;
}

/**
 * Which parts are in: while a chamber is redone its parts count as out again (the
 * technician emptied it) while the other chambers stay in. Keys: step ids plus 'cap'.
 */
export function partStatus(s: BenchSession): Record<string, PartStatus> {
  // Springs are the last loading step: once in, every part of this attempt is in.
  const loaded = s.phase !== 'loading' && current(s).steps.some((step) => step.kind === 'springs');
  const capped = s.phase === 'key-check-after-cap' || (s.phase === 'done' && current(s).steps.some((step) => step.kind === 'cap'));
  const status: Record<string, PartStatus> = {};
  s.plan.forEach((step, i) => {
    let done = loaded || i < s.cursor;
    if (!loaded && s.redo) done = step.chamber === s.redo.chamber ? i < s.cursor : i < s.redo.resumeAt;
    status[step.id] = !loaded && i === s.cursor ? 'current' : done ? 'done' : 'pending';
  });
  status[capStep.id] = capped ? 'done' : s.phase === 'capping' ? 'current' : 'pending';
  return status;
}

const current = (s: BenchSession) => s.attempts[s.attempts.length - 1]!;
