// A lead rewrites a code's brief definition during calibration; a coder reading the same entry sees the
// words change live and the lead's caret in the field (DESIGN §3: definition fields are Y.Text, co-edited).
import { test, expect, account, signIn, addCodes, openCodebook, shot } from './fixtures.js';

test('lead rewrites a definition and the coder sees it live', async ({ browser, baseURL }) => {
  const lead = await signIn(browser, account('lead'), baseURL!);
  await addCodes(lead, ['Being needed']);
  const coder = await signIn(browser, account('coder', 1), baseURL!);
  await openCodebook(coder);
  await coder.page.getByRole('tree', { name: 'Codes' }).getByRole('treeitem', { name: 'Being needed', exact: true }).click();
  const coderField = coder.page.getByLabel('Brief definition');
  await expect(coderField).toHaveJSProperty('readOnly', true);

  const leadField = lead.page.getByLabel('Brief definition');
  await leadField.click();
  await leadField.pressSequentially('Talk of others relying on the speaker.', { delay: 5 });
  await expect(coderField).toHaveValue('Talk of others relying on the speaker.');

  // an edit in the middle arrives as such, and the lead's caret is drawn on the coder's field
  await leadField.press('Home');
  for (let i = 0; i < 'Talk of '.length; i++) await leadField.press('ArrowRight');
  await leadField.pressSequentially('volunteers or ', { delay: 5 });
  await expect(coderField).toHaveValue('Talk of volunteers or others relying on the speaker.');
  await expect(coder.page.locator('.field-caret').filter({ hasText: lead.name })).toBeVisible();

  // the change history records the edit with the lead's name
  await coder.page.getByText(/Change history/).click();
  await expect(coder.page.locator('.history')).toContainText(lead.name);
  await shot(coder.page, 'codebook');
  await Promise.all([lead, coder].map((p) => p.context.close()));
});
