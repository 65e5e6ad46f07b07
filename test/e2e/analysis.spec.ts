// Analysis and exchange in the browser: a REFI-QDA project imported into a new study from the studies
// list, a code's segments retrieved, a table cell drilled down to its words, and an export saved.
// The project file is the interchange package's invented sample study, exported by Gloss's own code.
import { readFileSync } from 'node:fs';
import AxeBuilder from '@axe-core/playwright';
import type { Page } from '@playwright/test';
import { sampleStudy } from '../../packages/interchange/src/exchange/sample-study.js';
import { projectFile, projectQdpx } from '../../packages/interchange/src/refi/export.js';
import { test, expect, account, signIn, shot } from './fixtures.js';

// axe-core via @axe-core/playwright, WCAG 2 A/AA rules, as accessibility.spec.ts does for the other screens
async function axe(page: Page, screen: string): Promise<void> {
  const result = await new AxeBuilder({ page }).withTags(['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa']).analyze();
  const bad = result.violations
    .filter((v) => v.impact === 'serious' || v.impact === 'critical')
    .map((v) => `${v.id} (${v.impact}): ${v.help} — ${v.nodes.slice(0, 3).map((n) => n.target.join(' ')).join('; ')}`);
  expect(bad, `axe on ${screen}`).toEqual([]);
}

test('import a .qdpx into a new study, retrieve, drill down from a table, export', async ({ browser, baseURL }) => {
  test.setTimeout(180_000);
  const owner = await signIn(browser, account('owner'), baseURL!);
  const page = owner.page;

  // import into a new study
  await expect(page.getByRole('heading', { name: 'Start a study from a REFI-QDA file' })).toBeVisible();
  await page.getByLabel('Title of the new study').fill('Harbour lives (imported)');
  await page.getByLabel('Project (.qdpx) or codebook (.qdc) file').setInputFiles({ name: 'harbour.qdpx', mimeType: 'application/zip', buffer: Buffer.from(projectQdpx(projectFile(sampleStudy(), 'e2e'))) });
  await page.getByRole('button', { name: 'Import into a new study' }).click();
  const report = page.locator('.import-report');
  await expect(report).toContainText('Imported 2 texts, 4 codes, 6 segments, 4 memos and 2 cases');
  await expect(report).toContainText('as exclusive');
  await shot(page, 'analysis-import-new-study');
  await report.getByRole('link', { name: 'Open the new study' }).click();
  await page.getByRole('navigation', { name: 'Study screens' }).getByRole('link', { name: 'Analysis' }).click();

  // retrieve a code's segments, with the codes under it
  const hits = page.getByRole('list', { name: 'Segments found' });
  // a label around a select names it with the label's words and the chosen option: match the start
  const code = page.getByRole('combobox', { name: /^Code\b/ });
  await expect(code.locator('option', { hasText: 'Work at sea' })).toHaveCount(1, { timeout: 20_000 });
  await code.selectOption({ label: 'Work at sea (2)' });
  await expect(hits.locator('mark')).toHaveText(['We rowed out', 'Line two, with a comma, and "quotes".']);
  await page.getByLabel('with the codes under it').check();
  await expect(hits.locator('mark')).toHaveText(['We rowed out', 'The nets were 🐟🐟 heavy — ça pèse', '🐟🐟', 'Line two, with a comma, and "quotes".']);
  await expect(hits.locator('li').first()).toContainText('at dawn'); // context after the words
  await shot(page, 'analysis-retrieve-owner');
  await axe(page, 'retrieval');

  // drill down from a co-occurrence cell: "🐟🐟" (Catch) lies inside a Nets segment (hand-checked in sample-study.ts)
  await page.getByRole('tab', { name: 'Tables and chart' }).click();
  await expect(page.getByRole('img', { name: /Segments per code: Work at sea 2/ })).toBeVisible();
  await shot(page, 'analysis-frequency-owner');
  await axe(page, 'frequency chart and table');
  await page.getByRole('combobox', { name: /^Table\b/ }).selectOption('cooccurrence');
  const cell = page.getByRole('button', { name: '1: Nets, "heavy", Catch — read the segments' });
  await expect(cell).toBeVisible();
  await shot(page, 'analysis-cooccurrence-owner');
  await axe(page, 'co-occurrence table');
  await cell.click();
  await expect(page.getByRole('tab', { name: 'Retrieve segments' })).toHaveAttribute('aria-selected', 'true');
  await expect(hits.locator('mark')).toHaveText(['The nets were 🐟🐟 heavy — ça pèse']);

  // code by attribute, counting cases, drilled down
  await page.getByRole('tab', { name: 'Tables and chart' }).click();
  await page.getByRole('combobox', { name: /^Table\b/ }).selectOption('code-by-attribute');
  await page.getByRole('combobox', { name: /^Attribute\b/ }).selectOption({ label: 'Home port' });
  await expect(page.getByRole('note').filter({ hasText: 'frequency is not importance' })).toBeVisible();
  await expect(page.getByRole('combobox', { name: /^Attribute\b/ }).locator('option:checked')).toHaveText('Home port'); // the choice stays shown once the table arrives
  await shot(page, 'analysis-code-by-attribute-owner');
  await page.getByRole('button', { name: '1: Work at sea, South — read the segments' }).click();
  await expect(hits.locator('mark')).toHaveText(['Line two, with a comma, and "quotes".']);

  // export the segments as CSV
  await page.getByRole('tab', { name: 'Export and import' }).click();
  await expect(page.getByRole('complementary', { name: 'Before you export' })).toContainText('personal data');
  const [download] = await Promise.all([page.waitForEvent('download'), page.getByRole('button', { name: 'Segments (CSV)' }).click()]);
  const csv = readFileSync((await download.path())!, 'utf8');
  expect(csv).toContain('The nets were 🐟🐟 heavy — ça pèse');
  expect(csv).toContain('"Line two, with a comma, and ""quotes""."');
  await expect(page.getByText(/saved .* audit log/)).toBeVisible();
  await shot(page, 'analysis-exchange-owner');
  await axe(page, 'export and import');
  await owner.context.close();
});

