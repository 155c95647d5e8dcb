/**
 * `npm start`: the local demo. Starts the private Postgres cluster (.data/pg-dev), migrates,
 * seeds the demo data when the database is empty, builds the client, and serves API and PWA
 * on http://127.0.0.1:8080 (PORT overrides). Ctrl-C or SIGTERM stops everything it started.
 */
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import path from 'node:path';
import { clusterDir, ensureDatabase, startCluster, stopCluster } from './lib/postgres';
import { createDb, migrateLatest } from '../server/db';
import { isEmpty, seedDemo } from '../server/seed/demo';
import { loadConfig } from '../server/config';
import { createSealer } from '../server/services/secrets';

const root = path.resolve(import.meta.dirname, '..');
const port = Number(process.env.PORT ?? 8080);
const pgPort = Number(process.env.CW_PG_PORT ?? 54329);

const dataDir = clusterDir(root, 'pg-dev');
let server: ChildProcess | undefined;
let stopping = false;

function stopAll(code: number): void {
  if (stopping) return;
  stopping = true;
  const done = () => {
    stopCluster(dataDir);
    process.exit(code);
  };
  if (server && server.exitCode === null) {
    server.once('exit', done);
    server.kill('SIGTERM');
    setTimeout(() => {
      server?.kill('SIGKILL');
    }, 8000).unref();
  } else done();
}
process.on('SIGINT', () => stopAll(0));
process.on('SIGTERM', () => stopAll(0));
process.on('SIGHUP', () => stopAll(0));

try {
  const cluster = startCluster({ dataDir, port: pgPort });
  const databaseUrl = await ensureDatabase(cluster, 'corewright');
  const db = createDb(databaseUrl);
  const ran = await migrateLatest(db);
  console.log(`[start] migrations: ${ran.length ? ran.join(', ') : 'already current'}`);
  if (await isEmpty(db)) {
    await seedDemo(db, createSealer(loadConfig({ ...process.env, DATABASE_URL: databaseUrl }).dataKey));
    console.log('[start] demo data seeded');
  }
  await db.destroy();
  if (!process.argv.includes('--no-build')) {
    console.log('[start] building the client...');
    const build = spawnSync('npx', ['vite', 'build', '--logLevel', 'warn'], { cwd: root, stdio: 'inherit' });
    if (build.status !== 0) throw new Error('the client build failed');
  }
  const serverEnv = { ...process.env, DATABASE_URL: databaseUrl, PORT: String(port), NODE_ENV: process.env.NODE_ENV ?? 'development', CW_FAKE_SMTP: process.env.CW_FAKE_SMTP ?? '1' };
  // A server that stops on its own is started again; Postgres keeps running under it, so one
  // bad request can never take the database down with it. Only a crash loop gives up.
  const exits: number[] = [];
  const launch = () => {
    if (stopping) return;
    server = spawn(process.execPath, ['--import', 'tsx', path.join(root, 'server/index.ts')], { cwd: root, stdio: 'inherit', env: serverEnv });
    server.on('exit', (code, signal) => {
      if (stopping) return;
      const now = Date.now();
      exits.push(now);
      while (exits.length && exits[0]! < now - 60_000) exits.shift();
      if (exits.length >= 5) {
        console.error(`[start] the server stopped ${exits.length} times in a minute (last: ${signal ?? `exit ${code}`}); stopping`);
        stopAll(code ?? 1);
        return;
      }
      console.error(`[start] the server stopped (${signal ?? `exit ${code}`}); starting it again, Postgres stays up`);
      setTimeout(launch, 1000);
    });
  };
  launch();
  console.log(`\n  Corewright: http://127.0.0.1:${port}\n  Demo accounts (local demo only), password corewright-demo:\n    tech@demo.corewright.test  lead@demo.corewright.test  admin@demo.corewright.test\n  Ctrl-C stops the app and its database.\n`);
} catch (err) {
  console.error(`[start] ${(err as Error).message}`);
  stopAll(1);
}
