import type { KeyingIssueCode } from './codes';
import { KeyingError } from './errors';
import { depthRange } from './limits';
import type { Profile } from './types';

export type BittingReading =
  | { ok: true; depths: number[] }
  | { ok: false; code: KeyingIssueCode; chamber?: number; message: string };

/*
 * Messages never repeat the whole bitting: they end up in logs and on screens, and a
 * bitting list is restricted material. They name the chamber and the offending cut only.
 */

/** Reads a bitting without throwing, for callers that collect problems (pinCore, the audit). */
export function readBitting(profile: Profile, text: string): BittingReading {
  const trimmed = typeof text === 'string' ? text.trim() : '';
  if (trimmed.length !== profile.chambers) {
    return {
      ok: false,
      code: 'bitting-length',
      message: `The bitting has ${trimmed.length} cut${trimmed.length === 1 ? '' : 's'}; ${profile.label} takes ${profile.chambers}, one digit per chamber, chamber 1 first.`,
    };
  }
  const depths = new Array<number>(trimmed.length);
  for (let i = 0; i < trimmed.length; i++) {
    const d = trimmed.charCodeAt(i) - 48;
    // One digit per chamber: a character outside the digits the depth range allows is no depth at all.
    if (d < depthRange.min || d > depthRange.max) {
      return {
        ok: false,
        code: 'bitting-not-digit',
        chamber: i + 1,
        message: `Chamber ${i + 1}: “${trimmed.charAt(i)}” is not a depth; type one digit per chamber and nothing else.`,
      };
    }
    if (d < profile.minDepth || d > profile.maxDepth) {
      return {
        ok: false,
        code: 'depth-out-of-range',
        chamber: i + 1,
        message: `Chamber ${i + 1}: depth ${d} is outside this profile’s depths ${profile.minDepth} to ${profile.maxDepth}; choose a cut within that range.`,
      };
    }
    depths[i] = d;
  }
  return { ok: true, depths };
}

/** Depths of a bitting, chamber 1 first. Throws KeyingError with a message a locksmith can act on. */
export function parseBitting(profile: Profile, text: string): number[] {
  const reading = readBitting(profile, text);
  if (!reading.ok) throw new KeyingError(reading.code, reading.message, reading.chamber);
  return reading.depths;
}

export function formatBitting(depths: readonly number[]): string {
  return depths.join('');
}
