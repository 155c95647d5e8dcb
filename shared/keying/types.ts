/**
 * The shapes the keying engine reads and returns. Plain data only (no classes, no Maps)
 * so a pinning computed on the tablet can be stored, synced and compared with the
 * server's copy byte for byte.
 */
import type { KeyingIssueCode } from './codes';

/** A pinning system definition: steps, stack, sleeve and the part sizes a shop stocks. */
export interface Profile {
  id: string;
  label: string;
  /** Within chamberRange (limits.ts); 6 and 7 are usual. */
  chambers: number;
  /** Depth range a key can be cut to; 0 and 9 for the usual SFIC profile. */
  minDepth: number;
  maxDepth: number;
  /** Height of every full stack, in depth units (23 for the usual SFIC profile). */
  stackUnits: number;
  /** The control shear line sits this many units above the operating one (10). */
  sleeveUnits: number;
  /** The thinnest wafer the profile trusts (2 with .0125 in steps). */
  minWaferUnits: number;
  /** Progression step: 2 keeps parity per position. */
  step: number;
  /** Maximum adjacent cut specification; 9 means no limit for depths 0..9. */
  maxAdjacentCut: number;
  /** Stocked sizes, in units. */
  bottomPins: number[];
  wafers: number[];
  topPins: number[];
  /** Which end of the core chamber 1 is (usual SFIC: back). */
  chamberOneAt: 'back' | 'front';
}

export type Severity = 'error' | 'warning';

export interface PinningIssue {
  code: KeyingIssueCode;
  severity: Severity;
  /** 1-based chamber the issue is about, when it is about one. */
  chamber?: number;
  /** 0-based index into `operating` when the issue is about one operating key. */
  key?: number;
  message: string;
}

/** One chamber's stack, listed from the key up. Sizes are in depth units. */
export interface ChamberPinning {
  chamber: number;
  /** Distinct operating depths, ascending. */
  depths: number[];
  bottom: number;
  /** Master wafers from the bottom pin up. */
  masters: number[];
  /** One wafer, two when no stocked size is big enough (lower one first), none when 0. */
  buildUp: number[];
  top: number;
  total: number;
}

export interface CorePinning {
  /** Empty when a bitting could not be read (see `issues`). */
  chambers: ChamberPinning[];
  /** How many bittings turn the plug: product of |depths| over chambers. */
  openingsCount: number;
  /**
   * How many bittings release the core (line up the control shear line in every
   * chamber), from the parts as loaded: 1 when only the control key does; more when a
   * two-wafer seam meets the control line of another depth. 0 without chambers.
   */
  controlOpeningsCount: number;
  issues: PinningIssue[];
}

export interface CoreKeys {
  /** Every key that must turn the plug; duplicates are harmless. */
  operating: string[];
  control: string;
  /**
   * The top master, for the control-key advice. When left out, the last operating key
   * is taken as the top master (list keys from the change key up).
   */
  topMaster?: string;
  /** Key symbols parallel to `operating`, so messages name "Key AA1" and not a list position. */
  symbols?: readonly (string | undefined)[];
}
