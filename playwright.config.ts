import os from 'node:os';
import path from 'node:path';
import { defineConfig } from '@playwright/test';

/**
 * Browser tests in Debian's Chromium against the built app, started on a spare port with a
 * throw-away database (seeded with the demo). `npm test` builds the client first.
 */
const port = Number(process.env.E2E_PORT ?? 3987);
process.env.E2E_DB ??= path.join(os.tmpdir(), `panelwise-e2e-${Date.now()}.db`);

export default defineConfig({
  testDir: 'tests/e2e',
  outputDir: 'test-results/e2e',
  fullyParallel: false,
  workers: 1,
  retries: 0,
  timeout: 60_000,
  reporter: [['list']],
  use: {
    baseURL: `http://localhost:${port}`,
    screenshot: 'only-on-failure',
    trace: 'retain-on-failure',
    launchOptions: {
      executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
      args: [
        '--headless',
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
  webServer: {
    command: 'node --import tsx server/main.ts',
    url: `http://localhost:${port}/api/health`,
    reuseExistingServer: false,
    timeout: 120_000,
    env: { PORT: String(port), DATABASE_PATH: process.env.E2E_DB, NODE_ENV: 'test', LOG_LEVEL: 'warn' },
  },
});
