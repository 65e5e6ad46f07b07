// Definitions that change visibly (issue 15 item 6): the lead edits a definition live; when they leave
// the field the edit goes into the code's history (who, before -> after, why); a coder's code list marks
// the code "updated" and its card shows what changed, until they say they have seen it.
import { test, expect, account, signIn, openCodebook, openText, shot } from './fixtures.js';

const TEXT = 'P04 — chair and treasurer, Ferrowgate Film Club';
const CODE = 'Stepping back';
const BEFORE = "The speaker's own thoughts, plans or announcements about leaving or doing less.";
const ADDED = ' Includes cutting back hours.';

test('a definition edit is recorded in the history and shows as updated in a coder\'s list', async ({ browser, baseURL }) => {
  const lead = await signIn(browser, account('lead'), baseURL!);
  await openCodebook(lead);
  await lead.page.getByRole('tree', { name: 'Codes' }).getByRole('treeitem', { name: CODE, exact: true }).click();
  await lead.page.getByTestId('edit-reason').fill('coders asked where fewer hours go');
  const field = lead.page.getByLabel('Brief definition');
  await field.click();
  await field.press('End');
  await field.pressSequentially(ADDED, { delay: 5 });
  await lead.page.getByTestId('edit-reason').focus(); // leaving the field ends the run of typing
  await expect(lead.page.getByTestId('edit-recorded')).toHaveText('Brief definition change recorded in the history with your reason; coders see the code marked “updated”.');

  // the history lists the edit: who, the field, before -> after, why
  await lead.page.getByText(/Change history/).click();
  const entry = lead.page.locator('.history li').filter({ hasText: 'why: coders asked where fewer hours go' });
  await expect(entry).toContainText(`${lead.name}: edit (brief definition)`);
  await expect(entry.locator('del')).toHaveText(BEFORE);
  await expect(entry.locator('ins')).toHaveText(BEFORE + ADDED);
  await shot(lead.page, 'definition-history-lead');

  // the coder's code list marks the code updated; its card says what changed; "Seen" clears the mark
  const coder = await signIn(browser, account('coder', 1), baseURL!);
  await openText(coder, TEXT);
  await coder.page.getByTestId('code-search').fill(CODE);
  const option = coder.page.getByRole('listbox', { name: 'Codes' }).getByRole('option').filter({ hasText: CODE });
  await expect(option.getByTestId('updated-mark')).toBeVisible();
  const card = coder.page.getByTestId('code-card');
  await expect(card.getByTestId('card-updated')).toContainText('why: coders asked where fewer hours go');
  await expect(card.locator('ins')).toHaveText(BEFORE + ADDED);
  await shot(coder.page, 'definition-history-coder');
  await card.getByRole('button', { name: 'Seen' }).click();
  await expect(option.getByTestId('updated-mark')).toHaveCount(0);

  // the codebook screen lists what changed since the coder last looked
  await openCodebook(coder);
  await expect(coder.page.getByTestId('changed-since')).toContainText(CODE);
  await Promise.all([lead, coder].map((p) => p.context.close()));
});
