import type { SystemAuditContext } from './context';
import { systemAuditFindingCodes, type SystemAuditFindingCode } from '../codes';
import { coreName, nameList, plural, type Ranked } from './format';

/**
 * Compares who turns each core with who is meant to. A key is meant to operate a core
 * when either record says so (the key's `opens` or the core's `operating`); turning a
 * core neither names is unintended access, and a key named only by its own record
 * that does not turn the core is an intended key that fails.
 */
export function accessFindings(ctx: SystemAuditContext, turning: number[][]): Ranked[] {
  const keyCount = ctx.system.keys.length;
  // (key, core) pairs of each kind, appended in core order; grouped by key below.
  const unintended = new Pairs();
  const fails = new Pairs();
  const disagree = new Pairs();
  const turnsMark = new Int32Array(keyCount);
  const pinnedMark = new Int32Array(keyCount);
  const openerMark = new Int32Array(keyCount);

  const coreCount = ctx.system.cores.length;
  for (let c = 0; c < coreCount; c++) {
    const stamp = c + 1;
    const turns = turning[c] as number[];
    const pinned = ctx.coreKeys[c] as number[];
    const openers = ctx.openers[c] as number[];
    for (const k of turns) turnsMark[k] = stamp;
    for (const k of pinned) pinnedMark[k] = stamp;
    for (const k of openers) openerMark[k] = stamp;

    for (const k of openers) {
      if (turnsMark[k] !== stamp) fails.add(k, c);
      else if (pinnedMark[k] !== stamp) disagree.add(k, c);
    }
    for (const k of pinned) if (openerMark[k] !== stamp) disagree.add(k, c);
    for (const k of turns) {
      if (pinnedMark[k] !== stamp && openerMark[k] !== stamp) unintended.add(k, c);
    }
  }

  const out: Ranked[] = [];
  unintended.eachKey(keyCount, (k, cores, from, to) => {
    const n = to - from;
    out.push(keyFinding(ctx, 'unintended-access', k, cores, from, to,
      `Key ${symbolOf(ctx, k)} turns ${plural(n, 'core')} it is not meant to operate: ${coreNameList(ctx, cores, from, to)}.`,
      'Recut or retire the key, or re-pin those cores with other master depths so the key’s cuts are not all among their operating depths; if the access is wanted, add the cores to the key’s record.'));
  });
  fails.eachKey(keyCount, (k, cores, from, to) => {
    out.push(keyFinding(ctx, 'intended-key-fails', k, cores, from, to,
      `Key ${symbolOf(ctx, k)} is meant to operate ${coreNameList(ctx, cores, from, to)} but does not turn ${to - from === 1 ? 'it' : 'them'}: the core is not pinned for this key.`,
      'Add the key to the core’s operating keys and re-pin it, or take the core off the key’s record.'));
  });
  disagree.eachKey(keyCount, (k, cores, from, to) => {
    out.push(keyFinding(ctx, 'records-disagree', k, cores, from, to,
      `Key ${symbolOf(ctx, k)} and ${coreNameList(ctx, cores, from, to)} disagree: only one of the two records says the key operates the core.`,
      'Correct the key’s list of cores or the core’s list of keys so both say the same.'));
  });
  return out;
}

const symbolOf = (ctx: SystemAuditContext, k: number): string => ctx.system.keys[k]?.symbol ?? '';

/** nameList over cores[from..to): the first names and how many more. */
function coreNameList(ctx: SystemAuditContext, cores: Int32Array, from: number, to: number): string {
  const names: string[] = [];
  for (let i = from; i < to && i < from + 6; i++) names.push(coreName(ctx, cores[i] as number));
  return nameList(names, 5, to - from);
}

/** One finding about key k and cores[from..to), built in one object (no spread copies). */
function keyFinding(
  ctx: SystemAuditContext, code: SystemAuditFindingCode, k: number, cores: Int32Array, from: number, to: number,
  message: string, advice: string,
): Ranked {
  const key = ctx.system.keys[k];
  const ids: string[] = new Array(to - from);
  for (let i = from; i < to; i++) ids[i - from] = ctx.system.cores[cores[i] as number]?.id ?? '';
  return {
    finding: {
      code, severity: systemAuditFindingCodes[code].severity, message, advice,
      keys: [key?.symbol ?? ''], keyIds: [key?.id ?? ''], cores: ids, data: { cores: to - from },
    },
    order: k,
  };
}

/** A growing list of (key, core) pairs in typed arrays: no array per key while collecting. */
class Pairs {
  keys = new Int32Array(1024);
  cores = new Int32Array(1024);
  length = 0;

  add(k: number, c: number): void {
    if (this.length === this.keys.length) {
      const keys = new Int32Array(this.length * 2);
      keys.set(this.keys);
      this.keys = keys;
      const cores = new Int32Array(this.length * 2);
      cores.set(this.cores);
      this.cores = cores;
    }
    this.keys[this.length] = k;
    this.cores[this.length++] = c;
  }

  /**
   * Calls back once per key with pairs, ascending by key, with that key's cores as
   * cores[from..to) in the order they were added (a stable counting sort by key).
   */
  eachKey(keyCount: number, visit: (k: number, cores: Int32Array, from: number, to: number) => void): void {
    if (this.length === 0) return;
    const start = new Int32Array(keyCount + 1);
    for (let i = 0; i < this.length; i++) {
      const at = (this.keys[i] as number) + 1;
      start[at] = (start[at] as number) + 1;
    }
    for (let k = 0; k < keyCount; k++) start[k + 1] = (start[k + 1] as number) + (start[k] as number);
    const fill = start.slice(0, keyCount);
    const cores = new Int32Array(this.length);
    for (let i = 0; i < this.length; i++) {
      const k = this.keys[i] as number;
      const at = fill[k] as number;
      fill[k] = at + 1;
      cores[at] = this.cores[i] as number;
    }
    for (let k = 0; k < keyCount; k++) {
      const from = start[k] as number;
      const to = start[k + 1] as number;
      if (to > from) visit(k, cores, from, to);
    }
  }
}
