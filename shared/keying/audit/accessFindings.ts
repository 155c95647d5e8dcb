import type { AuditContext } from './context';
import { coreIds, coreName, finding, keyRefs, nameList, plural, type Ranked } from './format';

/**
 * Compares who turns each core with who is meant to. A key is meant to operate a core
 * when either record says so (the key's `opens` or the core's `operating`); turning a
 * core neither names is unintended access, and a key named only by its own record
 * that does not turn the core is an intended key that fails.
 */
export function accessFindings(ctx: AuditContext, turning: number[][]): Ranked[] {
  const keyCount = ctx.system.keys.length;
  // Per key (system order): the cores of each kind, filled in core order.
  const unintended: (number[] | undefined)[] = new Array(keyCount);
  const fails: (number[] | undefined)[] = new Array(keyCount);
  const disagree: (number[] | undefined)[] = new Array(keyCount);
  const turnsMark = new Int32Array(keyCount);
  const pinnedMark = new Int32Array(keyCount);
  const openerMark = new Int32Array(keyCount);

  ctx.system.cores.forEach((_, c) => {
    const stamp = c + 1;
    for (const k of turning[c] as number[]) turnsMark[k] = stamp;
    for (const k of ctx.coreKeys[c] as number[]) pinnedMark[k] = stamp;
    for (const k of ctx.openers[c] as number[]) openerMark[k] = stamp;

    for (const k of ctx.openers[c] as number[]) {
      if (turnsMark[k] !== stamp) add(fails, k, c);
      else if (pinnedMark[k] !== stamp) add(disagree, k, c);
    }
    for (const k of ctx.coreKeys[c] as number[]) if (openerMark[k] !== stamp) add(disagree, k, c);
    for (const k of turning[c] as number[]) {
      if (pinnedMark[k] !== stamp && openerMark[k] !== stamp) add(unintended, k, c);
    }
  });

  const out: Ranked[] = [];
  for (const [k, cores] of sorted(unintended)) {
    const symbol = ctx.system.keys[k]?.symbol ?? '';
    out.push(finding('unintended-access', k, {
      message: `Key ${symbol} turns ${plural(cores.length, 'core')} it is not meant to operate: ${nameList(cores.slice(0, 6).map((c) => coreName(ctx, c)), 5, cores.length)}.`,
      advice: 'Recut or retire the key, or re-pin those cores with other master depths so the key’s cuts are not all among their operating depths; if the access is wanted, add the cores to the key’s record.',
      ...keyRefs(ctx, [k]), cores: coreIds(ctx, cores), data: { cores: cores.length },
    }));
  }
  for (const [k, cores] of sorted(fails)) {
    const symbol = ctx.system.keys[k]?.symbol ?? '';
    out.push(finding('intended-key-fails', k, {
      message: `Key ${symbol} is meant to operate ${nameList(cores.slice(0, 6).map((c) => coreName(ctx, c)), 5, cores.length)} but does not turn ${cores.length === 1 ? 'it' : 'them'}: the core is not pinned for this key.`,
      advice: 'Add the key to the core’s operating keys and re-pin it, or take the core off the key’s record.',
      ...keyRefs(ctx, [k]), cores: coreIds(ctx, cores), data: { cores: cores.length },
    }));
  }
  for (const [k, cores] of sorted(disagree)) {
    const symbol = ctx.system.keys[k]?.symbol ?? '';
    out.push(finding('records-disagree', k, {
      message: `Key ${symbol} and ${nameList(cores.slice(0, 6).map((c) => coreName(ctx, c)), 5, cores.length)} disagree: only one of the two records says the key operates the core.`,
      advice: 'Correct the key’s list of cores or the core’s list of keys so both say the same.',
      ...keyRefs(ctx, [k]), cores: coreIds(ctx, cores), data: { cores: cores.length },
    }));
  }
  return out;
}

function add(byKey: (number[] | undefined)[], k: number, c: number): void {
  const list = byKey[k];
  if (list) list.push(c);
  else byKey[k] = [c];
}

/** [key, cores] for every key with cores, ascending by key. */
function sorted(byKey: (number[] | undefined)[]): [number, number[]][] {
  const out: [number, number[]][] = [];
  for (let k = 0; k < byKey.length; k++) {
    const cores = byKey[k];
    if (cores) out.push([k, cores]);
  }
  return out;
}
