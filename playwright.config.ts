import { defineConfig } from '@playwright/test';

const port = 3100;

export default defineConfig({
  testDir: 'tests/e2e',
  timeout: 60_000,
  expect: { timeout: 10_000 },
  fullyParallel: false,
  workers: 1,
  retries: 0,
  reporter: [['list']],
  use: {
    baseURL: `http://localhost:${port}`,
    trace: 'retain-on-failure',
    screenshot: 'only-on-failure',
    launchOptions: {
      executablePath: process.env.CHROMIUM_PATH || '/usr/bin/chromium',
      args: ['--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
    },
  },
  webServer: {
    command: `npx next start -p ${port}`,
    url: `http://localhost:${port}/signin`,
    reuseExistingServer: false,
    timeout: 120_000,
    env: { ...process.env, OUTBOX_INTERVAL_MS: '500' } as Record<string, string>,
  },
});
