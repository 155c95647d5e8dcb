import type { KeyingIssueCode } from './codes';
import type { CorePinning } from './types';

/** Thrown by the functions that cannot return a partial answer (parseBitting, progressKeys). */
export class KeyingError extends Error {
  override readonly name = 'KeyingError';
  readonly code: KeyingIssueCode;
  readonly chamber?: number;

  constructor(code: KeyingIssueCode, message: string, chamber?: number) {
    super(message);
    this.code = code;
    if (chamber !== undefined) this.chamber = chamber;
  }
}

/** A pinning with any error must not be loaded: its chart is wrong or incomplete. */
export function hasErrors(pinning: Pick<CorePinning, 'issues'>): boolean {
  return pinning.issues.some((issue) => issue.severity === 'error');
}
