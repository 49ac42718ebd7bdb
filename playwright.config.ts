import { defineConfig, devices } from '@playwright/test';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';

const PORT = Number(process.env.E2E_PORT || 3917);
const baseURL = `http://127.0.0.1:${PORT}`;
const tmp = process.env.E2E_DATA_DIR || mkdtempSync(path.join(tmpdir(), 'ebbcast-e2e-'));
process.env.E2E_DATA_DIR = tmp;

export default defineConfig({
  testDir: 'tests/e2e',
  timeout: 90_000,
  expect: { timeout: 15_000 },
  fullyParallel: false,
  workers: 1,
  // One retry under CI (Playwright's own default config does the same): a test that passes only on
  // its retry is reported as flaky, by Playwright and on npm test's e2e line, not hidden.
  retries: process.env.CI ? 1 : 0,
  // npm test adds a JSON report for its closing count (scripts/test.mjs).
  reporter: process.env.PLAYWRIGHT_JSON_REPORT
    ? [['list'], ['json', { outputFile: process.env.PLAYWRIGHT_JSON_REPORT }]]
    : [['list']],
  outputDir: 'test-results',
  use: {
    baseURL,
    ...devices['Desktop Chrome'],
    viewport: { width: 1024, height: 768 },
    serviceWorkers: 'allow',
    launchOptions: {
      executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
      args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run',
        '--disable-background-networking', '--disable-component-update', '--disable-sync'],
    },
    trace: 'off',
    screenshot: 'only-on-failure',
  },
  webServer: {
    // The mail catcher runs beside the server and hands it SMTP_URL (scripts/mail-catcher.mjs).
    command: `node scripts/mail-catcher.mjs --dir ${path.join(tmp, 'mail')} -- node node_modules/next/dist/bin/next start -p ${PORT} -H 127.0.0.1`,
    url: `${baseURL}/api/health`,
    reuseExistingServer: false,
    timeout: 180_000,
    env: {
      NEXT_DIST_DIR: process.env.NEXT_DIST_DIR || '.next-test',
      NEXTAUTH_URL: baseURL,
      NEXTAUTH_SECRET: 'e2e-secret-not-for-production-0123456789',
      DATABASE_URL: `file:${path.join(tmp, 'e2e.sqlite')}`,
      EBBCAST_DATA_DIR: tmp,
      NEXT_TELEMETRY_DISABLED: '1',
    },
  },
});
