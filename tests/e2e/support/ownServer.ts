/**
 * A server process of the spec's own, so a test can stop it (the basement case: the server
 * is gone, not just the network) and start it again on the same port and database.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { createServer } from 'node:net';
import path from 'node:path';

const root = path.resolve(import.meta.dirname, '../../..');

async function freePort(): Promise<number> {
  return new Promise((resolve) => {
    const s = createServer();
    s.listen(0, '127.0.0.1', () => {
      const port = (s.address() as { port: number }).port;
      s.close(() => resolve(port));
    });
  });
}

export interface OwnServer {
  base: string;
  start(): Promise<void>;
  kill(): Promise<void>;
}

export async function ownServer(): Promise<OwnServer> {
  const port = await freePort();
  const base = `http://127.0.0.1:${port}`;
  let child: ChildProcess | null = null;
  const kill = async () => {
    if (!child || child.exitCode !== null) return;
    const exited = new Promise((r) => child!.once('exit', r));
    child.kill('SIGKILL');
    await exited;
    child = null;
  };
  process.once('exit', () => child?.kill('SIGKILL'));
  return {
    base,
    kill,
    async start() {
      await kill();
      child = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], { cwd: root, env: { ...process.env, PORT: String(port), CW_SIGN_IN_ATTEMPTS: '50' }, stdio: 'ignore' });
      for (let i = 0; i < 120; i++) {
        if (await fetch(`${base}/api/health`).then((r) => r.ok).catch(() => false)) return;
        await new Promise((r) => setTimeout(r, 250));
      }
      throw new Error('the spec server did not start');
    },
  };
}
