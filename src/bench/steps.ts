/**
 * The loading plan of one core: every part in the order the technician drops it in,
 * then the two checkpoints that close loading (level check, springs). Pure data so the
 * session can store it and the Core view can draw from it.
 */
import { chambersBackToFront, hasErrors } from '@shared/keying';
import type { ChamberPinning, CorePinning, Profile } from '@shared/keying';
import type { BenchStepKind } from '@shared/schemas/sync';

export type PartStepKind = Extract<BenchStepKind, 'bottom' | 'master' | 'buildUp' | 'top'>;

export interface LoadingStep {
  /** Stable within one plan: `c3-1-master`, `level-check`, `springs`, `cap`. */
  id: string;
  kind: BenchStepKind;
  chamber: number | null;
  size: number | null;
  partLabel: string;
  /** 0-based position of the part in its chamber, from the key up; null for checkpoints. */
  indexInChamber: number | null;
  /** Which of several parts of the same kind in this chamber (master wafer 2 of 2). */
  ofKind: { n: number; of: number } | null;
  /** Units filled in this chamber once this part is in; null for checkpoints. */
  stackHeightAfter: number | null;
}

export const partLabels: Record<BenchStepKind, string> = {
  bottom: 'Bottom pin',
  master: 'Master wafer',
  buildUp: 'Build-up wafer',
  top: 'Top pin',
  'level-check': 'Level check',
  springs: 'Springs',
  cap: 'Caps',
};

/** The capping step: a later phase, after the first key check. */
export const capStep: LoadingStep = {
  id: 'cap', kind: 'cap', chamber: null, size: null, partLabel: partLabels.cap,
  indexInChamber: null, ofKind: null, stackHeightAfter: null,
};

/** The chambers in loading order: back of the core first (common practice), whatever the numbering. */
export function loadingOrder(profile: Profile): number[] {
  return chambersBackToFront(profile);
}

/** Plain words for the step card, so the technician knows which end chamber 1 is. */
export function chamberOneWords(profile: Profile): string {
  return `chamber 1 is at the ${profile.chamberOneAt} of the core`;
}

/**
 * Why this pinning cannot be loaded, or null when it can. A chart with an error is
 * wrong by definition (shared/keying), so the Bench never walks anyone through it.
 */
export function benchBlocker(pinning: CorePinning, profile: Profile): string | null {
  if (hasErrors(pinning)) return 'The pinning chart of this core has an error: fix it in the key system before loading.';
  if (pinning.chambers.length !== profile.chambers) return `The chart lists ${pinning.chambers.length} chambers but the profile has ${profile.chambers}.`;
  return null;
}

function chamberSteps(ch: ChamberPinning): LoadingStep[] {
  const parts: Array<{ kind: PartStepKind; size: number }> = [
    { kind: 'bottom', size: ch.bottom },
    ...ch.masters.map((size) => ({ kind: 'master' as const, size })),
    ...ch.buildUp.map((size) => ({ kind: 'buildUp' as const, size })),
    { kind: 'top', size: ch.top },
  ];
  let height = 0;
  return parts.map((part, index) => {
    height += part.size;
    const same = parts.filter((p) => p.kind === part.kind);
    const n = parts.slice(0, index + 1).filter((p) => p.kind === part.kind).length;
    return {
      id: `c${ch.chamber}-${index}-${part.kind}`,
      kind: part.kind,
      chamber: ch.chamber,
      size: part.size,
      partLabel: partLabels[part.kind],
      indexInChamber: index,
      ofKind: same.length > 1 ? { n, of: same.length } : null,
      stackHeightAfter: height,
    };
  });
}

function checkpoint(kind: 'level-check' | 'springs'): LoadingStep {
  return { id: kind, kind, chamber: null, size: null, partLabel: partLabels[kind], indexInChamber: null, ofKind: null, stackHeightAfter: null };
}

/**
 * Every loading step of one core: each chamber fully, from the key up, before the next
 * (keying-primer bench procedure), then the level check and the springs.
 * Throws when benchBlocker() has a reason: callers check it first and show the reason.
 */
export function loadingSteps(pinning: CorePinning, profile: Profile): LoadingStep[] {
  const blocker = benchBlocker(pinning, profile);
  if (blocker) throw new Error(blocker);
  const byNumber = new Map(pinning.chambers.map((ch) => [ch.chamber, ch]));
  const parts = loadingOrder(profile).flatMap((n) => chamberSteps(byNumber.get(n) as ChamberPinning));
  return [...parts, checkpoint('level-check'), checkpoint('springs')];
}

/** The part name as shown: "Master wafer 2 of 2", "Build-up wafer 1 of 2", "Top pin". */
export function partName(step: LoadingStep): string {
  return step.ofKind ? `${step.partLabel} ${step.ofKind.n} of ${step.ofKind.of}` : step.partLabel;
}

/**
 * The small print under a part: the stack height (a size-0 part says it adds no height
 * instead of "0 units"), and for a two-wafer build-up which wafer goes first, by size.
 */
export function stepNotes(step: LoadingStep, plan: readonly LoadingStep[]): string[] {
  if (step.chamber === null || step.size === null) return [];
  const notes: string[] = [];
  if (step.size === 0) notes.push(`A size-0 ${step.partLabel.toLowerCase()} adds no height: put it in all the same.`);
  else notes.push(`Stack after this part: ${step.stackHeightAfter} units`);
  if (step.kind === 'buildUp' && step.ofKind?.of === 2) {
    const pair = plan.filter((s) => s.chamber === step.chamber && s.kind === 'buildUp');
    if (pair.length === 2) notes.push(`Two wafers make this build-up: stack the ${pair[0]!.size} first, then the ${pair[1]!.size} on top.`);
  }
  return notes;
}
