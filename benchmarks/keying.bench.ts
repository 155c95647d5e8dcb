/**
 * Keying engine benchmarks (`npm run bench -- engine`). Inputs come from fixed seeds
 * (benchmarks/systems.ts) so every run measures the same work. Besides vitest's own report,
 * this file times the targets with performance.now() (wall) and process.cpuUsage() (CPU,
 * which a busy machine inflates less), checks the indexed audit against the all-pairs
 * baseline, prints one line per target and a table of how the audit grows with cores and
 * keys, and writes the figures to benchmarks/keying-results.json (scripts/bench.ts folds them
 * into benchmarks/results.json).
 */
import { writeFileSync } from 'node:fs';
import { cpus, loadavg } from 'node:os';
import { bench, describe } from 'vitest';
import { auditSystem, builtInProfiles, pinCore } from '../shared/keying';
import type { SystemAuditCore, SystemAuditFinding, SystemAuditInput, CoreKeys, Profile } from '../shared/keying';
import { naiveSystemAudit } from './naiveSystemAudit';
import { generateSystem } from './systems';

const profile = builtInProfiles['sfic-7'] as Profile;
const system = generateSystem(2024, { cores: 5_000, keys: 20_000 });
const keyById = new Map(system.keys.map((k) => [k.id, k.bitting]));
const pinInputs: CoreKeys[] = Array.from({ length: 10_000 }, (_, j) => {
  const core = system.cores[j % system.cores.length] as SystemAuditCore;
  return { operating: core.operating.slice(0, 4).map((id) => keyById.get(id) ?? ''), control: system.control };
});

function pinAll(): number {
  let openings = 0;
  for (const keys of pinInputs) openings += pinCore(profile, keys).openingsCount;
  return openings;
}

interface Timing { wallMs: number[]; cpuMs: number[] }

function timeRuns(runs: number, fn: () => unknown): Timing {
  const out: Timing = { wallMs: [], cpuMs: [] };
  for (let r = 0; r < runs; r++) {
    const cpu = process.cpuUsage();
    const start = performance.now();
    fn();
    out.wallMs.push(performance.now() - start);
    const used = process.cpuUsage(cpu);
    out.cpuMs.push((used.user + used.system) / 1000);
  }
  return out;
}

const median = (xs: number[]): number => {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)] as number;
};
const fixed = (n: number, d = 1) => Number(n.toFixed(d));

function countByCode(findings: SystemAuditFinding[]): Record<string, number> {
  const out: Record<string, number> = {};
  for (const f of findings) out[f.code] = (out[f.code] ?? 0) + 1;
  return out;
}

/** One audit of a generated system: median wall and CPU time of `runs`. */
function auditOnce(input: SystemAuditInput, runs: number): { wallMs: number; cpuMs: number; findings: number } {
  auditSystem(profile, input); // warm-up
  let findings = 0;
  const t = timeRuns(runs, () => { findings = auditSystem(profile, input).length; });
  return { wallMs: fixed(median(t.wallMs)), cpuMs: fixed(median(t.cpuMs)), findings };
}

