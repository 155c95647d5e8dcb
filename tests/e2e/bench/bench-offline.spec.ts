// The technician's offline Bench, for real: Chromium, the service worker, IndexedDB, the
// server process stopped and started. Cases S4 (in the browser), S7, S8, S12, A9 of
// ../shared/design/reliability.md; the flow follows the keying primer's bench procedure.
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import path from 'node:path';
import { chromium, expect, test, type BrowserContext, type Page } from '@playwright/test';
import { loadWithKeys as loadWithKeysOn, passAll as passAllOn } from '../support/bench';
import { ownServer, type OwnServer } from '../support/ownServer';
import { freshDemo } from '../support/freshDemo';

test.beforeAll(freshDemo);

const PASS = 'brass slate paper teal';
const sizes = [
  { width: 1280, height: 800 },
  { width: 800, height: 1280 },
];
let server: OwnServer;
let ctx: BrowserContext;
let page: Page;
let profileDir: string;
const shots = new Set<string>();

/** One screenshot of each kind of Bench step, at both tablet sizes. */
async function shot(kind: string): Promise<void> {
  if (shots.has(kind)) return;
  shots.add(kind);
  for (const size of sizes) {
    await page.setViewportSize(size);
    await page.waitForTimeout(150);
    await page.screenshot({ path: `test-results/screenshots/bench-${kind}-${size.width}x${size.height}.png` });
  }
  await page.setViewportSize(sizes[0]!);
}

async function apiAs(email: string) {
  const r = await fetch(`${server.base}/api/auth/sign-in`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email, password: 'corewright-demo' }) });
  const { accessToken } = (await r.json()) as { accessToken: string };
  return async (p: string) => (await fetch(server.base + p, { headers: { authorization: `Bearer ${accessToken}` } })).json();
}

async function unlock(passphrase = PASS): Promise<void> {
  await expect(page).toHaveURL(/\/unlock/);
  await page.getByTestId('passphrase').fill(passphrase);
  await page.getByTestId('unlock').click();
}

async function waiting(n: number): Promise<void> {
  await expect(page.getByTestId('outbox-status')).toContainText(`${n} waiting`, { timeout: 20_000 });
}

const loadWithKeys = () => loadWithKeysOn(page, shot);
const passAll = (phase: string) => passAllOn(page, () => shot(`key-check-${phase}`));

test.describe.configure({ mode: 'serial' });

test.beforeAll(async () => {
  server = await ownServer();
  await server.start();
  profileDir = mkdtempSync('/tmp/corewright-e2e-profile-');
  ctx = await chromium.launchPersistentContext(profileDir, {
    executablePath: process.env.CW_CHROMIUM ?? '/usr/bin/chromium',
    args: ['--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run', '--disable-quic'],
    baseURL: server.base,
    viewport: sizes[0],
    serviceWorkers: 'allow',
  });
  page = ctx.pages()[0] ?? (await ctx.newPage());
});

test.afterAll(async () => {
  await ctx?.close();
  await server?.kill();
  rmSync(profileDir, { recursive: true, force: true });
});