for (const role of ['lead', 'coder', 'observer'] as const) {
  test(`the analysis screen as ${role}`, async ({ browser, baseURL }) => {
    const p = await signIn(browser, account(role), baseURL!);
    await p.page.getByRole('list', { name: 'Studies' }).getByRole('link').first().click();
    await p.page.getByRole('navigation', { name: 'Study screens' }).getByRole('link', { name: 'Analysis' }).click();
    await expect(p.page.locator('p.count')).toBeVisible({ timeout: 20_000 });
    await shot(p.page, `analysis-retrieve-${role}`);
    await p.page.getByRole('tab', { name: 'Export and import' }).click();
    if (role === 'lead') await expect(p.page.getByRole('button', { name: 'Segments (CSV)' })).toBeEnabled();
    else await expect(p.page.getByText('Exports are for the study’s owners and leads; your role does not include them.')).toBeVisible();
    await shot(p.page, `analysis-exchange-${role}`);
    await p.context.close();
  });
}

// An import into a study reaches screens already open on it (issue 10): the study's texts list and the
// analysis counts change without a reload, by the study's event stream.
test('an import into an open study shows on open screens without a reload', async ({ browser, baseURL }) => {
  test.setTimeout(180_000);
  const file = () => ({ name: 'harbour.qdpx', mimeType: 'application/zip', buffer: Buffer.from(projectQdpx(projectFile(sampleStudy(), 'e2e-live'))) });
  const owner = await signIn(browser, account('owner'), baseURL!);
  const page = owner.page;
  await page.getByLabel('Title of the new study').fill('Harbour lives (live)');
  await page.getByLabel('Project (.qdpx) or codebook (.qdc) file').setInputFiles(file());
  await page.getByRole('button', { name: 'Import into a new study' }).click();
  await page.locator('.import-report').getByRole('link', { name: 'Open the new study' }).click();
  await expect(page.getByRole('table').first().locator('tbody tr')).toHaveCount(2);
  const studyUrl = page.url();

  // a second window of the same person: the analysis screen, six segments so far
  const other = await owner.context.newPage();
  await other.goto(studyUrl);
  await other.getByRole('navigation', { name: 'Study screens' }).getByRole('link', { name: 'Analysis' }).click();
  await expect(other.locator('p.count')).toHaveText('Segments 1–6 of 6', { timeout: 20_000 });

  // a third imports the same project into this study
  const importer = await owner.context.newPage();
  await importer.goto(studyUrl);
  await importer.getByRole('navigation', { name: 'Study screens' }).getByRole('link', { name: 'Analysis' }).click();
  await importer.getByRole('tab', { name: 'Export and import' }).click();
  await importer.getByLabel('Codebook (.qdc) or project (.qdpx) file').setInputFiles(file());
  await importer.getByRole('button', { name: 'Import', exact: true }).click();
  await expect(importer.locator('.import-report')).toContainText('Imported 2 texts');

  // the open screens follow: four texts listed, twelve segments counted
  await expect(page.getByRole('table').first().locator('tbody tr')).toHaveCount(4);
  await expect(other.locator('p.count')).toHaveText('Segments 1–12 of 12');
  await shot(page, 'analysis-live-import-texts');
  await shot(other, 'analysis-live-import-retrieve');

  // a calibration round on one text, revealed: its consensus layer becomes something analysis may use
  const studyId = /study\/([0-9a-f-]{36})/.exec(studyUrl)![1]!;
  const api = owner.context.request;
  const headers = { origin: new URL(baseURL!).origin };
  const texts = (await (await api.get(`/api/studies/${studyId}/texts`)).json()) as Array<{ id: string }>;
  const members = (await (await api.get(`/api/studies/${studyId}/members`)).json()) as Array<{ userId: string; role: string }>;
  const coders = members.filter((m) => m.role === 'coder').map((m) => m.userId);
  const started = await api.post(`/api/studies/${studyId}/rounds`, { headers, data: { name: 'First look', textIds: [texts[0]!.id], participantIds: coders, unit: 'turn', statistic: 'krippendorff-alpha' } });
  expect(started.status(), await started.text()).toBe(201);
  const roundId = ((await started.json()) as { id: string }).id;
  expect((await api.post(`/api/rounds/${roundId}/reveal`, { headers })).status()).toBe(200);
  await other.reload();
  await other.getByRole('combobox', { name: /^Layers\b/ }).selectOption('consensus');
  const round = other.getByRole('combobox', { name: /^Round\b/ });
  await expect(round.locator('option', { hasText: 'Round 1: First look (revealed, consensus)' })).toHaveCount(1, { timeout: 20_000 });
  await round.selectOption({ label: 'Round 1: First look (revealed, consensus)' });
  await expect(other.locator('p.count')).toHaveText('No segments match.'); // nobody has adjudicated yet
  await shot(other, 'analysis-retrieve-consensus-filter');
  await other.getByRole('tab', { name: 'Tables and chart' }).click();
  await other.getByRole('combobox', { name: /^Layers\b/ }).selectOption('coders');
  // the second import brought its codes again under new ids (REFI-QDA codes are added, not merged): eight bars
  await expect(other.getByRole('img', { name: /Segments per code: Work at sea 2, .*Calm 2, Work at sea 2, .*Calm 2$/ })).toBeVisible();
  await shot(other, 'analysis-tables-layers-filter');
  await axe(other, 'tables with the layers filter');
  await owner.context.close();
});
