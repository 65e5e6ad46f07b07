// axe-core (the reference accessibility engine, via @axe-core/playwright) finds no serious or critical
// violations on each main screen, for WCAG 2 A/AA rules. Screenshots of each screen are kept.
import AxeBuilder from '@axe-core/playwright';
import type { Page } from '@playwright/test';
import { test, expect, account, signIn, openText, openCodebook, addCodes, shot, type Person } from './fixtures.js';

// the demo assigns the trainee P01 and P04 (issue 9): every role can open this one
const TEXT = 'P01 — projection lead, Beacon Picture Hall';

async function audit(page: Page, screen: string): Promise<void> {
  const result = await new AxeBuilder({ page }).withTags(['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa']).analyze();
  const bad = result.violations
    .filter((v) => v.impact === 'serious' || v.impact === 'critical')
    .map((v) => `${v.id} (${v.impact}): ${v.help} — ${v.nodes.slice(0, 3).map((n) => n.target.join(' ')).join('; ')}`);
  await shot(page, screen);
  expect(bad, `axe on the ${screen} screen`).toEqual([]);
}

test('no serious or critical axe violations on the main screens', async ({ browser, baseURL }) => {
  // many screens, each audited: on a loaded machine this takes minutes
  test.setTimeout(300_000);
  const anon = await browser.newContext({ baseURL, viewport: { width: 1400, height: 900 } });
  const p0 = await anon.newPage();
  await p0.goto('/');
  await expect(p0.getByRole('button', { name: 'Sign in' })).toBeVisible();
  await audit(p0, 'signin');
  await anon.close();

  const lead = await signIn(browser, account('lead'), baseURL!);
  await addCodes(lead, ['Unpaid hours']);
  const page = lead.page;
  await page.getByRole('tree', { name: 'Codes' }).getByRole('treeitem', { name: 'Unpaid hours', exact: true }).click();
  await expect(page.getByTestId('entry-editor')).toBeVisible();
  await audit(page, 'codebook-entry');
  // the code tree is one Tab stop; arrows move, ← / → close and open a parent, Enter opens a code's entry
  // (the WAI-ARIA Authoring Practices' tree view pattern)
  const tree = page.getByRole('tree', { name: 'Codes' });
  const item = (name: string) => tree.getByRole('treeitem', { name, exact: true });
  await expect(item('Unpaid hours')).toHaveAttribute('tabindex', '0');
  await expect(tree.locator('[role="treeitem"][tabindex="0"]')).toHaveCount(1);
  await item('Unpaid hours').focus();
  await page.keyboard.press('Home');
  await expect(tree.getByRole('treeitem').first()).toBeFocused();
  await page.keyboard.press('ArrowDown');
  await expect(tree.getByRole('treeitem').nth(1)).toBeFocused();
  await page.keyboard.press('Enter');
  await expect(tree.getByRole('treeitem').nth(1)).toHaveAttribute('aria-selected', 'true');
  await item('Workload').focus();
  await page.keyboard.press('ArrowLeft');
  await expect(item('Workload')).toHaveAttribute('aria-expanded', 'false');
  await expect(item('Stepping back')).toHaveCount(0);
  await page.keyboard.press('ArrowRight');
  await expect(item('Workload')).toHaveAttribute('aria-expanded', 'true');
  await page.keyboard.press('ArrowRight');
  await expect(item('Stepping back')).toBeFocused();
  await page.keyboard.press('ArrowLeft');
  await expect(item('Workload')).toBeFocused();
  await audit(page, 'codebook-tree-keys');

  await page.getByRole('link', { name: 'Gloss' }).click();
  await expect(page.getByRole('heading', { name: 'Your studies' })).toBeVisible();
  await audit(page, 'studies');

  await page.getByRole('list', { name: 'Studies' }).getByRole('link').first().click();
  await expect(page.getByRole('heading', { name: 'Texts' })).toBeVisible();
  await expect(page.locator('table.texts a').first()).toBeVisible();
  await audit(page, 'study');

  await openText(lead);
  await audit(page, 'coding-lead');
  // a jotting on a sentence: its mark and chip in the text, its thread with Reply beside it
  await page.getByTestId('transcript').focus();
  await page.keyboard.press('ArrowDown');
  await page.keyboard.press('s');
  await page.getByRole('button', { name: 'Jotting', exact: true }).click();
  await page.getByLabel('Jotting', { exact: true }).fill('Checked for accessibility: a jotting on one sentence.');
  await page.getByRole('button', { name: 'Keep jotting' }).click();
  await expect(page.getByTestId('notes-here').getByRole('button', { name: 'Reply', exact: true })).toBeVisible();
  // audited as a reader finds it later: after a reload, the chip chosen
  await page.reload();
  await expect(page.getByTestId('coding-view')).toHaveAttribute('data-ready', 'yes', { timeout: 20_000 });
  await page.getByTestId('jotting-chip').first().click(); // the spec runs first: this text's only jotting
  await expect(page.getByTestId('notes-here').getByRole('button', { name: 'Reply', exact: true })).toBeVisible();
  await audit(page, 'coding-jotting');
  await auditWhileCoding(lead, 'lead');

  // the study's analysis (retrieval, then the tables and chart) and supervision screens
  const tabs = page.getByRole('navigation', { name: 'Study screens' });
  const loaded = async () => expect(page.getByRole('progressbar')).toHaveCount(0, { timeout: 20_000 });
  await tabs.getByRole('link', { name: 'Analysis' }).click();
  await expect(page.getByRole('tabpanel')).toBeVisible();
  await loaded();
  await audit(page, 'analysis-retrieve');
  await page.getByRole('tab', { name: 'Tables and chart' }).click();
  await expect(page.locator('table.matrix').first()).toBeVisible({ timeout: 20_000 });
  await loaded();
  await audit(page, 'analysis-tables');
  await tabs.getByRole('link', { name: 'Supervision' }).click();
  await expect(page.getByRole('heading', { name: 'Assignments' })).toBeVisible();
  await loaded();
  await audit(page, 'supervision');

  await page.getByRole('navigation', { name: 'Study screens' }).getByRole('link', { name: 'Memos' }).click();
  await expect(page.getByRole('heading', { name: 'New memo' })).toBeVisible();
  await page.getByLabel('Title').fill('Calibration round one');
  await page.getByLabel('Memo', { exact: true }).fill('Coders split on whether tea-making counts as sociability. Revisit after round two.');
  await page.getByRole('button', { name: 'Keep memo' }).click();
  await expect(page.locator('.memo-list')).toContainText('Calibration round one');
  await audit(page, 'memos');

  await page.getByRole('navigation', { name: 'Study screens' }).getByRole('link', { name: 'Members' }).click();
  await expect(page.getByRole('heading', { name: 'Members and roles' })).toBeVisible();
  await expect(page.locator('table.members tbody tr').first()).toBeVisible();
  await audit(page, 'members');
  await page.getByRole('navigation', { name: 'Study screens' }).getByRole('link', { name: 'Agreement' }).click();
  await expect(page.getByRole('table', { name: 'Per code', exact: true })).toBeVisible({ timeout: 30_000 });
  await audit(page, 'agreement');

  await openCodebook(lead);
  await lead.context.close();
});

