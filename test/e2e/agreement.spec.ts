// The study's agreement screen, as the lead: per-code and per-pair tables with their chart, the
// pooled figure, and the drill-down from a code to the places behind it; a coder is offered no
// agreement screen, and the server refuses one who asks anyway (shown in words). Axe-clean.
import AxeBuilder from '@axe-core/playwright';
import { test, expect, account, signIn, shot } from './fixtures.js';

test('the agreement screen shows figures per code and pair, a chart, and the places behind a code', async ({ browser, baseURL }) => {
  test.setTimeout(180_000);
  const lead = await signIn(browser, account('lead'), baseURL!);
  const page = lead.page;
  await page.getByRole('list', { name: 'Studies' }).getByRole('link').first().click();
  await page.getByRole('navigation', { name: 'Study screens' }).getByRole('link', { name: 'Agreement' }).click();
  const perCode = page.getByRole('table', { name: 'Per code', exact: true });
  await expect(perCode).toBeVisible({ timeout: 30_000 });
  await expect(page.getByTestId('pooled')).toContainText("Pooled Krippendorff's alpha");
  await expect(page.getByRole('table', { name: 'Per coder pair' })).toBeVisible();
  await expect(page.getByTestId('agreement-chart').first().locator('svg')).toBeVisible();
  // the drill-down lists the places behind the first weak code, those some coder left out first
  await perCode.locator('tr.weak').first().getByRole('button', { name: /Show places behind/ }).click();
  await expect(page.getByTestId('drill-down').locator('.places li').first()).toBeVisible({ timeout: 20_000 });
  await page.getByTestId('pooled').scrollIntoViewIfNeeded();
  await shot(page, 'agreement-lead');
  await page.getByTestId('drill-down').scrollIntoViewIfNeeded();
  await shot(page, 'agreement-lead-drill');
  const result = await new AxeBuilder({ page }).withTags(['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa']).analyze();
  const bad = result.violations.filter((v) => v.impact === 'serious' || v.impact === 'critical').map((v) => `${v.id}: ${v.nodes.slice(0, 3).map((n) => n.target.join(' ')).join('; ')}`);
  expect(bad).toEqual([]);

  // a coder has no Agreement tab; typing its address gets the server's refusal in words
  const coder = await signIn(browser, account('coder', 1), baseURL!);
  await coder.page.getByRole('list', { name: 'Studies' }).getByRole('link').first().click();
  await expect(coder.page.getByRole('navigation', { name: 'Study screens' }).getByRole('link', { name: 'Rounds' })).toBeVisible();
  await expect(coder.page.getByRole('navigation', { name: 'Study screens' }).getByRole('link', { name: 'Agreement' })).toHaveCount(0);
  await coder.page.goto(page.url());
  await expect(coder.page.getByRole('alert')).toContainText('Could not load the agreement figures');
  await shot(coder.page, 'agreement-coder-refused');
  await Promise.all([lead, coder].map((p) => p.context.close()));
});
