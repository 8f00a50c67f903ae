import { defineConfig, devices } from '@playwright/test'

// End-to-end tests in Debian's Chromium (/usr/bin/chromium); Playwright's own browser downloads are not used.
const chromium = process.env.CHROMIUM_PATH || '/usr/bin/chromium'

export default defineConfig({
  testDir: 'tests/e2e',
  globalSetup: './tests/e2e/global-setup.ts',
  fullyParallel: false,
  workers: 1,
  retries: process.env.CI ? 1 : 0,
  timeout: 90_000, // generous: the suite runs on a shared 2-core machine; a test that hangs still fails
  expect: { timeout: 8_000 },
  reporter: process.env.CI ? [['list']] : [['list']],
  outputDir: 'test-results',
  use: {
    baseURL: process.env.E2E_BASE_URL,
    // Our users are a UK business and its households (the demo's locale and time zone).
    locale: 'en-GB',
    timezoneId: 'Europe/London',
    trace: 'retain-on-failure',
    // Request interception (page.route) does not see requests a service worker handles; the offline tests allow
    // the worker where they test it (tests/e2e/offline.spec.ts).
    serviceWorkers: 'block',
    screenshot: 'only-on-failure',
    launchOptions: {
      executablePath: chromium,
      args: ['--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--disable-dev-shm-usage'],
    },
  },
  projects: [
    { name: 'desktop', use: { ...devices['Desktop Chrome'], channel: undefined } },
  ],
})
