/**
 * Seeded systems for the engine benchmarks, so every run measures the same work. Laid out
 * the usual way for a two-step seven-pin profile: a top master; 4 grand masters progressed
 * in chamber 1; 4 masters under each, progressed in chamber 2; change keys progressed in
 * chambers 3..7 under each master; then spare keys that take the top master's depth in one
 * position, the kind that open cores incidentally. Each core takes one change key with its
 * masters; every 25th is cross-keyed with a second change key of the same master.
 */
import type { SystemAuditCore, SystemAuditInput, SystemAuditKey } from '../shared/keying';

/** mulberry32: small, fast, seeded; enough for repeatable test data. */
export function prng(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

export interface SystemShape {
  cores: number;
  keys: number;
  /**
   * Change keys take every depth of the top master's parity in chambers 3..7, the
   * master's own too (3,124 per master, 49,984 in all: near the capacity of a two-step
   * seven-pin system); otherwise only the other four (1,024 per master, as progressKeys).
   */
  fullCapacity?: boolean;
}

export function generateSystem(seed: number, shape: SystemShape): SystemAuditInput {
  const rnd = prng(seed);
  const pick = <T>(list: readonly T[]): T => list[Math.floor(rnd() * list.length)] as T;
  const top = Array.from({ length: 7 }, () => Math.floor(rnd() * 10));
  const parity = (i: number): number[] => [0, 2, 4, 6, 8].map((d) => d + (top[i] as number) % 2);
  const other = (i: number, n: number): number[] => parity(i).filter((d) => d !== top[i]).slice(0, n);
  const control = top.map((t) => pick([1, 2, 3, 4, 5, 6, 7, 8, 9].filter((d) => d !== t))).join('');
  const controlCut = control;

  const keys: SystemAuditKey[] = [{ id: 'k-top', symbol: 'A', bitting: top.join(''), level: 'great-grand-master', opens: [] }];
  const masters: { gm: SystemAuditKey; m: SystemAuditKey; changes: SystemAuditKey[] }[] = [];
  for (const [g, d1] of other(0, 4).entries()) {
    const gmDepths = [...top];
    gmDepths[0] = d1;
    const gm: SystemAuditKey = { id: `k-gm${g}`, symbol: `A${'ABCD'[g]}`, bitting: gmDepths.join(''), level: 'grand-master', opens: [] };
    keys.push(gm);
    for (const [m, d2] of other(1, 4).entries()) {
      const mDepths = [...gmDepths];
      mDepths[1] = d2;
      const sym = `${gm.symbol}${'ABCD'[m]}`;
      const mk: SystemAuditKey = { id: `k-m${g}${m}`, symbol: sym, bitting: mDepths.join(''), level: 'master', opens: [] };
      keys.push(mk);
      const choices = [2, 3, 4, 5, 6].map((i) => (shape.fullCapacity ? parity(i) : parity(i).filter((d) => d !== mDepths[i])));
      const changes: SystemAuditKey[] = [];
      const counter = [0, 0, 0, 0, 0];
      for (;;) {
        const depths = [...mDepths];
        counter.forEach((c, j) => { depths[j + 2] = choices[j]![c]!; });
        const bitting = depths.join('');
        if (bitting !== mk.bitting && bitting !== controlCut) {
          changes.push({ id: `k-${sym}-${changes.length + 1}`, symbol: `${sym}${changes.length + 1}`, bitting, level: 'change', opens: [] });
        }
        let j = 4;
        while (j >= 0 && ++counter[j]! === choices[j]!.length) counter[j--] = 0;
        if (j < 0) break;
      }
      masters.push({ gm, m: mk, changes });
    }
  }
  for (const group of masters) keys.push(...group.changes);
  for (let s = 0; keys.length < shape.keys; s++) {
    const base = pick(pick(masters).changes).bitting.split('').map(Number);
    const p = 2 + Math.floor(rnd() * 5);
    base[p] = top[p] as number;
    keys.push({ id: `k-spare-${s}`, symbol: `SP${s + 1}`, bitting: base.join(''), level: 'change', opens: [] });
  }

  const cores: SystemAuditCore[] = [];
  for (let j = 0; j < shape.cores; j++) {
    const group = masters[j % masters.length]!;
    const row = Math.floor(j / masters.length) % group.changes.length;
    const id = `core-${j + 1}`;
    const change = group.changes[row]!;
    const operating = [change, group.m, group.gm, keys[0]!];
    if (j % 25 === 0) operating.push(group.changes[group.changes.length - 1 - row]!);
    for (const k of operating) k.opens.push(id);
    cores.push({ id, label: `Door ${j + 1}`, operating: operating.map((k) => k.id) });
  }
  return { keys, cores, control, topMaster: 'k-top' };
}