test('no serious or critical axe violations in the coding view for coder, trainee and observer, with words selected and the code list filtered', async ({ browser, baseURL }) => {
  test.setTimeout(300_000);
  for (const role of ['coder', 'trainee', 'observer'] as const) {
    const p = await signIn(browser, account(role), baseURL!);
    await openText(p, TEXT);
    await audit(p.page, `coding-${role}`);
    await auditWhileCoding(p, role);
    await p.context.close();
  }
});

/**
 * The coding view with a sentence selected (the code list then offers every code), then with the list
 * filtered by typing, then filtered to nothing. Roles without a code list (observer) stop after the first.
 */
async function auditWhileCoding(p: Person, role: string): Promise<void> {
  const page = p.page;
  await page.goto(page.url()); // a fresh view: nothing chosen from earlier steps
  await expect(page.getByTestId('coding-view')).toHaveAttribute('data-ready', 'yes', { timeout: 20_000 });
  await page.getByTestId('transcript').focus();
  await page.keyboard.press('ArrowDown');
  await page.keyboard.press('s');
  await expect(page.getByTestId('selection-info')).toContainText('Selected:');
  await audit(page, `coding-${role}-selected`);
  const search = page.getByTestId('code-search');
  if ((await search.count()) === 0) return;
  const options = page.getByRole('listbox', { name: 'Codes' }).getByRole('option');
  const all = await options.count();
  expect(all, 'the code list offers codes').toBeGreaterThan(0);
  await search.fill('work');
  await expect(options).not.toHaveCount(all);
  await expect(options.first()).toBeVisible();
  await search.press('ArrowDown'); // the second match is the active option; focus stays in the field
  await expect(options.nth(1)).toHaveAttribute('aria-selected', 'true');
  await expect(search).toHaveAttribute('aria-activedescendant', (await options.nth(1).getAttribute('id'))!);
  await expect(search).toBeFocused();
  await audit(page, `coding-${role}-filtered`);
  await search.fill('no code is called this');
  await expect(page.getByTestId('no-code-matches')).toBeVisible();
  await audit(page, `coding-${role}-filtered-empty`);
}
