#!/usr/bin/env node
/**
 * `pnpm test`: the whole suite. Unit, integration and multi-node tests run in vitest; the browser
 * suite runs in Playwright on Debian's Chromium. Suites that need PostgreSQL or Redis run when
 * DATABASE_URL / REDIS_URL are set (CI sets both, and then they fail rather than skip); the browser
 * suite runs when /usr/bin/chromium exists or CI is set. Ends with one plain summary line.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync, rmSync } from 'node:fs';
import { resolve } from 'node:path';

// Absolute: Playwright resolves a relative report path against its config's folder, not ours.
const artifacts = resolve('.artifacts');
mkdirSync(artifacts, { recursive: true });
const env = { ...process.env };
const run = (cmd, args, extraEnv = {}) =>
  spawnSync(cmd, args, { stdio: 'inherit', env: { ...env, ...extraEnv }, shell: false }).status ?? 1;

const totals = { passed: 0, failed: 0, skipped: 0 };
let status = 0;

// 1. vitest: everything but the browser suite.
const vitestJson = `${artifacts}/vitest.json`;
rmSync(vitestJson, { force: true });
status ||= run('pnpm', ['exec', 'vitest', 'run', '--reporter=default', '--reporter=json', `--outputFile.json=${vitestJson}`]);
if (existsSync(vitestJson)) {
  const r = JSON.parse(readFileSync(vitestJson, 'utf8'));
  totals.passed += r.numPassedTests ?? 0;
  totals.failed += r.numFailedTests ?? 0;
  totals.skipped += (r.numPendingTests ?? 0) + (r.numTodoTests ?? 0);
} else status ||= 1;

// 2. Playwright in real Chromium.
const haveChromium = existsSync('/usr/bin/chromium');
if (haveChromium || process.env.CI) {
  const pwJson = `${artifacts}/playwright.json`;
  rmSync(pwJson, { force: true });
  const code = run('pnpm', ['run', 'test:browser', '--reporter=list,json'], { PLAYWRIGHT_JSON_OUTPUT_NAME: pwJson });
  status ||= code;
  if (existsSync(pwJson)) {
    const s = JSON.parse(readFileSync(pwJson, 'utf8')).stats ?? {};
    totals.passed += (s.expected ?? 0) + (s.flaky ?? 0);
    totals.failed += s.unexpected ?? 0;
    totals.skipped += s.skipped ?? 0;
  } else status ||= 1;
} else {
  console.log('\nBrowser suite skipped: /usr/bin/chromium not found (install Debian\'s chromium package to run it).');
}

console.log(`\n${totals.passed} passed, ${totals.failed} failed, ${totals.skipped} skipped`);
process.exit(status || (totals.failed ? 1 : 0));
