import { defineConfig, devices } from '@playwright/test';
import { CHROMIUM, CHROMIUM_ARGS, E2E_PORT as PORT } from './tests/e2e/harness/chromium';

export default defineConfig({
  testDir: 'tests/e2e',
  testMatch: '**/*.spec.ts',
  globalTeardown: './tests/e2e/harness/server-log-check.ts',
  timeout: 60_000,
  expect: { timeout: 10_000 },
  fullyParallel: false,
  workers: 1,
  retries: 0,
  reporter: [['list'], ['json', { outputFile: 'test-results/e2e.json' }]],
  outputDir: 'test-results/e2e-artifacts',
  use: {
    baseURL: `http://localhost:${PORT}`,
    browserName: 'chromium',
    launchOptions: {
      executablePath: CHROMIUM,
      args: [...CHROMIUM_ARGS],
    },
    trace: 'off',
    screenshot: 'only-on-failure',
  },
  projects: [
    { name: 'desktop', use: { viewport: { width: 1366, height: 800 } }, testIgnore: '**/*.tablet.spec.ts' },
    {
      name: 'tablet',
      use: { ...devices['Galaxy Tab S4 landscape'], browserName: 'chromium', viewport: { width: 1024, height: 768 } },
      testMatch: '**/*.tablet.spec.ts',
    },
  ],
  webServer: {
    // A fresh database per run; the demo seed gives every role its sign-in.
    // Its log (pino JSON lines) is kept beside the database; the teardown fails the run on any 5xx answer.
    command: `rm -rf test-results/e2e-db-${PORT} && mkdir -p test-results/e2e-db-${PORT} && node --import tsx server/main.ts 2>&1 | tee test-results/e2e-db-${PORT}/server.log`,
    url: `http://localhost:${PORT}/api/health`,
    reuseExistingServer: false,
    timeout: 120_000,
    env: { PORT: String(PORT), DATABASE_FILE: `test-results/e2e-db-${PORT}/aislewright.sqlite`, LOG_LEVEL: 'warn', PUBLIC_URL: `http://localhost:${PORT}` },
    // E2E_SERVER_LOG=1 also shows the server's log in the output.
    stdout: process.env.E2E_SERVER_LOG ? 'pipe' : 'ignore',
    stderr: 'pipe',
  },
});