function summarise(): void {
  const loadBefore = loadavg()[0] ?? 0;
  pinAll(); // warm-up: the first passes pay for compilation, not for pinning
  pinAll();
  const pin = timeRuns(21, pinAll);
  const pinMs = median(pin.wallMs);

  auditSystem(profile, system);
  let smart: SystemAuditFinding[] = [];
  const smartRuns = timeRuns(7, () => { smart = auditSystem(profile, system); });
  let naive: SystemAuditFinding[] = [];
  // The baseline makes 10^8 key-core checks; one full-size run keeps the bench short.
  const naiveRuns = timeRuns(1, () => { naive = naiveSystemAudit(profile, system); });
  const identical = JSON.stringify(smart) === JSON.stringify(naive);
  const smartMs = median(smartRuns.wallMs);
  const naiveMs = naiveRuns.wallMs[0] as number;
  const speedUp = naiveMs / smartMs;
  const speedUpCpu = (naiveRuns.cpuMs[0] as number) / median(smartRuns.cpuMs);

  // How the audit grows: cores at a fixed key count, and keys at a fixed core count.
  const sizes: { cores: number; keys: number; fullCapacity: boolean }[] = [
    { cores: 5_000, keys: 20_000, fullCapacity: false },
    { cores: 5_000, keys: 40_000, fullCapacity: false },
    { cores: 5_000, keys: 60_000, fullCapacity: false },
    { cores: 20_000, keys: 60_000, fullCapacity: true },
    { cores: 50_000, keys: 60_000, fullCapacity: true },
  ];
  const growth = sizes.map((s) => ({ ...s, ...auditOnce(generateSystem(2024, s), 3) }));
  const big = growth[growth.length - 1]!;
  const loadAfter = loadavg()[0] ?? 0;

  const verdict = (ok: boolean) => (ok ? 'MEETS' : 'MISSES');
  console.log(`keying: machine load average ${loadBefore.toFixed(1)} before, ${loadAfter.toFixed(1)} after, on ${cpus().length} CPUs (wall times stretch with load; CPU times much less)`);
  console.log(`keying: pinCore, 10,000 seven-chamber cores x 4 operating keys: ${pinMs.toFixed(1)} ms wall, ${median(pin.cpuMs).toFixed(1)} ms CPU, median of 21 (target < 10 ms) ${verdict(pinMs < 10)} target`);
  console.log(`keying: auditSystem, 5,000 cores x 20,000 keys: ${smartMs.toFixed(1)} ms median of 7; all-pairs baseline ${naiveMs.toFixed(0)} ms (full size); ${speedUp.toFixed(1)}x faster by wall time, ${speedUpCpu.toFixed(1)}x by CPU time (target >= 50x) ${verdict(speedUp >= 50)} target; findings ${identical ? 'identical' : 'DIFFER'} (${smart.length})`);
  console.log(`keying: auditSystem, 50,000 cores x 60,000 keys: ${big.wallMs} ms wall, ${big.cpuMs} ms CPU (target < 2,000 ms) ${verdict(big.wallMs < 2000)} target; ${big.findings} findings`);
  console.log('keying: audit cost by size (median of 3)');
  console.log('  cores    keys  wall ms   CPU ms  findings');
  for (const g of growth) console.log(`  ${String(g.cores).padStart(6)} ${String(g.keys).padStart(6)} ${String(g.wallMs).padStart(8)} ${String(g.cpuMs).padStart(8)} ${String(g.findings).padStart(9)}`);
  if (!identical) throw new Error('keying bench: the indexed audit and the all-pairs baseline disagree');

  writeFileSync(new URL('./keying-results.json', import.meta.url), `${JSON.stringify({
    machine: { cpus: cpus().length, node: process.version, loadAverageBefore: fixed(loadBefore, 2), loadAverageAfter: fixed(loadAfter, 2) },
    pinCore: {
      cores: pinInputs.length, chambers: profile.chambers, operatingKeysPerCore: 4,
      medianMs: fixed(pinMs, 2), medianCpuMs: fixed(median(pin.cpuMs), 2), targetMs: 10, meetsTarget: pinMs < 10,
    },
    audit: {
      cores: system.cores.length, keys: system.keys.length,
      indexedRunsMs: smartRuns.wallMs.map((x) => fixed(x)), indexedMedianMs: fixed(smartMs), indexedMedianCpuMs: fixed(median(smartRuns.cpuMs)),
      allPairsMs: fixed(naiveMs), allPairsCpuMs: fixed(naiveRuns.cpuMs[0] as number), allPairsInput: 'full size',
      speedUp: fixed(speedUp), speedUpByCpu: fixed(speedUpCpu), targetSpeedUp: 50, meetsTarget: speedUp >= 50,
      identicalFindings: identical, findings: smart.length, findingsByCode: countByCode(smart),
    },
    largeAudit: { cores: big.cores, keys: big.keys, wallMs: big.wallMs, cpuMs: big.cpuMs, findings: big.findings, targetMs: 2000, meetsTarget: big.wallMs < 2000 },
    auditGrowth: growth,
  }, null, 2)}\n`);
}

summarise();

describe('pinCore', () => {
  bench('10,000 seven-chamber cores, 4 operating keys each', () => { pinAll(); }, { time: 1_000 });
});

describe('auditSystem, 5,000 cores and 20,000 keys', () => {
  bench('indexed (auditSystem)', () => { auditSystem(profile, system); }, { time: 1_000 });
});
