/** Debian's chromium for the browser tests: installed with apt-get when missing, never downloaded. */
import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';

export const CHROMIUM = process.env.CW_CHROMIUM ?? '/usr/bin/chromium';

export function ensureChromium(): void {
  if (existsSync(CHROMIUM)) return;
  const isRoot = process.getuid?.() === 0;
  const canApt = isRoot && spawnSync('sh', ['-c', 'command -v apt-get'], { stdio: 'ignore' }).status === 0;
  if (!canApt) throw new Error(`${CHROMIUM} is missing. Install Debian's browser with \`sudo apt-get install -y chromium\` and run the tests again.`);
  console.log('[chromium] missing: installing Debian package `chromium` (apt-get)...');
  const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' };
  execFileSync('apt-get', ['update', '-qq'], { stdio: 'inherit', env });
  execFileSync('apt-get', ['install', '-y', '-qq', 'chromium'], { stdio: 'inherit', env });
  if (!existsSync(CHROMIUM)) throw new Error(`apt-get installed chromium, but ${CHROMIUM} is still missing`);
}
