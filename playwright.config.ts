import { defineConfig } from '@playwright/test';

// `npm test` sets PORT, DATABASE_URL and CW_STATIC_DIR (a throw-away database and build).
const port = Number(process.env.PORT ?? 8180);

export default defineConfig({
  testDir: 'tests/e2e',
  outputDir: 'test-results/e2e',
  fullyParallel: false,
  workers: 1,
  retries: 0,
  timeout: 45_000,
  expect: { timeout: 10_000 },
  reporter: [['list']],
  use: {
    baseURL: `http://127.0.0.1:${port}`,
    viewport: { width: 1280, height: 800 },
    serviceWorkers: 'allow',
    testIdAttribute: 'data-test',
    launchOptions: {
      executablePath: process.env.CW_CHROMIUM ?? '/usr/bin/chromium',
      args: ['--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run', '--disable-quic'],
    },
  },
  webServer: {
    command: 'node --import tsx tests/e2e/support/serve.ts',
    url: `http://127.0.0.1:${port}/api/health`,
    reuseExistingServer: false,
    timeout: 120_000,
    stdout: 'pipe',
    stderr: 'pipe',
  },
});
