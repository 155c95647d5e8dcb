/**
 * Keying engine benchmarks. Inputs are generated from a fixed seed so every run measures
 * the same work. Besides vitest's own report, this file times the two targets with
 * performance.now() over a few repeats, checks the indexed audit against the all-pairs
 * baseline, prints one line per target and writes the figures to bench/keying-results.json.
 */
import { writeFileSync } from 'node:fs';
import { cpus } from 'node:os';
import { bench, describe } from 'vitest';
import { auditSystem, builtInProfiles, pinCore, progressKeys } from '../shared/keying';
import type { AuditCore, AuditFinding, AuditInput, AuditKey, CoreKeys, Profile } from '../shared/keying';
import { naiveAudit } from './naiveAudit';

const profile = builtInProfiles['sfic-7'] as Profile;

/** mulberry32: small, fast, seeded; enough for repeatable test data. */
function prng(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/**
 * A four-level system laid out the usual way: a top master; 4 grand masters progressed in
 * chamber 1; 4 masters under each, progressed in chamber 2; change keys by total position
 * progression of chambers 3..7 under each master (1,024 each); then spare keys that take
 * the top master's depth in one position, the kind that open cores incidentally.
 */
function generateSystem(seed: number, coreCount: number, keyCount: number): AuditInput {
  const rnd = prng(seed);
  const pick = <T>(list: readonly T[]): T => list[Math.floor(rnd() * list.length)] as T;
  const top = Array.from({ length: 7 }, () => Math.floor(rnd() * 10));
  const other = (i: number, n: number): number[] =>
    [0, 2, 4, 6, 8].map((d) => d + (top[i] as number) % 2).filter((d) => d !== top[i]).slice(0, n);
  const control = top.map((t) => pick([1, 2, 3, 4, 5, 6, 7, 8, 9].filter((d) => d !== t))).join('');

  const keys: AuditKey[] = [{ id: 'k-top', symbol: 'A', bitting: top.join(''), level: 'great-grand-master', opens: [] }];
  const masters: { gm: AuditKey; m: AuditKey; changes: AuditKey[] }[] = [];
  for (const [g, d1] of other(0, 4).entries()) {
    const gmDepths = [...top];
    gmDepths[0] = d1;
    const gm: AuditKey = { id: `k-gm${g}`, symbol: `A${'ABCD'[g]}`, bitting: gmDepths.join(''), level: 'grand-master', opens: [] };
    keys.push(gm);
    for (const [m, d2] of other(1, 4).entries()) {
      const mDepths = [...gmDepths];
      mDepths[1] = d2;
      const sym = `${gm.symbol}${'ABCD'[m]}`;
      const mk: AuditKey = { id: `k-m${g}${m}`, symbol: sym, bitting: mDepths.join(''), level: 'master', opens: [] };
      keys.push(mk);
      const bittings = progressKeys(profile, { topMaster: mk.bitting, progress: [3, 4, 5, 6, 7], control });
      masters.push({ gm, m: mk, changes: bittings.map((b, i) => ({ id: `k-${sym}-${i + 1}`, symbol: `${sym}${i + 1}`, bitting: b, level: 'change', opens: [] })) });
    }
  }
  for (const group of masters) keys.push(...group.changes);
  for (let s = 0; keys.length < keyCount; s++) {
    const base = pick(pick(masters).changes).bitting.split('').map(Number);
    const p = 2 + Math.floor(rnd() * 5);
    base[p] = top[p] as number;
    keys.push({ id: `k-spare-${s}`, symbol: `SP${s + 1}`, bitting: base.join(''), level: 'change', opens: [] });
  }

  const cores: AuditCore[] = [];
  for (let j = 0; j < coreCount; j++) {
    const group = masters[j % masters.length] as (typeof masters)[number];
    const row = Math.floor(j / masters.length);
    const id = `core-${j + 1}`;
    const change = group.changes[row] as AuditKey;
    const operating = [change, group.m, group.gm, keys[0] as AuditKey];
    // Every 25th core is cross-keyed with a second change key of the same master.
    if (j % 25 === 0) operating.push(group.changes[group.changes.length - 1 - row] as AuditKey);
    for (const k of operating) k.opens.push(id);
    cores.push({ id, label: `Door ${j + 1}`, operating: operating.map((k) => k.id) });
  }
  return { keys, cores, control, topMaster: 'k-top' };
}

const system = generateSystem(2024, 5_000, 20_000);
const keyById = new Map(system.keys.map((k) => [k.id, k.bitting]));
const pinInputs: CoreKeys[] = Array.from({ length: 10_000 }, (_, j) => {
  const core = system.cores[j % system.cores.length] as AuditCore;
  return { operating: core.operating.slice(0, 4).map((id) => keyById.get(id) ?? ''), control: system.control };
});

function pinAll(): number {
  let openings = 0;
  for (const keys of pinInputs) openings += pinCore(profile, keys).openingsCount;
  return openings;
}

function timeRuns(runs: number, fn: () => unknown): number[] {
  const out: number[] = [];
  for (let r = 0; r < runs; r++) {
    const start = performance.now();
    fn();
    out.push(performance.now() - start);
  }
  return out;
}

const median = (xs: number[]): number => {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)] as number;
};

