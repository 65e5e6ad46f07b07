// Screenshots of the coding view as a coder (after coding two passages), the lead and an observer, for
// checking by eye (test-results/screens/coding-look-*.png). LOOK_TAG names the set (before/after).
import { test, expect, account, signIn, openText, selectWords, shot } from './fixtures.js';

const TEXT = 'P01 — projection lead, Beacon Picture Hall';
const tag = process.env.LOOK_TAG ?? 'now';

test('coding view as coder, lead and observer', async ({ browser, baseURL }) => {
  test.setTimeout(120_000); // three people signed in at once: a minute is short on a loaded machine
  const coder = await signIn(browser, account('coder', 1), baseURL!);
  await openText(coder, TEXT);
  await selectWords(coder.page, 'pot of tea');
  await coder.page.getByTestId('code-search').fill('');
  await coder.page.getByRole('listbox', { name: 'Codes' }).getByRole('option').first().click();
  await selectWords(coder.page, 'Ray texts me if I miss a Friday');
  await coder.page.getByRole('listbox', { name: 'Codes' }).getByRole('option').nth(3).click();
  await expect(coder.page.getByTestId('coding-message')).toContainText('Coded');
  await shot(coder.page, `coding-look-${tag}-coder`);

  const lead = await signIn(browser, account('lead'), baseURL!);
  await openText(lead, TEXT);
  await shot(lead.page, `coding-look-${tag}-lead`);

  const observer = await signIn(browser, account('observer'), baseURL!);
  await openText(observer, TEXT);
  await shot(observer.page, `coding-look-${tag}-observer`);
  await Promise.all([coder, lead, observer].map((p) => p.context.close()));
});
