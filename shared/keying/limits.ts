/**
 * The limits of a profile and of a bitting, written once. validateProfile checks a profile
 * against them (and the zod `Profile` of shared/schemas/profiles.ts is refined by
 * validateProfile), bitting text and progression requests are parsed with them, and the
 * codes' meanings quote them; nothing else writes these numbers.
 */

/** An inclusive range of whole numbers. */
export interface Range {
  readonly min: number;
  readonly max: number;
}

/** A core has 5 to 8 chambers; 6 and 7 are usual (common practice). */
export const chamberRange = { min: 5, max: 8 } as const satisfies Range;
/** A bitting is one digit per chamber, so depths lie within 0..9 (shallowest first in a profile). */
export const depthRange = { min: 0, max: 9 } as const satisfies Range;
/** The progression step: 1, or 2 to keep parity per position. */
export const stepRange = { min: 1, max: 2 } as const satisfies Range;
/**
 * Full stack height in depth units. The least a profile can work with is the deepest cut, the
 * sleeve and a top pin (validateProfile says how much); the range bounds what an admin may type.
 */
export const stackRange = { min: 5, max: 60 } as const satisfies Range;
/** Sleeve (control shear line above the operating one), in units; it must also be more than the depth span. */
export const sleeveRange = { min: 2, max: 30 } as const satisfies Range;
/** The thinnest wafer a profile trusts, in units. */
export const waferRange = { min: 1, max: 10 } as const satisfies Range;
/** Maximum adjacent cut; the depth span (9) or more means no limit. */
export const adjacentCutRange = { min: 1, max: 15 } as const satisfies Range;
/** One stocked part size, in units (bottom pins, wafers, top pins; also a Bench step's part). */
export const partSizeRange = { min: 0, max: 30 } as const satisfies Range;
/** How many sizes of one part a profile lists. */
export const stockedSizesRange = { min: 1, max: 40 } as const satisfies Range;

// Number.isInteger is false for anything that is not a number, so no typeof test is needed.
export const isWhole = (n: unknown): n is number => Number.isInteger(n);
/** A whole number within the range. */
export const within = (n: unknown, range: Range): boolean => isWhole(n) && n >= range.min && n <= range.max;
