/**
 * `npm run bench`: the benchmarks, never timed tests. Writes benchmarks/results.json and prints
 * a summary. Steps: the keying engine (vitest bench), sync load and the completion log on
 * a throw-away Postgres with a real server process, and the Bench in Chromium.
 * `npm run bench -- engine load browser` runs the parts named.
 */
import { spawn, spawnSync } from 'node:child_process';
import { chmodSync, existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { cpus } from 'node:os';
import path from 'node:path';
import { completionLog, syncLoad } from '../benchmarks/load';
import { createDb, migrateLatest } from '../server/db';
import { ensureDatabase, freePort, startCluster, stopCluster } from './lib/postgres';
import { ensureChromium } from './lib/chromium';

const root = path.resolve(import.meta.dirname, '..');
const parts = process.argv.slice(2).filter((a) => ['engine', 'load', 'browser'].includes(a));
const want = (p: string) => !parts.length || parts.includes(p);
const outFile = path.join(root, 'benchmarks/results.json');
const results: Record<string, unknown> = existsSync(outFile) ? JSON.parse(readFileSync(outFile, 'utf8')) : {};
results.machine = { cpus: cpus().length, cpu: cpus()[0]?.model, node: process.version, at: new Date().toISOString() };

if (want('engine')) {
  const r = spawnSync('npx', ['vitest', 'bench', '--run', '--project', 'bench', '--outputJson', 'benchmarks/vitest-bench.json'], { cwd: root, stdio: 'inherit' });
  if (r.status !== 0) throw new Error('the engine benchmark failed');
  results.engine = JSON.parse(readFileSync(path.join(root, 'benchmarks/keying-results.json'), 'utf8'));
  results.exposure = JSON.parse(readFileSync(path.join(root, 'benchmarks/exposure-results.json'), 'utf8'));
}

/** A throw-away cluster with `processes` API server processes on it (default one); `run` gets their addresses. */
async function withServer<T>(run: (bases: string[], db: ReturnType<typeof createDb>, tmp: string) => Promise<T>, opts: { build?: boolean; processes?: number } = {}): Promise<T> {
  const tmp = mkdtempSync('/tmp/corewright-bench-');
  chmodSync(tmp, 0o755);
  if (opts.build) {
    const r = spawnSync('npx', ['vite', 'build', '--outDir', path.join(tmp, 'dist'), '--emptyOutDir', '--logLevel', 'warn'], { cwd: root, stdio: 'inherit' });
    if (r.status !== 0) throw new Error('the client build failed');
  }
  const dataDir = path.join(tmp, 'pg');
  const cluster = startCluster({ dataDir, port: await freePort(56432) });
  const url = await ensureDatabase(cluster, 'corewright_bench');
  const db = createDb(url);
  const servers: ReturnType<typeof spawn>[] = [];
  try {
    await migrateLatest(db);
    const bases: string[] = [];
    for (let n = 0; n < (opts.processes ?? 1); n++) {
      const port = await freePort(8280 + n * 10);
      // Every process shares the database and the secrets file, as N instances behind a proxy do.
      servers.push(
        spawn(process.execPath, ['--import', 'tsx', 'tests/e2e/support/serve.ts'], {
          cwd: root,
          stdio: ['ignore', 'ignore', 'inherit'],
          env: { ...process.env, NODE_ENV: 'test', DATABASE_URL: url, PORT: String(port), CW_SECRETS_FILE: path.join(tmp, 'secrets.json'), CW_STATIC_DIR: path.join(tmp, 'dist'), CW_DB_POOL: '20', CW_SIGN_IN_ATTEMPTS: '1000' },
        }),
      );
      const base = `http://127.0.0.1:${port}`;
      for (let i = 0; i < 120; i++) {
        if (await fetch(`${base}/api/health`).then((r) => r.ok).catch(() => false)) break;
        await new Promise((r) => setTimeout(r, 500));
      }
      bases.push(base);
    }
    return await run(bases, db, tmp);
  } finally {
    for (const server of servers) server.kill('SIGTERM');
    await db.destroy();
    stopCluster(dataDir);
    rmSync(tmp, { recursive: true, force: true });
  }
}

if (want('load')) {
  const seconds = Number(process.env.CW_BENCH_SECONDS ?? 30);
  await withServer(async ([base], db) => {
    console.log('[bench] L1: sync load, 20 clients, batches of 50, one API process...');
    results.syncLoad = await syncLoad([base!], db, { clients: 20, batch: 50, seconds });
    console.log(results.syncLoad);
    console.log('[bench] L2: completion log on 100,000 rows...');
    results.completionLog = await completionLog(base!, db, { rows: 100_000, samples: 200 });
    console.log(results.completionLog);
  });
  await withServer(
    async (bases, db) => {
      console.log('[bench] L1: sync load, 20 clients, batches of 50, two API processes on one database...');
      results.syncLoadTwoProcesses = await syncLoad(bases, db, { clients: 20, batch: 50, seconds });
      console.log(results.syncLoadTwoProcesses);
    },
    { processes: 2 },
  );
}

if (want('browser')) {
  const { benchBrowser } = await import('../benchmarks/browser');
  ensureChromium();
  results.browser = await withServer(([base]) => benchBrowser(base!), { build: true });
  console.log(JSON.stringify(results.browser, null, 2));
}

writeFileSync(outFile, `${JSON.stringify(results, null, 2)}\n`);
console.log(`[bench] written to ${path.relative(root, outFile)}`);
