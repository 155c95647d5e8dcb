import type { SystemAuditContext } from './context';

/** Change keys that all agree except in one position (they differ in fewer than 2). */
export interface CloseGroup {
  /** 0-based position they differ in. */
  position: number;
  /** Key indexes, ascending; at least two distinct bittings among them. */
  keys: number[];
}

/**
 * The two searches that decide the audit's cost. The indexed audit and the all-pairs
 * baseline plug in different ones and must return the same, in the same order:
 * `keysTurning` and `keysReleasing` ascending key indexes per core (the keys that turn
 * the plug; the keys that line up the control shear line); `closeChangeKeys` sorted by
 * (first key, position).
 */
export interface SystemAuditFinders {
  keysTurning(ctx: SystemAuditContext): number[][];
  keysReleasing(ctx: SystemAuditContext): number[][];
  closeChangeKeys(ctx: SystemAuditContext): CloseGroup[];
}

export function sortCloseGroups(groups: CloseGroup[]): CloseGroup[] {
  return groups.sort((a, b) => (a.keys[0] as number) - (b.keys[0] as number) || a.position - b.position);
}
