/**
 * `npm test`: every check, against a throw-away Postgres cluster of its own (a temporary
 * folder, a free port above 55432, fsync off), so a running `npm start` is not disturbed.
 * Steps: type-check, lint, unit, API, client build, browser tests. The cluster is stopped
 * and removed whatever the outcome. `npm test -- unit api` runs only the steps named;
 * other words filter test files (`npm test -- e2e bench-offline`).
 */
import { spawnSync } from 'node:child_process';
import { chmodSync, mkdtempSync, rmSync } from 'node:fs';
import path from 'node:path';
import { ensureChromium } from './lib/chromium';
import { ensureDatabase, freePort, startCluster, stopCluster, type Cluster } from './lib/postgres';
import { createDb, migrateLatest } from '../server/db';

const root = path.resolve(import.meta.dirname, '..');
const all = ['typecheck', 'lint', 'unit', 'api', 'e2e'] as const;
type Step = (typeof all)[number];
const asked = process.argv.slice(2).filter((a): a is Step => (all as readonly string[]).includes(a));
const steps: readonly Step[] = asked.length ? asked : all;
/** Anything else names test files: `npm test -- e2e bench-offline` runs that spec only. */
const filters = process.argv.slice(2).filter((a) => !(all as readonly string[]).includes(a));

const tmp = mkdtempSync('/tmp/corewright-test-');
chmodSync(tmp, 0o755); // the postgres OS user must reach the cluster folder
const dataDir = path.join(tmp, 'pg');
let cluster: Cluster | undefined;

function cleanup(): void {
  if (cluster) stopCluster(dataDir);
  rmSync(tmp, { recursive: true, force: true });
}
for (const sig of ['SIGINT', 'SIGTERM', 'SIGHUP'] as const) {
  process.on(sig, () => {
    cleanup();
    process.exit(130);
  });
}

function run(name: string, cmd: string, args: string[], env: NodeJS.ProcessEnv = {}): boolean {
  console.log(`\n=== ${name}: ${cmd} ${args.join(' ')}`);
  const started = Date.now();
  const res = spawnSync(cmd, args, { cwd: root, stdio: 'inherit', env: { ...process.env, ...env } });
  const ok = res.status === 0;
  console.log(`=== ${name}: ${ok ? 'passed' : `FAILED (exit ${res.status ?? res.signal})`} in ${((Date.now() - started) / 1000).toFixed(1)} s`);
  return ok;
}

async function freshDatabase(name: string): Promise<string> {
  const url = await ensureDatabase(cluster!, name);
  const db = createDb(url);
  try {
    await migrateLatest(db);
  } finally {
    await db.destroy();
  }
  return url;
}

const results: { step: string; ok: boolean }[] = [];
try {
  const needsDb = steps.includes('api') || steps.includes('e2e');
  const base = { NODE_ENV: 'test', CW_SECRETS_FILE: path.join(tmp, 'secrets.json'), PLAYWRIGHT_SKIP_BROWSER_DOWNLOAD: '1' };
  if (needsDb) cluster = startCluster({ dataDir, port: await freePort(55432), fast: true });
  if (steps.includes('typecheck')) {
    // package.json says what each covers (vue-tsc over everything, then tsc over the DOM-free shared/), so the two never drift.
    results.push({ step: 'typecheck', ok: run('typecheck', 'npm', ['run', '--silent', 'typecheck']) });
  }
  if (steps.includes('lint')) results.push({ step: 'lint', ok: run('lint', 'npm', ['run', '--silent', 'lint']) });
  if (steps.includes('unit')) results.push({ step: 'unit', ok: run('unit', 'npx', ['vitest', 'run', '--project', 'unit', ...filters], base) });
  if (steps.includes('api')) {
    const url = await freshDatabase('corewright_api');
    results.push({ step: 'api', ok: run('api', 'npx', ['vitest', 'run', '--project', 'api', ...filters], { ...base, DATABASE_URL: url, CW_CLUSTER_URL: cluster!.url }) });
  }
  if (steps.includes('e2e')) {
    ensureChromium();
    const outDir = path.join(tmp, 'dist');
    const built = run('client build', 'npx', ['vite', 'build', '--outDir', outDir, '--emptyOutDir', '--logLevel', 'warn']);
    const url = await freshDatabase('corewright_e2e');
    const env = { ...base, DATABASE_URL: url, CW_CLUSTER_URL: cluster!.url, CW_STATIC_DIR: outDir, CW_TMP: tmp, PORT: String(await freePort(8180)) };
    results.push({ step: 'e2e', ok: built && run('e2e', 'npx', ['playwright', 'test', ...filters], env) });
  }
} catch (err) {
  console.error('[test]', (err as Error).stack ?? err);
  results.push({ step: 'setup', ok: false });
} finally {
  cleanup();
}
const failed = results.filter((r) => !r.ok);
console.log(`\nCorewright checks: ${results.map((r) => `${r.step} ${r.ok ? 'ok' : 'FAILED'}`).join(', ')}`);
process.exit(failed.length ? 1 : 0);
