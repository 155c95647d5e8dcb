import type { SystemAuditContext } from './context';
import type { BittingTable } from './bittingTable';

/**
 * A reusable list of key indexes in a typed array: the searches collect each core's keys
 * here and copy them out once, sorted, at their final size (no growing array per core).
 */
export class KeyList {
  buf = new Int32Array(256);
  length = 0;

  push(k: number): void {
    if (this.length === this.buf.length) {
      const bigger = new Int32Array(this.length * 2);
      bigger.set(this.buf);
      this.buf = bigger;
    }
    this.buf[this.length++] = k;
  }

  /** The keys ascending, as a new array; the list is then empty again. */
  takeAscending(): number[] {
    const n = this.length;
    const buf = this.buf;
    this.length = 0;
    if (n <= 32) {
      // Insertion sort: short lists, no comparator calls.
      for (let i = 1; i < n; i++) {
        const v = buf[i] as number;
        let j = i - 1;
        while (j >= 0 && (buf[j] as number) > v) {
          buf[j + 1] = buf[j] as number;
          j--;
        }
        buf[j + 1] = v;
      }
    } else {
      buf.subarray(0, n).sort();
    }
    const out: number[] = new Array<number>(n);
    for (let i = 0; i < n; i++) out[i] = buf[i] as number;
    return out;
  }
}

/**
 * Keys whose depth in every chamber i is one of the bits of masks[i], pushed onto `out`
 * (unsorted). When `count` (the product of the mask sizes: the core's openings count) is
 * small next to the number of keys, each such bitting is looked up among the keys, so the
 * cost does not grow with the system; otherwise every key is tested against the masks.
 */
export function keysMatching(ctx: SystemAuditContext, masks: Int32Array, count: number, out: KeyList): void {
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

function walk(masks: Int32Array, i: number, code: number, table: BittingTable, out: KeyList): void {
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
