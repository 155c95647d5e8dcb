/**
 * Keys by bitting, for the audit's look-ups: a bitting is one number (chamber 1 the
 * highest digit), and an open-addressing table over typed arrays finds the keys cut to it
 * without allocating. Keys with one bitting are chained in ascending order. The table
 * also knows every leading part of every key's bitting (its first 1, 2, ... chambers), so
 * a search over many bittings can drop a branch no key starts with.
 */
export class BittingTable {
  /** Per key (system order): its bitting as a number, -1 when it cannot be read. */
  readonly codes: Int32Array;
  private readonly slots: Int32Array;
  private readonly chain: Int32Array;
  private readonly bits: number;
  /** Per prefix length 1..chambers-1: an open-addressing set of prefix codes (-1 empty). */
  private readonly prefixes: Int32Array[] = [];

  constructor(depths: readonly (readonly number[] | null)[], chambers: number) {
    const n = depths.length;
    this.codes = new Int32Array(n).fill(-1);
    this.chain = new Int32Array(n).fill(-1);
    let bits = 4;
    while (1 << bits < 2 * n) bits++;
    this.bits = bits;
    const size = 1 << bits;
    this.slots = new Int32Array(size).fill(-1);
    for (let l = 1; l < chambers; l++) this.prefixes.push(new Int32Array(size).fill(-1));
    const tail = new Int32Array(size).fill(-1);
    for (let k = 0; k < n; k++) {
      const d = depths[k];
      if (!d) continue;
      let code = 0;
      for (let i = 0; i < d.length; i++) {
        code = code * 10 + (d[i] as number);
        if (i + 1 < chambers) this.addPrefix(i, code);
      }
      this.codes[k] = code;
      const s = this.slotOf(code);
      if (this.slots[s] === -1) this.slots[s] = k;
      else this.chain[tail[s] as number] = k;
      tail[s] = k;
    }
  }

  private hash(code: number): number {
    return Math.imul(code, 0x9e3779b1) >>> (32 - this.bits);
  }

  private slotOf(code: number): number {
    const mask = (1 << this.bits) - 1;
    let s = this.hash(code);
    for (;;) {
      const k = this.slots[s] as number;
      if (k === -1 || this.codes[k] === code) return s;
      s = (s + 1) & mask;
    }
  }

  private addPrefix(level: number, code: number): void {
    const set = this.prefixes[level] as Int32Array;
    const mask = set.length - 1;
    let s = this.hash(code);
    while (set[s] !== -1 && set[s] !== code) s = (s + 1) & mask;
    set[s] = code;
  }

  /** True when some key's first `length` cuts read as `code` (length 1..chambers-1). */
  hasPrefix(length: number, code: number): boolean {
    const set = this.prefixes[length - 1] as Int32Array;
    const mask = set.length - 1;
    let s = this.hash(code);
    for (;;) {
      const v = set[s] as number;
      if (v === code) return true;
      if (v === -1) return false;
      s = (s + 1) & mask;
    }
  }

  /** The lowest key index cut to `code`, or -1; then `next(k)` until -1. */
  first(code: number): number {
    return this.slots[this.slotOf(code)] as number;
  }

  next(k: number): number {
    return this.chain[k] as number;
  }
}