function countByCode(findings: AuditFinding[]): Record<string, number> {
  const out: Record<string, number> = {};
  for (const f of findings) out[f.code] = (out[f.code] ?? 0) + 1;
  return out;
}

function summarise(): void {
  pinAll(); // warm-up: the first pass pays for compilation, not for pinning
  const pinRuns = timeRuns(11, pinAll);
  const pinMs = median(pinRuns);

  auditSystem(profile, system);
  let smart: AuditFinding[] = [];
  const smartRuns = timeRuns(5, () => { smart = auditSystem(profile, system); });
  let naive: AuditFinding[] = [];
  // The baseline makes 10^8 key-core checks; two full-size runs keep the bench short.
  const naiveRuns = timeRuns(2, () => { naive = naiveAudit(profile, system); });
  const identical = JSON.stringify(smart) === JSON.stringify(naive);
  const smartMs = median(smartRuns);
  const naiveMs = Math.min(...naiveRuns);
  const speedUp = naiveMs / smartMs;

  console.log(`keying: pinCore, 10,000 seven-chamber cores x 4 operating keys: ${pinMs.toFixed(1)} ms median of 11 (target < 50 ms) ${pinMs < 50 ? 'MEETS' : 'MISSES'} target`);
  console.log(`keying: auditSystem, 5,000 cores x 20,000 keys: ${smartMs.toFixed(1)} ms median of 5; all-pairs baseline ${naiveMs.toFixed(0)} ms best of 2 (full size); ${speedUp.toFixed(1)}x faster (target >= 10x) ${speedUp >= 10 ? 'MEETS' : 'MISSES'} target; findings ${identical ? 'identical' : 'DIFFER'} (${smart.length})`);
  if (!identical) throw new Error('keying bench: the indexed audit and the all-pairs baseline disagree');

  writeFileSync(new URL('./keying-results.json', import.meta.url), `${JSON.stringify({
    machine: { cpus: cpus().length, node: process.version },
    pinCore: { cores: pinInputs.length, chambers: profile.chambers, operatingKeysPerCore: 4, runsMs: pinRuns, medianMs: pinMs, targetMs: 50, meetsTarget: pinMs < 50 },
    audit: {
      cores: system.cores.length, keys: system.keys.length,
      indexedRunsMs: smartRuns, indexedMedianMs: smartMs,
      allPairsRunsMs: naiveRuns, allPairsBestMs: naiveMs, allPairsInput: 'full size',
      speedUp, targetSpeedUp: 10, meetsTarget: speedUp >= 10,
      identicalFindings: identical, findings: smart.length, findingsByCode: countByCode(smart),
    },
  }, null, 2)}\n`);
}

summarise();

describe('pinCore', () => {
  bench('10,000 seven-chamber cores, 4 operating keys each', () => { pinAll(); }, { time: 1_000 });
});

describe('auditSystem, 5,000 cores and 20,000 keys', () => {
  bench('indexed (auditSystem)', () => { auditSystem(profile, system); }, { time: 1_000 });
  bench('all pairs (baseline)', () => { naiveAudit(profile, system); },
    { time: 0, iterations: 1, warmupTime: 0, warmupIterations: 0 });
});
