import { controlDepthMask } from '../keyOperates';
import type { AuditContext } from './context';

/*
 * Which keys release each core, without testing every key against every core. A core
 * releases for the bittings whose depth, in every chamber, meets a break at the control
 * line (keyOperates' own breaks, via controlDepthMask). With single-part build-ups that
 * is the control key alone; each two-wafer seam adds one depth in its chamber, so a
 * chamber releases for at most two depths and a core for at most 2^chambers bittings.
 * We list those bittings and look each up among the keys by bitting: cost per core is
 * its control openings count, not the number of keys.
 */
const enumerateUpTo = 4096;

export function keysReleasingIndexed(ctx: AuditContext): number[][] {
  const { profile, pinnings, keysByCode, validKeys, depths } = ctx;
  const chambers = profile.chambers;
  const masks = new Int32Array(chambers);
  return pinnings.map((pinning) => {
    if (pinning.chambers.length !== chambers || pinning.controlOpeningsCount === 0) return [];
    for (let i = 0; i < chambers; i++) masks[i] = controlDepthMask(pinning.chambers[i]!, profile);
    const out: number[] = [];
    if (pinning.controlOpeningsCount > enumerateUpTo) {
      // Never reached with a valid profile (at most 2^8 = 256); kept so the answer stays exact.
      for (const k of validKeys) {
        const key = depths[k] as number[];
        let all = true;
        for (let i = 0; i < chambers && all; i++) all = ((masks[i]! >>> key[i]!) & 1) === 1;
        if (all) out.push(k);
      }
      return out;
    }
    collect(masks, 0, 0, keysByCode, out);
    if (out.length > 1) out.sort((a, b) => a - b);
    return out;
  });
}

function collect(masks: Int32Array, i: number, code: number, byCode: Map<number, number[]>, out: number[]): void {
  if (i === masks.length) {
    const keys = byCode.get(code);
    if (keys) for (const k of keys) out.push(k);
    return;
  }
  let mask = masks[i]!;
  while (mask !== 0) {
    const low = mask & -mask;
    collect(masks, i + 1, code * 10 + (31 - Math.clz32(low)), byCode, out);
    mask ^= low;
  }
}
