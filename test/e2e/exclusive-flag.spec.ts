// Two codes of one mutually exclusive set on overlapping words, by two people: both see the flag live,
// and it clears when the cause is gone (DESIGN §4, flag "exclusive").
import { test, expect, account, signIn, openText, openCodebook, addCodes, selectWords, applyCode } from './fixtures.js';

const TEXT = 'P04 — chair and treasurer, Ferrowgate Film Club';

test('exclusive-set flag appears for both people and clears', async ({ browser, baseURL }) => {
  const lead = await signIn(browser, account('lead'), baseURL!);
  await addCodes(lead, ['Role creep', 'Role clarity']);
  await openCodebook(lead);
  await lead.page.getByText('Group codes').click();
  const form = lead.page.getByRole('form', { name: 'Group codes' });
  await form.getByLabel('Name').fill('How roles are held');
  await form.getByLabel('Role creep').check();
  await form.getByLabel('Role clarity').check();
  await form.getByRole('button', { name: 'Create group' }).click();
  await expect(lead.page.getByTestId('exclusive-sets')).toContainText('How roles are held');

  const a = await signIn(browser, account('coder', 1), baseURL!);
  const b = await signIn(browser, account('coder', 2), baseURL!);
  await openText(a, TEXT);
  await openText(b, TEXT);
  const flagsA = a.page.locator('.flags .flag[data-kind="exclusive"]');
  const flagsB = b.page.locator('.flags .flag[data-kind="exclusive"]');
  const start = await flagsA.count();

  await selectWords(a.page, 'The chair plus everything with a form attached');
  await applyCode(a.page, 'Role creep');
  await selectWords(b.page, 'everything with a form');
  await applyCode(b.page, 'Role clarity');

  await expect(flagsA).toHaveCount(start + 1);
  await expect(flagsB).toHaveCount(start + 1);
  await expect(flagsB.last()).toContainText('exclude each other');
  // the flag goes to its place: clicking it chooses one of the two segments
  await flagsA.last().click();
  await expect(a.page.getByTestId('segment-quote')).toHaveText(/everything with a form/);
  await expect(a.page.locator('.transcript .flag-mark').first()).toBeVisible();

  // coder B removes her segment: the flag clears for both
  await b.page.getByTestId('transcript').focus();
  // step through the segments (both layers are drawn) until B's own one is chosen
  for (let i = 0; i < 10 && !/Role clarity/.test((await b.page.getByTestId('segment-panel').textContent().catch(() => '')) ?? ''); i++) {
    await b.page.keyboard.press(']');
  }
  await expect(b.page.getByTestId('segment-panel')).toContainText('Role clarity');
  await b.page.getByRole('button', { name: 'Remove' }).click();
  await expect(flagsA).toHaveCount(start);
  await expect(flagsB).toHaveCount(start);
  await Promise.all([lead, a, b].map((p) => p.context.close()));
});
