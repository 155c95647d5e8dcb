import type { AuditContext } from './context';
import { sortCloseGroups, type CloseGroup } from './finders';

/**
 * Change keys differing in at most one position, by hashing: two keys agree everywhere
 * but position p exactly when their bittings with p blanked out are equal. One pass per
 * position, keys × chambers in all, instead of comparing every pair.
 */
export function closeChangeKeysHashed(ctx: AuditContext): CloseGroup[] {
  const { profile, depths, validKeys, isChange } = ctx;
  const changeKeys = validKeys.filter((k) => isChange[k]);
  const groups: CloseGroup[] = [];
  for (let p = 0; p < profile.chambers; p++) {
    const buckets = new Map<number, { keys: number[]; depth: number; mixed: boolean }>();
    for (const k of changeKeys) {
      const key = depths[k] as number[];
      // The bitting as a base-11 number with position p set to 10, a digit no cut has.
      let id = 0;
      for (let i = 0; i < key.length; i++) id = id * 11 + (i === p ? 10 : (key[i] as number));
      const d = key[p] as number;
      const bucket = buckets.get(id);
      if (!bucket) buckets.set(id, { keys: [k], depth: d, mixed: false });
      else {
        bucket.keys.push(k);
        if (bucket.depth !== d) bucket.mixed = true;
      }
    }
    // A bucket of identical bittings is a duplicate, reported as such, not a close pair.
    for (const b of buckets.values()) if (b.mixed) groups.push({ position: p, keys: b.keys });
  }
  return sortCloseGroups(groups);
}
