import { controlDepthMask } from '../keyOperates';
import type { SystemAuditContext } from './context';
import { KeyList, keysMatching } from './enumerate';

/*
 * Which keys release each core, without testing every key against every core. A core
 * releases for the bittings whose depth, in every chamber, meets a break at the control
 * line (keyOperates' own breaks, via controlDepthMask). With single-part build-ups that
 * is the control key alone; each two-wafer seam adds one depth in its chamber, so a
 * chamber releases for at most two depths and a core for at most 2^chambers bittings.
 * We list those bittings and look each up among the keys by bitting: cost per core is
 * its control openings count, not the number of keys.
 */
export function keysReleasingIndexed(ctx: SystemAuditContext): number[][] {
  const { profile, pinnings } = ctx;
  const masks = new Int32Array(profile.chambers);
  const scratch = new KeyList();
  return pinnings.map((pinning) => {
    // pinCore charts every chamber or none, and a core without a chart releases for nothing (count 0).
    if (pinning.controlOpeningsCount === 0) return [];
    for (let i = 0; i < profile.chambers; i++) masks[i] = controlDepthMask(pinning.chambers[i]!, profile);
    // Collected in one reused typed list, sorted there and copied once at its final size.
    keysMatching(ctx, masks, pinning.controlOpeningsCount, scratch);
    return scratch.takeAscending();
  });
}
