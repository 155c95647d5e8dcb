import { readBitting } from '../bitting';
import { macsBreak, sameProgression } from '../rules';
import type { SystemAuditContext } from './context';
import type { CloseGroup } from './finders';
import { coreName, finding, keyRefs, nameList, plural, type Ranked } from './format';

/** Findings about keys and references on their own: readability, duplicates, cut rules. */
export function keyFindings(ctx: SystemAuditContext, close: CloseGroup[]): Ranked[] {
  const out: Ranked[] = [];
  const { profile, system, depths } = ctx;

  system.keys.forEach((key, k) => {
    if (depths[k]) return;
    const reading = readBitting(profile, key.bitting);
    out.push(finding('bad-bitting', k, {
      message: `Key ${key.symbol}: ${reading.ok ? '' : reading.message}`,
      advice: 'Correct the bitting in the key record; until then the key is left out of every other check.',
      ...keyRefs(ctx, [k]),
    }));
  });
  for (const [k, ids] of ctx.unknownCores) {
    out.push(finding('unknown-core', k, {
      message: `Key ${system.keys[k]?.symbol ?? ''} lists ${plural(ids.length, 'core')} not in the system: ${nameList(ids)}.`,
      advice: 'Add the cores to the system or take them off the key’s record.',
      ...keyRefs(ctx, [k]), cores: ids,
    }));
  }
  for (const [c, ids] of ctx.unknownKeys) {
    out.push(finding('unknown-key', c, {
      message: `Core ${coreName(ctx, c)} lists ${plural(ids.length, 'key')} not in the system: ${nameList(ids)}; ${ids.length === 1 ? 'it is' : 'they are'} left out of its pinning.`,
      advice: 'Add the keys to the system or take them off the core’s list.',
      cores: [system.cores[c]?.id ?? ''], data: { keys: ids.length },
    }));
  }

  // Each chain of the bitting table with two keys or more is one duplicate group, named
  // by its first key (chains are ascending).
  const { byBitting } = ctx;
  for (const k of ctx.validKeys) {
    if (byBitting.first(byBitting.codes[k] as number) !== k || byBitting.next(k) === -1) continue;
    const keys: number[] = [];
    for (let j = k; j !== -1; j = byBitting.next(j)) keys.push(j);
    const refs = keyRefs(ctx, keys);
    out.push(finding('duplicate-bitting', k, {
      message: `Keys ${nameList(refs.keys)} have the same bitting: each operates every core the others do.`,
      advice: 'Give each symbol its own bitting, or keep one symbol and record the others as copies of it.',
      ...refs,
    }));
  }

  out.push(...closeFindings(ctx, close));

  const top = ctx.topMaster >= 0 ? (depths[ctx.topMaster] as number[]) : null;
  for (const k of ctx.validKeys) {
    const key = depths[k] as number[];
    const symbol = system.keys[k]?.symbol ?? '';
    if (top && profile.step === 2) {
      let off: number[] | null = null;
      for (let i = 0; i < key.length; i++) {
        if (!sameProgression(profile, key[i] as number, top[i] as number)) (off ??= []).push(i + 1);
      }
      if (off) {
        out.push(finding('parity-broken', k, {
          message: `Key ${symbol} breaks the top master’s parity in chamber${off.length === 1 ? '' : 's'} ${off.join(', ')}: a core it shares with a key of the other parity needs an odd-sized wafer there.`,
          advice: 'Under two-step progression cut every key of the system to the top master’s parity (odd or even) in each chamber.',
          ...keyRefs(ctx, [k]), chambers: off,
        }));
      }
    }
    const i = macsBreak(profile, key);
    if (i >= 0) {
      out.push(finding('macs-exceeded', k, {
        message: `Key ${symbol}: cuts in chambers ${i + 1} and ${i + 2} differ by ${Math.abs((key[i] as number) - (key[i + 1] as number))}, more than the ${profile.maxAdjacentCut} this profile allows.`,
        advice: 'Change one of the two cuts; a key that breaks the maximum adjacent cut may not cut cleanly or work smoothly.',
        ...keyRefs(ctx, [k]), chambers: [i + 1, i + 2],
      }));
    }
  }
  return out;
}

/** Lines listed under the one-position-apart summary; the count says how many in all. */
const detailLines = 500;

/**
 * Change keys that differ in one position only. Under two-step progression, a position
 * apart by two steps is the normal minimum (keying primer), so those groups make ONE
 * line of design information with the count and the groups as details; a group whose
 * depths there differ by less than the step (or any group in a one-step system) stays a
 * warning of its own.
 */
function closeFindings(ctx: SystemAuditContext, close: CloseGroup[]): Ranked[] {
  const out: Ranked[] = [];
  const { profile, depths } = ctx;
  const normal: CloseGroup[] = [];
  for (const group of close) {
    const p = group.position;
    const first = (depths[group.keys[0] as number] as number[])[p] as number;
    let sameParity = profile.step === 2;
    for (let j = 1; j < group.keys.length && sameParity; j++) sameParity = sameProgression(profile, (depths[group.keys[j] as number] as number[])[p] as number, first);
    if (sameParity) {
      normal.push(group);
      continue;
    }
    const refs = keyRefs(ctx, group.keys);
    out.push(finding('change-keys-too-close', group.keys[0] as number, {
      message: `Change keys ${nameList(refs.keys)} differ only in chamber ${group.position + 1}, by less than the progression step: a worn key or a slightly miscut one may work the other doors.`,
      advice: 'Recut one of them to the top master’s parity there, or progress a second position; if the risk is accepted, acknowledge this finding with a note.',
      ...refs, chambers: [group.position + 1],
    }));
  }
  if (normal.length > 0) {
    const mark = new Uint8Array(ctx.system.keys.length);
    for (const g of normal) for (const k of g.keys) mark[k] = 1;
    const involved: number[] = [];
    for (let k = 0; k < mark.length; k++) if (mark[k]) involved.push(k);
    const lines = normal.slice(0, detailLines).map((g) => `${nameList(g.keys.slice(0, 9).map((k) => ctx.system.keys[k]?.symbol ?? ''), 8, g.keys.length)}: chamber ${g.position + 1}`);
    if (normal.length > detailLines) lines.push(`and ${(normal.length - detailLines).toLocaleString('en-US')} more groups`);
    const chambers: number[] = [];
    for (const g of normal) if (!chambers.includes(g.position + 1)) chambers.push(g.position + 1);
    chambers.sort((a, b) => a - b);
    out.push(finding('change-keys-one-apart', 0, {
      message: `${plural(normal.length, 'group')} of change keys (${plural(involved.length, 'key')}) differ in one position only, by two steps or more: the normal minimum of two-step progression, in chamber${chambers.length === 1 ? '' : 's'} ${chambers.join(', ')}.`,
      advice: 'Nothing to fix. Where a worn or miscut key must not work a neighbour’s door (high-security rooms), give those doors change keys two positions apart.',
      ...keyRefs(ctx, involved), chambers,
      data: { groups: normal.length, keys: involved.length },
      details: lines,
    }));
  }
  return out;
}
