/**
 * Browser tests on Debian's Chromium (never a downloaded browser). The config starts its own Gloss
 * server: the web app is built, then serve-demo.ts runs the real server on a fresh PGlite folder with
 * the demo study seeded. Without /usr/bin/chromium the suite is skipped on a laptop and fails in CI.
 */
import { existsSync } from 'node:fs';
import { defineConfig } from '@playwright/test';

// GLOSS_CHROMIUM only lets the skip path itself be tried; the project's browser is Debian's.
export const CHROMIUM = process.env.GLOSS_CHROMIUM ?? '/usr/bin/chromium';
const haveChromium = existsSync(CHROMIUM);
if (!haveChromium && !process.env.CI) {
  process.stderr.write(`browser tests skipped: ${CHROMIUM} is absent (install it with: apt-get install -y chromium)\n`);
}

// One port per run, chosen in the runner and passed to workers through the environment.
process.env.GLOSS_E2E_PORT ??= String(20000 + Math.floor(Math.random() * 20000));
const port = Number(process.env.GLOSS_E2E_PORT);

export default defineConfig({
  testDir: '.',
  // Without Chromium (and outside CI) only a notice runs: one skipped test saying why.
  testMatch: haveChromium || process.env.CI ? '*.spec.ts' : 'no-chromium.notice.ts',
  outputDir: '../../test-results/e2e',
  timeout: 60_000,
  expect: { timeout: 10_000 },
  fullyParallel: false,
  workers: 1,
  reporter: [['list']],
  use: {
    baseURL: `http://127.0.0.1:${port}`,
    launchOptions: {
      executablePath: CHROMIUM,
      args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
    },
    screenshot: 'only-on-failure',
    trace: 'off',
  },
  webServer: haveChromium || process.env.CI
    ? {
        // `node --import tsx` (not the tsx command, whose signal relay can orphan the server on a busy machine)
        command: `pnpm --filter @gloss/web build && node --import tsx test/e2e/serve-demo.ts`,
        cwd: '../..',
        url: `http://127.0.0.1:${port}/api/health`,
        env: { PORT: String(port) },
        timeout: 300_000, // build + demo seeding on PGlite: 30-60 s alone, several minutes on a loaded machine
        reuseExistingServer: false,
        stdout: 'pipe',
      }
    : undefined,
});
