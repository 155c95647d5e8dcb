/**
 * Key control benchmark (`npm run bench -- engine`): the exposure of a grand master (every
 * core it turns, intended or incidental, and every core it removes) over 50,000 installed
 * cores of the seeded system the large audit uses (benchmarks/systems.ts). Times keyExposure with
 * performance.now() (wall) and process.cpuUsage() (CPU), checks it against keyOperates on
 * pinCore's chart of every core (brute force), and writes benchmarks/exposure-results.json
 * (scripts/bench.ts folds it into benchmarks/results.json). Target: under 200 ms.
 */
import { writeFileSync } from 'node:fs';
import { loadavg } from 'node:os';
import { bench, describe } from 'vitest';
import { builtInProfiles, keyExposure, keyOperates, pinCore } from '../shared/keying';
import type { Profile } from '../shared/keying';
import { generateSystem } from './systems';

const profile = builtInProfiles['sfic-7'] as Profile;
const system = generateSystem(2024, { cores: 50_000, keys: 60_000, fullCapacity: true });
const gm = system.keys.find((k) => k.id === 'k-gm0')!;
const input = { keys: system.keys, cores: system.cores, control: system.control };

function run(): number {
  return keyExposure(profile, input, gm).length;
}

function measure(runs: number): { wallMs: number[]; cpuMs: number[] } {
  const out = { wallMs: [] as number[], cpuMs: [] as number[] };
  for (let r = 0; r < runs; r++) {
    const cpu = process.cpuUsage();
    const start = performance.now();
    run();
    out.wallMs.push(performance.now() - start);
    const used = process.cpuUsage(cpu);
    out.cpuMs.push((used.user + used.system) / 1000);
  }
  return out;
}

const median = (xs: number[]): number => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)] as number;

function summarise(): void {
  const loadBefore = loadavg()[0] as number;
  // The first call pins each distinct chamber stack once; later calls read the cached masks.
  const cold = measure(1);
  const warm = measure(7);
  const found = keyExposure(profile, input, gm);
  // Brute force: keyOperates on pinCore's chart of every core (the rule itself).
  const byId = new Map(system.keys.map((k) => [k.id, k.bitting]));
  const brute: string[] = [];
  system.cores.forEach((c, i) => {
    const does = keyOperates(pinCore(profile, { operating: c.operating.map((id) => byId.get(id)!), control: system.control }), profile, gm.bitting);
    if (does.plug) brute.push(`${i}:${c.operating.includes(gm.id) ? 'intended' : 'incidental'}`);
    else if (does.control) brute.push(`${i}:control`);
  });
  const identical = JSON.stringify(found.map((e) => `${e.core}:${e.how}`)) === JSON.stringify(brute);
  const wallMs = median(warm.wallMs);
  const counts = { intended: found.filter((e) => e.how === 'intended').length, incidental: found.filter((e) => e.how === 'incidental').length, control: found.filter((e) => e.how === 'control').length };
  console.log(`keying: keyExposure of a grand master over ${system.cores.length.toLocaleString('en')} installed cores: ${wallMs.toFixed(1)} ms wall, ${median(warm.cpuMs).toFixed(1)} ms CPU, median of 7 (first call ${cold.wallMs[0]!.toFixed(1)} ms) (target < 200 ms) ${wallMs < 200 ? 'meets' : 'MISSES'} target; ${found.length} cores (${counts.intended} intended, ${counts.incidental} incidental); ${identical ? 'identical to' : 'DIFFERS from'} keyOperates brute force`);
  if (!identical) throw new Error('keyExposure bench: the fast exposure and keyOperates disagree');
  writeFileSync(new URL('./exposure-results.json', import.meta.url), `${JSON.stringify({
    cores: system.cores.length, keys: system.keys.length, key: 'grand master',
    firstCallMs: Number(cold.wallMs[0]!.toFixed(1)), medianMs: Number(wallMs.toFixed(1)), medianCpuMs: Number(median(warm.cpuMs).toFixed(1)),
    runsMs: warm.wallMs.map((x) => Number(x.toFixed(1))), exposed: found.length, ...counts,
    identicalToBruteForce: identical, targetMs: 200, meetsTarget: wallMs < 200,
    loadAverageBefore: Number(loadBefore.toFixed(2)), loadAverageAfter: Number((loadavg()[0] as number).toFixed(2)),
  }, null, 2)}\n`);
}

summarise();

describe('keyExposure, 50,000 installed cores', () => {
  bench('grand master', () => { run(); }, { time: 1_000 });
});
