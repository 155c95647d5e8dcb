import { progressionDepths } from '../rules';
import type { SystemAuditContext } from './context';
import { finding, keyRefs, plural, type Ranked } from './format';

/**
 * Rights amplification (M. Blaze, "Rights Amplification in Master-Keyed Mechanical
 * Locks", IEEE Security & Privacy, 2003): someone with one change key and one core it
 * turns can find the top master one position at a time, trying each other depth the
 * position may take on a test key. A position is mastered when some change key's depth
 * there differs from the top master's. With two-step progression only same-parity depths
 * are candidates, so each mastered position costs at most (candidates − 1) test cuts.
 */
export function exposureFinding(ctx: SystemAuditContext): Ranked | null {
  if (ctx.topMaster < 0) return null;
  const { profile, depths } = ctx;
  const top = depths[ctx.topMaster] as number[];
  const mastered = new Array<boolean>(profile.chambers).fill(false);
  for (const k of ctx.validKeys) {
    if (!ctx.isChange[k]) continue;
    const key = depths[k] as number[];
    for (let i = 0; i < profile.chambers; i++) if (key[i] !== top[i]) mastered[i] = true;
  }
  let positionsMastered = 0;
  let testCuts = 0;
  let testCutsAllPositions = 0;
  for (let i = 0; i < profile.chambers; i++) {
    const others = progressionDepths(profile, top[i] as number).length;
    testCutsAllPositions += others;
    if (mastered[i]) {
      positionsMastered++;
      testCuts += others;
    }
  }
  const refs = keyRefs(ctx, [ctx.topMaster]);
  return finding('rights-amplification', 0, {
    message: `Top master ${refs.keys[0] ?? ''}: ${positionsMastered} of ${profile.chambers} positions are mastered. With one change key and a core it turns, the top master can be found one position at a time with at most ${plural(testCuts, 'test cut')} in the mastered positions (${plural(testCutsAllPositions, 'test cut')} when every position is tried, as the holder does not know which are mastered).`,
    // Common practice: the attack works on any conventionally master-keyed core, so the
    // advice is about limiting who can cut test keys and where the top master reaches.
    advice: 'Any conventionally master-keyed core allows this; the figure shows how little it takes. Keep key blanks under key control (no spare blanks on site), and keep the top master off cores in less trusted areas by pinning them for a lower master.',
    ...refs,
    chambers: mastered.flatMap((m, i) => (m ? [i + 1] : [])),
    data: { positionsMastered, chambers: profile.chambers, testCuts, testCutsAllPositions },
  });
}
