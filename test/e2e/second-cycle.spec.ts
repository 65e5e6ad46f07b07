// Second cycle: a lead merges one code into another; the preview counts the affected segments per coder
// and text before anything changes, and after applying, the merged code is marked so in the tree.
import { test, expect, account, signIn, openText, openCodebook, addCodes, selectWords, applyCode } from './fixtures.js';

test('merge with a preview of affected segments', async ({ browser, baseURL }) => {
  const lead = await signIn(browser, account('lead'), baseURL!);
  await addCodes(lead, ['Late nights', 'Long hours']);
  const coder = await signIn(browser, account('coder', 2), baseURL!);
  await openText(coder, 'P01 — projection lead, Beacon Picture Hall');
  await selectWords(coder.page, 'Unofficially');
  await applyCode(coder.page, 'Late nights');
  await selectWords(coder.page, 'last winter');
  await applyCode(coder.page, 'Late nights');

  await openCodebook(lead);
  await lead.page.getByRole('tree', { name: 'Codes' }).getByRole('treeitem', { name: 'Late nights', exact: true }).click();
  await lead.page.getByRole('radio', { name: 'merge' }).check();
  await lead.page.getByLabel(/Merge “Late nights” into/).selectOption({ label: 'Long hours' });
  await lead.page.getByLabel(/Why/).fill('Same idea, two names');
  await lead.page.getByRole('button', { name: 'Preview affected segments' }).click();
  const preview = lead.page.getByTestId('preview');
  await expect(preview).toContainText('2 segments affected');
  await expect(preview).toContainText(`${coder.name} on “P01`);
  await lead.page.getByTestId('apply-second-cycle').click();
  await expect(lead.page.getByRole('tree', { name: 'Codes' }).getByRole('treeitem', { name: /Late nights\s+merged/ })).toBeVisible();

  // the coder's open layer follows the merge: both segments now carry the code merged into
  await expect.poll(async () => (await coder.page.locator('.layers').textContent()) ?? '').toContain('(you)');
  await coder.page.getByTestId('transcript').focus();
  await coder.page.keyboard.press('Escape'); // nothing chosen: stepping starts at the first segment
  const labels: string[] = [];
  for (let i = 0; i < 30 && labels.filter((l) => l === 'Long hours').length < 2; i++) {
    await coder.page.keyboard.press(']');
    labels.push(((await coder.page.locator('#seg-h').textContent()) ?? '').trim());
  }
  if (process.env.E2E_CONSOLE) process.stdout.write(JSON.stringify(labels) + '\n');
  expect(labels.filter((l) => l === 'Late nights')).toEqual([]);
  expect(labels.filter((l) => l === 'Long hours').length).toBe(2);
  await Promise.all([lead, coder].map((p) => p.context.close()));
});
