import type { SystemAuditFindingCode } from '../codes';

/** Where a key sits in the hierarchy, top down. */
export type KeyLevel = 'great-grand-master' | 'grand-master' | 'master' | 'change';

export interface SystemAuditKey {
  id: string;
  /** The key symbol stamped on the key (user-typed; never used to derive a bitting). */
  symbol: string;
  bitting: string;
  /**
   * When left out, a key meant to operate at most one core counts as a change key and
   * any other as a master; set it when the system has keyed-alike change keys.
   */
  level?: KeyLevel;
  /** Ids of the cores this key is meant to operate. */
  opens: string[];
}

export interface SystemAuditCore {
  id: string;
  /** Door or core name shown in messages; the id is used when left out. */
  label?: string;
  /** Ids of the keys the core is pinned for (its change key, masters, cross-keyed keys). */
  operating: string[];
}

export interface SystemAuditInput {
  keys: SystemAuditKey[];
  cores: SystemAuditCore[];
  control: string;
  /** Id of the top master; when left out, the highest-level key meant to operate the most cores. */
  topMaster?: string;
  /** Cores accepting more bittings than this are reported (default defaultOpeningsThreshold). */
  openingsThreshold?: number;
}

export type FindingSeverity = 'error' | 'warning' | 'info';

export interface SystemAuditFinding {
  code: SystemAuditFindingCode;
  severity: FindingSeverity;
  message: string;
  /** What to change, in shop words. */
  advice: string;
  /** Key symbols, in system order. */
  keys?: string[];
  /** Key ids, parallel to `keys` (symbols need not be unique). */
  keyIds?: string[];
  /** Core ids, in system order. */
  cores?: string[];
  chambers?: number[];
  /** Figures behind the message, for reports. */
  data?: Record<string, number>;
  /** One line per item a summary counts (shown behind a disclosure); never a bitting. */
  details?: string[];
}
