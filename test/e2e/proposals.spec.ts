// Issue 8 item 7 in Chromium: a coder's in vivo code is proposed (a coder may not write codes), reaches
// the lead's codebook screen live, the lead accepts it under a new name, the coder sees the outcome live,
// and after a reload the coder's segment carries the accepted code.
import { test, expect, account, signIn, openText, openCodebook, selectWords, shot } from './fixtures.js';

const TEXT = 'P01 — projection lead, Beacon Picture Hall';

test("a coder's in vivo code becomes a proposal the lead accepts renamed; nothing is lost across a reload", async ({ browser, baseURL }) => {
  const coder = await signIn(browser, account('coder', 2), baseURL!);
  const lead = await signIn(browser, account('lead'), baseURL!);
  await openCodebook(lead);
  await expect(lead.page.getByTestId('proposals')).toBeVisible();

  await openText(coder, TEXT);
  const phrase = 'the rota sheet by the kettle'; // P01's own words (demo/texts/p01-beacon-projection.txt)
  await selectWords(coder.page, phrase);
  await coder.page.getByRole('button', { name: 'In vivo code' }).click();
  await expect(coder.page.getByTestId('coding-message')).toContainText('proposed to the lead');
  await expect(coder.page.getByTestId('segment-panel')).toContainText(`“${phrase}” (proposed)`);
  await shot(coder.page, 'proposal-coder-coding');

  const item = lead.page.getByTestId('proposal').filter({ hasText: `“${phrase}”` });
  await expect(item).toContainText('waiting for the lead');
  await shot(lead.page, 'proposal-lead-codebook');
  await item.getByLabel('Label').fill('Words from the projection box');
  await item.getByRole('button', { name: 'Accept renamed' }).click();
  await expect(item.getByTestId('proposal-outcome')).toHaveText('accepted as “Words from the projection box”');

  // The coder sees the outcome live, then reloads: the segment keeps the accepted code.
  await expect(coder.page.getByTestId('segment-panel')).toContainText('Words from the projection box');
  await coder.page.reload();
  await openCodebook(coder);
  await expect(coder.page.getByTestId('proposal').filter({ hasText: `“${phrase}”` }).getByTestId('proposal-outcome')).toHaveText('accepted as “Words from the projection box”');
  await expect(coder.page.getByRole('tree', { name: 'Codes' })).toContainText('Words from the projection box');
  await expect(coder.page.getByTestId('refused-change')).toHaveCount(0);
  await shot(coder.page, 'proposal-coder-codebook');
  await coder.context.close();
  await lead.context.close();
});
