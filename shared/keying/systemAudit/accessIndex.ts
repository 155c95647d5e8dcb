import type { SystemAuditContext } from './context';
import { KeyList, keysMatching } from './enumerate';

/**
 * Which keys turn each core, without testing every key against every core. A core turns
 * for the bittings whose depth in every chamber is one of its operating depths (plug
 * breaks sit exactly there: pinCore keeps a two-wafer seam above every reachable depth,
 * so this is the test keyOperates makes). There are `openingsCount` of them, usually a
 * few dozen; each is looked up among the keys by bitting, so a core costs its openings
 * count whatever the size of the system. A core accepting very many bittings is tested
 * key by key instead (see keysMatching).
 */
export function keysTurningIndexed(ctx: SystemAuditContext): number[][] {
  const { profile, pinnings } = ctx;
  const chambers = profile.chambers;
  const masks = new Int32Array(chambers);
  const scratch = new KeyList();
  return pinnings.map((pinning) => {
    if (pinning.chambers.length !== chambers) return [];
    for (let i = 0; i < chambers; i++) {
      let mask = 0;
      for (const d of (pinning.chambers[i] as { depths: number[] }).depths) mask |= 1 << d;
      masks[i] = mask;
    }
    // Collected in one reused typed list, sorted there and copied once at its final size.
    keysMatching(ctx, masks, pinning.openingsCount, scratch);
    return scratch.takeAscending();
  });
}
