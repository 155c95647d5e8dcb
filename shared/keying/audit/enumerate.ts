import type { AuditContext } from './context';
import type { BittingTable } from './bittingTable';

/**
 * Keys whose depth in every chamber i is one of the bits of masks[i], pushed onto `out`
 * (unsorted). When `count` (the product of the mask sizes: the core's openings count) is
 * small next to the number of keys, each such bitting is looked up among the keys, so the
 * cost does not grow with the system; otherwise every key is tested against the masks.
 */
export function keysMatching(ctx: AuditContext, masks: Int32Array, count: number, out: number[]): void {
  if (count <= Math.max(256, ctx.validKeys.length >>> 3)) {
    walk(masks, 0, 0, ctx.byBitting, out);
    return;
  }
  const chambers = masks.length;
  for (const k of ctx.validKeys) {
    const key = ctx.depths[k] as number[];
    let i = 0;
    while (i < chambers && ((masks[i] as number) >>> (key[i] as number)) & 1) i++;
    if (i === chambers) out.push(k);
  }
}

function walk(masks: Int32Array, i: number, code: number, table: BittingTable, out: number[]): void {
  const last = i === masks.length - 1;
  let mask = masks[i] as number;
  while (mask !== 0) {
    const low = mask & -mask;
    mask ^= low;
    const next = code * 10 + (31 - Math.clz32(low));
    if (last) {
      for (let k = table.first(next); k !== -1; k = table.next(k)) out.push(k);
    } else if (table.hasPrefix(i + 1, next)) {
      // No key starts with these cuts: nothing below this branch can match.
      walk(masks, i + 1, next, table, out);
    }
  }
}

/**
 * The list sorted ascending, in place: short lists by insertion (no comparator calls),
 * long ones through a typed array (numbers sort fastest there) copied back.
 */
export function ascending(list: number[]): number[] {
  const n = list.length;
  if (n < 2) return list;
  if (n <= 32) {
    for (let i = 1; i < n; i++) {
      const v = list[i] as number;
      let j = i - 1;
      while (j >= 0 && (list[j] as number) > v) {
        list[j + 1] = list[j] as number;
        j--;
      }
      list[j + 1] = v;
    }
    return list;
  }
  const sorted = Int32Array.from(list).sort();
  for (let i = 0; i < n; i++) list[i] = sorted[i] as number;
  return list;
}
