/**
 * Per-part pin sizes rebuild a core's bittings (the control key and every operating depth), so
 * completions keep them sealed like bittings (reliability.md T9): the attempts JSON stores each
 * step with `size: null`, and the sizes, attempt by attempt and step by step, sit in
 * pin_sizes_enc under AES-256-GCM with the completion id as additional data.
 */
import type { Attempt } from '../../shared/schemas/sync';
import type { Sealer } from './secrets';

export const pinSizesContext = (completionId: string) => `completion-pin-sizes:${completionId}`;

type Sizes = (number | null)[][];

/** The attempts as stored in plain (no sizes) and the sealed sizes, or null when no step has a size. */
export function sealPinSizes(sealer: Sealer, completionId: string, attempts: Attempt[]): { attempts: Attempt[]; sealed: string | null } {
  const sizes: Sizes = attempts.map((a) => a.steps.map((s) => s.size));
  const stripped = attempts.map((a) => ({ ...a, steps: a.steps.map((s) => ({ ...s, size: null })) }));
  const any = sizes.some((a) => a.some((s) => s !== null));
  return { attempts: stripped, sealed: any ? sealer.seal(JSON.stringify(sizes), pinSizesContext(completionId)) : null };
}

/** The attempts with their sizes put back; only for a reveal that is audited. */
export function openPinSizes<A extends { steps: { size: number | null }[] }>(sealer: Sealer, completionId: string, attempts: A[], sealed: string | null): A[] {
  if (!sealed) return attempts;
  const sizes = JSON.parse(sealer.open(sealed, pinSizesContext(completionId))) as Sizes;
  return attempts.map((a, i) => ({ ...a, steps: a.steps.map((s, j) => ({ ...s, size: sizes[i]?.[j] ?? null })) }));
}
