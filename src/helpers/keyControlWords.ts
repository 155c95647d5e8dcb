/** Key control's stored values in the office's words (holder status, copy status, how a key turns a core). */
import type { HolderStatus, IssueStatus } from '@shared/schemas/keyControl';
import type { ExposureHow } from '@shared/schemas/keyControlExposure';

export const HOLDER_STATUS_WORDS: Record<HolderStatus, string> = { active: 'Active', leaving: 'Leaving', left: 'Left' };
export const ISSUE_STATUS_WORDS: Record<IssueStatus, string> = { out: 'Out', returned: 'Returned', lost: 'Lost', stolen: 'Stolen', transferred: 'Passed on' };
export const REQUEST_STATUS_WORDS = { pending: 'Waiting for a decision', approved: 'Approved', refused: 'Declined' } as const;
export const CHASE_WORDS = { overdue: 'Past its due date', leaving: 'Holder leaving', left: 'Holder gone' } as const;

/**
 * How a key turns a door's core. `own` (when the door's key is known): the door's own change key,
 * else an intended key is a master above it; incidental keys turn it only through master wafers.
 */
export function howWords(how: ExposureHow, own?: boolean): string {
  if (how === 'control') return 'Removes the core (control key)';
  if (how === 'incidental') return 'Incidental: through master wafers';
  if (own === undefined) return 'Intended: one of its operating keys';
  return own ? 'Intended: the door’s own key' : 'Intended: a master above it';
}

/** A key copy as stamped: symbol and copy number, never its bitting. */
export const copyName = (symbol: string, copyNumber: number) => `${symbol} #${copyNumber}`;
