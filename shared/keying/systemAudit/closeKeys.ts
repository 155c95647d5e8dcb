import type { SystemAuditContext } from './context';
import type { CloseGroup } from './finders';

/**
 * Change keys differing in at most one position, by hashing: two keys agree everywhere
 * but position p exactly when their bittings with p's digit zeroed are equal. One pass per
 * position over the change keys, into an open-addressing table of typed arrays (no object
 * per key), instead of comparing every pair.
 */
export function closeChangeKeysHashed(ctx: SystemAuditContext): CloseGroup[] {
  const { profile, depths, validKeys, isChange, byBitting } = ctx;
  const changeKeys = validKeys.filter((k) => isChange[k]);
  const n = changeKeys.length;
  const groups: CloseGroup[] = [];
  if (n < 2) return groups;
  let bits = 4;
  while (1 << bits < 2 * n) bits++;
  const size = 1 << bits;
  const mask = size - 1;
  const slotCode = new Int32Array(size);
  const slotHead = new Int32Array(size);
  const slotTail = new Int32Array(size);
  const slotMixed = new Uint8Array(size);
  const P = profile.chambers;
  // Per position, each key's successor in its bucket; and which key heads a bucket of
  // differing bittings there. Kept for every position so the groups come out already in
  // (first key, position) order, without sorting them.
  const next = new Int32Array(n * P);
  const heads = new Uint8Array(n * P);
  const used: number[] = [];
  for (let p = 0, pow = 10 ** (P - 1); p < P; p++, pow /= 10) {
    slotHead.fill(-1);
    used.length = 0;
    const base = p * n;
    for (let j = 0; j < n; j++) {
      const k = changeKeys[j] as number;
      const d = (depths[k] as number[])[p] as number;
      const code = (byBitting.codes[k] as number) - d * pow;
      let s = Math.imul(code, 0x9e3779b1) >>> (32 - bits);
      while (slotHead[s] !== -1 && slotCode[s] !== code) s = (s + 1) & mask;
      next[base + j] = -1;
      if (slotHead[s] === -1) {
        slotCode[s] = code;
        slotHead[s] = j;
        slotMixed[s] = 0;
        used.push(s);
      } else {
        const first = changeKeys[slotHead[s] as number] as number;
        if ((depths[first] as number[])[p] !== d) slotMixed[s] = 1;
        next[base + (slotTail[s] as number)] = j;
      }
      slotTail[s] = j;
    }
    // A bucket of identical bittings is a duplicate, reported as such, not a close pair.
    for (const s of used) if (slotMixed[s]) heads[(slotHead[s] as number) * P + p] = 1;
  }
  // Change keys are ascending, so walking heads by key then position gives the order
  // sortCloseGroups would.
  for (let j = 0; j < n; j++) {
    for (let p = 0; p < P; p++) {
      if (!heads[j * P + p]) continue;
      const keys: number[] = [];
      for (let i = j; i !== -1; i = next[p * n + i] as number) keys.push(changeKeys[i] as number);
      groups.push({ position: p, keys });
    }
  }
  return groups;
}