test('keep a work order, go offline, reload, and build a core with the keyboard: fail a check, rebuild, cap, finish, install', async () => {
  test.setTimeout(180_000);
  await page.goto('/sign-in');
  await page.getByTestId('email').fill('tech@demo.corewright.test');
  await page.getByTestId('password').fill('corewright-demo');
  await page.getByTestId('sign-in').click();
  // first use: a passphrase, not a PIN
  await page.getByTestId('passphrase').fill('123456');
  await page.getByTestId('passphrase-confirm').fill('123456');
  await page.getByTestId('setup').click();
  await expect(page.getByTestId('unlock-error')).toBeVisible();
  await page.getByTestId('passphrase').fill(PASS);
  await page.getByTestId('passphrase-confirm').fill(PASS);
  await page.getByTestId('setup').click();
  await expect(page).toHaveURL(/\/bench$/);
  await page.getByTestId('keep-3').click();
  await expect(page.getByTestId('wo-3-offline')).toContainText('On this tablet');
  await page.evaluate(async () => (await navigator.serviceWorker.ready).active?.state);

  // The basement: no network, then a reload of the whole app.
  await ctx.setOffline(true);
  await page.reload();
  await unlock();
  await expect(page.getByTestId('connection')).toContainText('Offline');
  await expect(page.getByTestId('wo-3-offline')).toContainText('On this tablet');
  await page.getByTestId('open-3').click();
  await shot('work-order');
  const firstCore = page.locator('[data-test^="core-CR-"][data-test$="-status"]').first();
  const tag = (await page.locator('[data-test^="core-CR-"]').first().getAttribute('data-test'))!.replace('core-', '');
  await page.getByTestId(`core-${tag}`).click();
  await expect(page.getByTestId('core-tag')).toHaveText(tag);

  // Attempt 1: load, then the change key fails the Key check.
  const steps = await loadWithKeys();
  expect(steps).toBeGreaterThan(7 * 2);
  await shot('key-check-before-cap');
  await page.keyboard.press('f');
  await expect(page.getByTestId('failure-dialog')).toBeVisible();
  await shot('failure-dialog');
  await page.getByTestId('failure-dialog').getByRole('radio').first().focus();
  await page.keyboard.press('Space');
  await page.getByTestId('failure-confirm').focus();
  await page.keyboard.press('Enter');
  await expect(page.getByTestId('rebuild')).toBeVisible();
  await shot('rebuild');

  // Attempt 2: rebuild, check, cap, check again.
  await page.keyboard.press('Space');
  await loadWithKeys();
  await passAll('before-cap');
  await expect(page.getByTestId('step-part')).toContainText(/cap/i);
  await shot('caps');
  await page.keyboard.press('Space');
  await passAll('after-cap');
  await expect(page.getByTestId('done')).toBeVisible();
  await shot('done');
  await waiting(1); // the completion went into the outbox at once

  // Install at the door, still offline.
  await page.keyboard.press('Space');
  await expect(page.getByTestId('confirm-install')).toBeEnabled();
  // The door has no core on record (T4: only the core on record can be named as removed), so the field stays empty.
  await expect(page.getByTestId('removed-tag')).toHaveValue('');
  await shot('install');
  await page.getByTestId('confirm-install').click();
  await expect(page.getByTestId(`core-${tag}-status`)).toContainText('Installed');
  await waiting(2);
  expect(firstCore).toBeTruthy();

  // A shift's reload and a browser-style restart of the page keep both records (S8).
  await page.reload();
  await unlock();
  await waiting(2);
});

test('back online with the server stopped, then started: sync lands exactly one completion and one install; a replay changes nothing', async () => {
  test.setTimeout(120_000);
  const bodies: string[] = [];
  page.on('request', (r) => {
    if (r.url().endsWith('/api/sync') && r.method() === 'POST') bodies.push(r.postData() ?? '');
  });
  await server.kill();
  await ctx.setOffline(false);
  await page.getByTestId('outbox-status').click();
  await page.getByTestId('sync-now').click();
  await page.keyboard.press('Escape');
  await waiting(2); // the server is gone: nothing is dropped (S7)

  // The server dies mid-request: the request never gets its answer.
  await server.start();
  let killed = false;
  await page.route('**/api/sync', async (route) => {
    if (!killed) {
      killed = true;
      await server.kill();
    }
    // The kill can land while the request is under way: then the route is already settled.
    await route.continue().catch(() => route.abort('connectionreset').catch(() => undefined));
  });
  await page.getByTestId('outbox-status').click();
  await page.getByTestId('sync-now').click();
  await page.keyboard.press('Escape');
  await waiting(2);
  await page.unroute('**/api/sync');
  await server.start();

  await page.getByTestId('outbox-status').click();
  await page.getByTestId('sync-now').click();
  await page.keyboard.press('Escape');
  await waiting(0);

  const api = await apiAs('lead@demo.corewright.test');
  const wo = (await api('/api/work-orders')).workOrders.find((w: { number: number }) => w.number === 3);
  const log = await api(`/api/completions?workOrderId=${wo.id}`);
  expect(log.total).toBe(1);
  expect(log.rows[0]).toMatchObject({ result: 'passed', attemptCount: 2, failedChecks: 1, technicianName: 'Robin Tech (demo)' });
  const detail = await api(`/api/completions/${log.rows[0].id}`);
  expect(detail.completion.install).toMatchObject({ removedCoreTag: null, doorMismatch: false });

  // Replay what the tablet sent: every record is a duplicate, nothing new is stored.
  const tech = await fetch(`${server.base}/api/auth/sign-in`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email: 'tech@demo.corewright.test', password: 'corewright-demo' }) }).then((r) => r.json());
  const last = bodies.at(-1)!;
  const replay = await fetch(`${server.base}/api/sync`, { method: 'POST', headers: { 'content-type': 'application/json', authorization: `Bearer ${tech.accessToken}` }, body: last }).then((r) => r.json());
  expect(replay.accepted).toEqual([]);
  expect(replay.duplicates).toHaveLength(JSON.parse(last).records.length);
  expect((await api(`/api/completions?workOrderId=${wo.id}`)).total).toBe(1);
});

