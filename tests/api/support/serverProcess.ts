/**
 * The real server (server/index.ts) as a child process, for tests that kill it: start it on a
 * free loopback port, wait for /api/health to say ok, SIGKILL it, start it again on the same
 * port (the tablet keeps one address). Every wait is bounded, and no child outlives the test
 * process: kill() in afterAll, a synchronous SIGKILL on process 'exit', and a guard loaded into
 * the child that ends it when its stdin closes, which happens when the test process dies even
 * by SIGKILL (common practice: a pipe to the parent as a liveness signal).
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { createServer } from 'node:net';
import path from 'node:path';

const root = path.resolve(import.meta.dirname, '..', '..', '..');

/** Loaded with --import before the server: the parent's end of stdin closing ends the child at once. */
const orphanGuard = `data:text/javascript,${encodeURIComponent("process.stdin.on('end',()=>process.kill(process.pid,'SIGKILL'));process.stdin.on('error',()=>{});process.stdin.resume();")}`;

const live = new Set<ChildProcess>();
let exitHookInstalled = false;
function installExitHook(): void {
  if (exitHookInstalled) return;
  exitHookInstalled = true;
  // 'exit' handlers must be synchronous: a signal is all that can be sent here.
  process.on('exit', () => {
    for (const child of live) child.kill('SIGKILL');
  });
}

/** A port the kernel says is free on 127.0.0.1 (listen on 0, read it, close). */
export async function freeLoopbackPort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const srv = createServer();
    srv.once('error', reject);
    srv.listen(0, '127.0.0.1', () => {
      const addr = srv.address();
      const port = typeof addr === 'object' && addr ? addr.port : 0;
      srv.close(() => (port ? resolve(port) : reject(new Error('no port from the kernel'))));
    });
  });
}

export interface ServerProcessOptions {
  /** Added to the inherited environment (which carries DATABASE_URL and CW_SECRETS_FILE under `npm test`). */
  env?: Record<string, string>;
  /** How long one start may take before it fails, ms. */
  readyTimeoutMs?: number;
  /** How long a SIGKILLed child may take to be reaped, ms. */
  exitTimeoutMs?: number;
  /** When a start counts as ready: /api/health says ok (default), or /api/health answers at all (a server whose database is down). */
  ready?: 'healthy' | 'answering';
}

export interface ServerProcess {
  readonly port: number;
  readonly base: string;
  /** true from spawn until the child has exited. */
  readonly running: boolean;
  /** The child's process id while it runs. */
  readonly pid: number | undefined;
  /** Completed starts so far. */
  readonly starts: number;
  /** Spawns the server and resolves once /api/health answers status ok (or, with ready 'answering', answers); rejects (and kills) on timeout or early exit. */
  start(): Promise<void>;
  /** SIGKILL now (synchronously), then resolves once the child has exited. A no-op when not running. */
  kill(): Promise<void>;
  /** The last few KB of the child's stdout and stderr, for failure messages. */
  output(): string;
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** The promise, or an error once ms have passed (the timer cleared either way). */
async function within<T>(promise: Promise<T>, ms: number, message: () => string): Promise<T> {
  let timer: NodeJS.Timeout | undefined;
  try {
    return await Promise.race([promise, new Promise<never>((_, reject) => (timer = setTimeout(() => reject(new Error(message())), ms)))]);
  } finally {
    clearTimeout(timer);
  }
}

export async function serverProcess(opts: ServerProcessOptions = {}): Promise<ServerProcess> {
  installExitHook();
  const port = await freeLoopbackPort();
  const base = `http://127.0.0.1:${port}`;
  const readyTimeoutMs = opts.readyTimeoutMs ?? 60_000; // a cold tsx start on a loaded 2-core machine takes up to ~20 s
  const exitTimeoutMs = opts.exitTimeoutMs ?? 5_000;
  let child: ChildProcess | undefined;
  let exited: Promise<void> = Promise.resolve();
  let starts = 0;
  let log = '';
  const keep = (chunk: Buffer) => {
    log = (log + chunk.toString('utf8')).slice(-8_000);
  };

  function kill(): Promise<void> {
    const c = child;
    if (!c) return Promise.resolve();
    c.kill('SIGKILL');
    return within(exited, exitTimeoutMs, () => `server pid ${c.pid} still running ${exitTimeoutMs} ms after SIGKILL`);
  }

  async function start(): Promise<void> {
    if (child) throw new Error('server process already running; kill() it first');
    const c = spawn(process.execPath, ['--import', orphanGuard, '--import', 'tsx', 'server/index.ts'], {
      cwd: root,
      env: { ...process.env, NODE_ENV: process.env.NODE_ENV ?? 'test', ...opts.env, PORT: String(port), HOST: '127.0.0.1', CW_STATIC_DIR: '' },
      stdio: ['pipe', 'pipe', 'pipe'],
    });
    child = c;
    live.add(c);
    let gone = false;
    exited = new Promise<void>((resolve) => {
      c.once('exit', () => {
        gone = true;
        live.delete(c);
        if (child === c) child = undefined;
        resolve();
      });
    });
    c.once('error', (err) => keep(Buffer.from(`[spawn] ${err.message}\n`)));
    c.stdout.on('data', keep);
    c.stderr.on('data', keep);

    const deadline = Date.now() + readyTimeoutMs;
    while (Date.now() < deadline) {
      if (gone) throw new Error(`server exited before it was ready:\n${log}`);
      try {
        const res = await fetch(`${base}/api/health`, { signal: AbortSignal.timeout(1_000) });
        const body = (await res.json()) as { status?: string };
        if ((res.status === 200 && body.status === 'ok') || (opts.ready === 'answering' && typeof body.status === 'string')) {
          starts++;
          return;
        }
      } catch {
        // not listening yet
      }
      await sleep(50);
    }
    await kill();
    throw new Error(`server not healthy on ${base} within ${readyTimeoutMs} ms:\n${log}`);
  }

  return {
    port,
    base,
    get running() {
      return child !== undefined;
    },
    get pid() {
      return child?.pid;
    },
    get starts() {
      return starts;
    },
    start,
    kill,
    output: () => log,
  };
}
