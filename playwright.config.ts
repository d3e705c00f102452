import { defineConfig } from '@playwright/test';

// Ports can be moved (E2E_PORT) so two checkouts can run their browser suites side by side.
const port = Number(process.env.E2E_PORT ?? 3100);
const securePort = port + 1;
process.env.E2E_SECURE_URL ??= `http://localhost:${securePort}`;
// The learning-platform stand-in (tests/e2e/lti.spec.ts); scripts/e2e.sh seeds its registration with this address.
const platformPort = Number(process.env.E2E_PLATFORM_PORT ?? port + 50);
process.env.E2E_PLATFORM_URL ??= `http://127.0.0.1:${platformPort}`;

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
      args: [
        '--no-sandbox',
        '--disable-gpu',
        '--disable-quic',
        '--no-first-run',
        '--disable-background-networking',
        '--disable-component-update',
        '--disable-sync',
      ],
    },
  },
  webServer: [
    {
      command: `npx next start -p ${port}`,
      url: `http://localhost:${port}/signin`,
      reuseExistingServer: false,
      timeout: 120_000,
      env: { ...process.env, OUTBOX_INTERVAL_MS: '500' } as Record<string, string>,
    },
    {
      // The same build and database with an https public URL, as in production behind TLS: next-auth
      // then issues __Secure-/__Host- cookies with the Secure flag (tests/e2e/security.spec.ts).
      // Mail is left to the first server's worker. Uploads stalled for 2 s are cut off here, so the
      // slow-upload test need not wait the default 30 s.
      command: `npx next start -p ${securePort}`,
      url: `http://localhost:${securePort}/signin`,
      reuseExistingServer: false,
      timeout: 120_000,
      env: { ...process.env, NEXTAUTH_URL: `https://localhost:${securePort}`, OUTBOX_WORKER: 'off', UPLOAD_IDLE_MS: '2000' } as Record<
        string,
        string
      >,
    },
    {
      // A learning platform on loopback in its own process, for launches into the first server.
      command: 'node --import tsx scripts/fake-platform.ts',
      url: `http://127.0.0.1:${platformPort}/health`,
      reuseExistingServer: false,
      timeout: 60_000,
      env: {
        ...process.env,
        FAKE_PLATFORM_PORT: String(platformPort),
        OSCILLAB_URL: `http://localhost:${port}`,
        FAKE_PLATFORM_STATE: '',
      } as Record<string, string>,
    },
  ],
});