test('five wrong passphrases wipe the packets, but the finished core still lands after a fresh sign-in', async () => {
  test.setTimeout(180_000);
  await page.goto('/bench');
  await unlock(); // a full page load drops the key from memory
  await page.getByTestId('open-3').click();
  const second = page.locator('[data-test^="core-CR-"]:not([data-test$="-status"])').nth(1);
  await second.click();
  await loadWithKeys();
  await passAll('before-cap');
  await page.keyboard.press('Space');
  // Offline before the core is finished: online, a finished core syncs at once.
  await ctx.setOffline(true);
  await passAll('after-cap');
  await expect(page.getByTestId('done')).toBeVisible();
  await waiting(1);
  await page.reload();
  for (let i = 0; i < 5; i++) {
    await page.getByTestId('passphrase').fill(`wrong guess number ${i}`);
    await page.getByTestId('unlock').click();
    await page.waitForTimeout(400);
  }
  await expect(page.getByTestId('unlock-wiped')).toBeVisible({ timeout: 20_000 });
  await shot('wiped');
  await ctx.setOffline(false);
  // the lockout also signed the tablet out: sign in, choose a new passphrase, and the outbox is recovered
  await page.goto('/sign-in');
  await page.getByTestId('email').fill('tech@demo.corewright.test');
  await page.getByTestId('password').fill('corewright-demo');
  await page.getByTestId('sign-in').click();
  await page.getByTestId('passphrase').fill('a new shift passphrase');
  await page.getByTestId('passphrase-confirm').fill('a new shift passphrase');
  await page.getByTestId('setup').click();
  await waiting(0);
  const api = await apiAs('lead@demo.corewright.test');
  const wo = (await api('/api/work-orders')).workOrders.find((w: { number: number }) => w.number === 3);
  expect((await api(`/api/completions?workOrderId=${wo.id}`)).total).toBe(2);
  // the packets were wiped: the work order must be kept again
  await page.goto('/bench');
  await unlock('a new shift passphrase');
  await expect(page.getByTestId('wo-3-offline')).toContainText('Not on this tablet');
});

test('A9: the browser profile read raw holds none of the demo bittings in plain text', async () => {
  await page.getByTestId('keep-3').click();
  await expect(page.getByTestId('wo-3-offline')).toContainText('On this tablet');
  await ctx.close();
  // Bittings of the invented demo system (server/seed/demo.ts): the grand master and masters.
  const bittings = ['4628462', '2428462', '2828462', '6428462', '6828462', '7351735'];
  const dirs = ['Default/IndexedDB', 'Default/Service Worker/CacheStorage'].map((d) => path.join(profileDir, d));
  const grep = (text: string) => spawnSync('grep', ['-r', '-l', '-a', text, ...dirs], { encoding: 'utf8' }).stdout.trim();
  // the control case: the read reaches the stored records (their keys are plain; their values are not)
  expect(grep('packet:')).not.toBe('');
  for (const b of bittings) expect(grep(b), `bitting ${b} in plain text`).toBe('');
});
