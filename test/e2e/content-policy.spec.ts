// The Content-Security-Policy the server sends (http/security-headers.ts) lets the whole app work in
// Chromium: sign-in, a text open over the /sync WebSocket with its flags worker and IndexedDB copy, and
// the analysis chart drawn by Observable Plot — with not one CSP violation reported by the browser
// (the `securitypolicyviolation` event of CSP Level 3, §5.3).
import { test, expect, account, openText, signIn, shot } from './fixtures.js';

test('the app runs under its Content-Security-Policy with no violation', async ({ browser, baseURL }) => {
  test.setTimeout(120_000);
  const lead = await signIn(browser, account('lead'), baseURL!);
  const page = lead.page;
  // Recorded from the start of every later navigation; the sign-in page above is checked by reloading.
  await page.addInitScript(() => {
    const w = window as unknown as { cspViolations: string[] };
    w.cspViolations = [];
    document.addEventListener('securitypolicyviolation', (e) => w.cspViolations.push(`${e.violatedDirective} ${e.blockedURI}`));
  });
  const refused: string[] = [];
  page.on('console', (m) => {
    if (/Content Security Policy|Refused to/i.test(m.text())) refused.push(m.text());
  });
  const main = await page.reload();
  expect(main!.headers()['content-security-policy']).toContain("frame-ancestors 'none'");
  await expect(page.getByRole('heading', { name: 'Your studies' })).toBeVisible();

  await openText(lead); // waits for the sync WebSocket to be online
  await expect.poll(() => page.workers().length, { message: 'the flags worker started' }).toBeGreaterThan(0);
  await expect
    .poll(() => page.evaluate(async () => (await indexedDB.databases()).filter((d) => d.name?.startsWith('gloss:')).length), { message: 'offline copies in IndexedDB' })
    .toBeGreaterThan(0);
  await shot(page, 'csp-coding-lead');

  await page.getByRole('navigation', { name: 'Study screens' }).getByRole('link', { name: 'Analysis' }).click();
  await page.getByRole('tab', { name: 'Tables and chart' }).click();
  const chart = page.getByRole('img', { name: /Segments per code/ });
  await expect(chart).toBeVisible({ timeout: 20_000 });
  await expect(chart.locator('svg, rect').first()).toBeAttached();
  await shot(page, 'csp-analysis-chart-lead');

  expect(await page.evaluate(() => (window as unknown as { cspViolations: string[] }).cspViolations)).toEqual([]);
  expect(refused).toEqual([]);
  await lead.context.close();
});
