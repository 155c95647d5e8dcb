import type { SystemAuditContext } from './context';
import { coreIds, coreName, finding, keyRefs, nameList, plural, type Ranked } from './format';

/**
 * Who lines up the control shear line of each core. Every core of a system shares the
 * control key; any other key that releases a core is an error naming the key and the
 * cores. A key cut like the control key is left to `control-equals-key`, which already
 * says it releases every core. One summary says how many cores release for more than
 * the control key (two-wafer seams at the control line).
 */
export function releaseFindings(ctx: SystemAuditContext, releasing: number[][]): Ranked[] {
  const out: Ranked[] = [];
  let controlCode = 0;
  for (const d of ctx.control) controlCode = controlCode * 10 + d;
  const { codes } = ctx.byBitting;
  const byKey = new Map<number, number[]>();
  releasing.forEach((keys, c) => {
    for (const k of keys) {
      if (codes[k] === controlCode) continue;
      const list = byKey.get(k);
      if (list) list.push(c);
      else byKey.set(k, [c]);
    }
  });
  // In first-seen order: auditSystem sorts the findings by key (their `order`).
  for (const [k, cores] of byKey) {
    const refs = keyRefs(ctx, [k]);
    out.push(finding('key-releases-core', k, {
      message: `Key ${refs.keys[0] ?? ''} lines up the control shear line of ${plural(cores.length, 'core')} it is not the control key of: ${nameList(cores.slice(0, 6).map((c) => coreName(ctx, c)), 5, cores.length)}. Whoever holds it can remove ${cores.length === 1 ? 'that core' : 'those cores'}.`,
      advice: 'A two-wafer build-up’s seam sits at this key’s cut in every chamber: stock those build-ups as one wafer (or re-pin with a control cut that needs none), or recut and reissue the key.',
      ...refs, cores: coreIds(ctx, cores), data: { cores: cores.length },
    }));
  }

  let pinned = 0;
  const more: number[] = [];
  let largest = 0;
  let largestCore = -1;
  ctx.pinnings.forEach((p, c) => {
    if (p.chambers.length === 0) return;
    pinned++;
    if (p.controlOpeningsCount > 1) more.push(c);
    if (p.controlOpeningsCount > largest) {
      largest = p.controlOpeningsCount;
      largestCore = c;
    }
  });
  if (pinned > 0) {
    const message = more.length === 0
      ? `Control openings: each of the ${plural(pinned, 'pinned core')} releases for the control key alone (every build-up is one wafer or its seam releases no other bitting).`
      : `Control openings: ${plural(more.length, 'core')} of ${pinned.toLocaleString('en-US')} release for more bittings than the control key (largest ${plural(largest, 'bitting')}, core ${coreName(ctx, largestCore)}): ${nameList(more.slice(0, 6).map((c) => coreName(ctx, c)), 5, more.length)}.`;
    out.push(finding('control-openings', 0, {
      message,
      advice: more.length === 0
        ? 'Nothing to do; keep build-ups to one stocked wafer where you can.'
        : 'Each extra opening comes from a two-wafer build-up whose seam meets the control shear line: stock those build-ups as one wafer, or choose control cuts closer to the deepest operating cuts.',
      cores: coreIds(ctx, more),
      data: { cores: pinned, coresOverOne: more.length, largestControlOpenings: largest },
    }));
  }
  return out;
}
