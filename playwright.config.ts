import { defineConfig } from '@playwright/test'

// End-to-end journeys against the real server (started by scripts/test.sh; no webServer here).
export default defineConfig({
  testDir: './e2e',
  outputDir: 'e2e/output/results',
  workers: 1,
  fullyParallel: false,
  retries: 0,
  // Generous: CI machines are small (2 cores) and a journey signs in several times.
  timeout: 90_000,
  expect: { timeout: 10_000 },
  reporter: 'list',
  use: {
    baseURL: process.env.E2E_BASE_URL ?? 'http://127.0.0.1:3000',
    browserName: 'chromium',
    viewport: { width: 1440, height: 900 },
    trace: 'retain-on-failure',
    screenshot: 'only-on-failure',
    launchOptions: {
      executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
      args: [
        '--no-sandbox',
        '--disable-gpu',
        '--disable-dev-shm-usage',
        '--disable-background-networking',
        '--disable-component-update',
        '--disable-sync',
        '--disable-quic',
        '--no-first-run',
      ],
    },
  },
})
