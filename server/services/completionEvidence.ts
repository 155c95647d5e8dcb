/**
 * What a "passed" completion must show before the server lands it as passed (reliability.md
 * T3): the LAST attempt loaded every part of the core's chart, and every key of the key-check
 * plan passed before capping and again after capping (each operating key turns, the control key
 * releases, the must-not-turn key does not turn). The chart and the keys come from the server,
 * never from the record. Pure: the caller loads the plan.
 */
import type { CorePinning } from '../../shared/keying';
import type { CompletionRecord, KeyCheckResult } from '../../shared/schemas/sync';

export interface EvidencePlan {
  pinning: CorePinning;
  /** Symbols of the keys that must turn this core. */
  turns: string[];
  /** Symbols of the system's keys the engine says do not turn this core; null when the plan has no must-not-turn key. */
  mustNotTurn: Set<string> | null;
  /** How many different must-not-turn keys the plan names (workOrders.mustNotTurnKeys): each must be tried. */
  mustNotTurnCount: number;
}

const partWords = { bottom: 'bottom pin', master: 'master wafer', buildUp: 'build-up wafer', top: 'top pin' } as const;
const phaseWords = { 'before-cap': 'before capping', 'after-cap': 'after capping' } as const;

/** What is missing for the record to count as passed, in words; empty when it stands. */
export function missingForPassed(record: CompletionRecord, plan: EvidencePlan): string[] {
  const last = record.attempts[record.attempts.length - 1]!;
  const missing: string[] = [];
  if (last.result !== 'passed') missing.push(`attempt ${last.n}, the last one, is marked failed`);

  // Every part of the chart, by kind, chamber and size (a redone chamber only adds steps).
  const have = new Map<string, number>();
  for (const s of last.steps) if (s.chamber !== null && s.size !== null) have.set(`${s.kind}|${s.chamber}|${s.size}`, (have.get(`${s.kind}|${s.chamber}|${s.size}`) ?? 0) + 1);
  const parts: string[] = [];
  for (const ch of plan.pinning.chambers) {
    const want: [keyof typeof partWords, number][] = [['bottom', ch.bottom], ...ch.masters.map((m) => ['master', m] as [keyof typeof partWords, number]), ...ch.buildUp.map((b) => ['buildUp', b] as [keyof typeof partWords, number]), ['top', ch.top]];
    for (const [kind, size] of want) {
      const k = `${kind}|${ch.chamber}|${size}`;
      const n = have.get(k) ?? 0;
      if (n > 0) have.set(k, n - 1);
      else parts.push(`chamber ${ch.chamber} ${partWords[kind]}`);
    }
  }
  if (parts.length) missing.push(`${parts.length} part${parts.length === 1 ? '' : 's'} of the chart not loaded (${parts.slice(0, 3).join(', ')}${parts.length > 3 ? ', ...' : ''})`);

  const failed = last.keyChecks.filter((k) => k.result === 'failed');
  if (failed.length) missing.push(`a failed key check in the last attempt (${failed.map((k) => `${k.symbol} ${phaseWords[k.phase]}`).join(', ')})`);
  const passed = (phase: KeyCheckResult['phase'], test: (k: KeyCheckResult) => boolean) => last.keyChecks.some((k) => k.phase === phase && k.result === 'passed' && test(k));
  for (const phase of ['before-cap', 'after-cap'] as const) {
    const keys = plan.turns.filter((sym) => !passed(phase, (k) => k.symbol === sym && k.role !== 'control' && k.role !== 'must-not-turn'));
    if (keys.length) missing.push(`key ${keys.join(', ')} turning ${phaseWords[phase]}`);
    if (!passed(phase, (k) => k.role === 'control')) missing.push(`the control key releasing ${phaseWords[phase]}`);
    const outsiders = plan.mustNotTurn;
    if (outsiders) {
      const tried = new Set(last.keyChecks.filter((k) => k.phase === phase && k.result === 'passed' && k.role === 'must-not-turn' && outsiders.has(k.symbol)).map((k) => k.symbol));
      const want = Math.max(1, plan.mustNotTurnCount);
      if (tried.size < want) missing.push(`${want === 1 ? 'a key' : `${want - tried.size} of the ${want} keys`} that must not turn, tried ${phaseWords[phase]}`);
    }
  }
  return missing;
}
