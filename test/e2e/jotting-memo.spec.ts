// First-cycle extras: an in vivo code from the selected words, a jotting on a selection, and the jotting
// promoted to a memo on the memos screen, found there by search, and back to its words from there.
import { test, expect, account, signIn, openText, selectWords, shot } from './fixtures.js';

const TEXT = 'P03 — sound and setup, Ferrowgate Film Club';

test('in vivo code, jotting, and promoting the jotting to a memo', async ({ browser, baseURL }) => {
  const coder = await signIn(browser, account('coder', 1), baseURL!);
  const page = coder.page;
  await openText(coder, TEXT);

  await selectWords(page, 'the whole story of the film club');
  await page.getByRole('button', { name: 'In vivo code' }).click();
  // A coder may not write codes: the in vivo code goes to the lead as a proposal (proposals.spec.ts).
  await expect(page.getByTestId('coding-message')).toHaveText('In vivo code “the whole story of the film club” proposed to the lead and applied; it shows as “(proposed)” until they decide. Saved.');
  await expect(page.getByTestId('segment-panel')).toContainText('“the whole story of the film club” (proposed)');

  await selectWords(page, "the sound was so bad I couldn't follow the plot");
  await page.getByRole('button', { name: 'Jotting', exact: true }).click();
  await page.getByLabel('Jotting', { exact: true }).fill('Makeshift start: compare with the borrowed projector in P04.');
  await page.getByRole('button', { name: 'Keep jotting' }).click();
  await expect(page.getByTestId('coding-message')).toHaveText('Jotting added to the memos. Saved.');

  await page.getByRole('navigation', { name: 'Study screens' }).getByRole('link', { name: 'Memos' }).click();
  await page.getByTestId('memo-search').fill('borrowed projector');
  const item = page.locator('.memo-list .memo').filter({ hasText: 'borrowed projector' });
  await expect(item).toHaveCount(1);
  await expect(item).toHaveAttribute('data-kind', 'jotting');
  await expect(item).toContainText("On “the sound was so bad I couldn't follow the plot”");
  await item.getByRole('button', { name: 'Promote to memo' }).click();
  await expect(item).toHaveAttribute('data-kind', 'memo');
  await shot(page, 'memos-promoted');
  // every memo on a text leads back to its passage
  await item.getByRole('link', { name: 'Go to the passage' }).click();
  await expect(page.getByTestId('coding-view')).toHaveAttribute('data-ready', 'yes', { timeout: 20_000 });
  await expect(page.getByRole('heading', { name: TEXT })).toBeVisible();
  // the jotting was on words that are not a segment: it opens chosen on those words, with its replies
  await expect(page.getByTestId('notes-here').getByTestId('note-here')).toContainText('borrowed projector');
  await expect(page.getByTestId('jotting-chip').and(page.locator('[aria-pressed="true"]'))).toHaveAttribute('title', "Jotting on “the sound was so bad I couldn't follow the plot”");
  await coder.context.close();
});
