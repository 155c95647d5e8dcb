import type { AuditContext } from './context';

/**
 * Which keys turn each core, without testing every key against every core. For each
 * chamber and depth we keep a bitset over the keys cut to that depth there; a core's
 * keys are then, word by word, the AND over chambers of the OR over its operating
 * depths. A word stops as soon as it is empty, which in a real system is most of them
 * after a chamber or two. Cost: cores × words × (a few chambers), words = keys / 32.
 *
 * Plug breaks sit exactly at the operating depths (pinCore keeps a two-wafer seam above
 * every reachable depth), so depth membership is the same test keyOperates makes.
 */
export function keysTurningIndexed(ctx: AuditContext): number[][] {
  const { profile, validKeys, depths, pinnings } = ctx;
  const chambers = profile.chambers;
  const span = profile.maxDepth + 1;
  const words = (validKeys.length + 31) >>> 5;
  const bits = new Uint32Array(chambers * span * words);
  validKeys.forEach((k, slot) => {
    const key = depths[k] as number[];
    const word = slot >>> 5;
    const bit = 1 << (slot & 31);
    for (let i = 0; i < chambers; i++) {
      const at = (i * span + (key[i] as number)) * words + word;
      bits[at] = (bits[at] as number) | bit;
    }
  });

  // Row offsets per chamber for the core at hand, reused to avoid allocating per core.
  const rows: number[][] = Array.from({ length: chambers }, () => []);
  return pinnings.map((pinning) => {
    const out: number[] = [];
    if (pinning.chambers.length !== chambers) return out;
    for (let i = 0; i < chambers; i++) {
      const row = rows[i] as number[];
      row.length = 0;
      for (const d of (pinning.chambers[i] as { depths: number[] }).depths) row.push((i * span + d) * words);
    }
    for (let w = 0; w < words; w++) {
      let acc = 0xffffffff;
      for (let i = 0; i < chambers && acc !== 0; i++) {
        let any = 0;
        for (const base of rows[i] as number[]) any |= bits[base + w] as number;
        acc &= any;
      }
      while (acc !== 0) {
        const low = acc & -acc;
        out.push(validKeys[(w << 5) + 31 - Math.clz32(low)] as number);
        acc ^= low;
      }
    }
    return out;
  });
}
