// Issue 15 item 4: replies on memos and jottings. A coder writes a jotting in the coding view; the lead,
// in another browser context, replies to it on the memos screen and is told the server kept it; the coder
// sees the reply arrive live and still after a reload; an observer reads the thread but is offered no Reply.
import { test, expect, account, signIn, openText, selectWords, shot, type Person } from './fixtures.js';

const TEXT = 'P04 — chair and treasurer, Ferrowgate Film Club';
const JOTTING = 'Distance decides who comes: compare the bus times with P01.';
const REPLY = 'P02 says the same of the Saturday matinee: ask P04 about a minibus.';

async function openMemos(p: Person): Promise<void> {
  const tabs = p.page.getByRole('navigation', { name: 'Study screens' });
  if (!(await tabs.isVisible())) await p.page.getByRole('list', { name: 'Studies' }).getByRole('link').first().click();
  await tabs.getByRole('link', { name: 'Memos' }).click();
  await expect(p.page.getByTestId('memo-search')).toBeVisible();
}

const jottingItem = (p: Person) => p.page.locator('.memo-list .memo').filter({ hasText: JOTTING });

test('a reply to a jotting reaches its writer live and stays; an observer is offered no Reply', async ({ browser, baseURL }) => {
  test.setTimeout(120_000); // three people signed in at once: a minute is short on a loaded machine
  const coder = await signIn(browser, account('coder', 1), baseURL!);
  await openText(coder, TEXT);
  await selectWords(coder.page, 'the last bus back is at half nine');
  await coder.page.getByRole('button', { name: 'Jotting', exact: true }).click();
  await coder.page.getByLabel('Jotting', { exact: true }).fill(JOTTING);
  await coder.page.getByRole('button', { name: 'Keep jotting' }).click();
  await expect(coder.page.getByTestId('coding-message')).toHaveText('Jotting added to the memos. Saved.');
  await openMemos(coder);
  await expect(jottingItem(coder)).toHaveCount(1);
  await expect(jottingItem(coder).getByTestId('memo-reply')).toHaveCount(0);

  const lead = await signIn(browser, account('lead'), baseURL!);
  await openMemos(lead);
  const item = jottingItem(lead);
  await expect(item).toHaveCount(1);
  await item.getByRole('button', { name: 'Reply', exact: true }).click();
  await item.getByLabel('Your reply').fill(REPLY);
  await shot(lead.page, 'memo-replies-lead-writing');
  await item.getByRole('button', { name: 'Send reply' }).click();
  // the words come from the server's answer (the coding view's pattern), not from the click
  await expect(item.getByTestId('reply-message')).toHaveText('Reply added. Saved.');
  await expect(item.getByTestId('memo-reply')).toHaveCount(1);
  await expect(item.getByTestId('memo-reply').getByRole('button', { name: 'Delete reply' })).toBeVisible(); // the lead's own

  // live, without a reload, on the coder's page: the lead's name and words, under the jotting
  const thread = jottingItem(coder).getByRole('list', { name: 'Replies to this jotting' });
  await expect(thread.getByTestId('memo-reply')).toHaveCount(1);
  await expect(thread).toContainText(account('lead').name);
  await expect(thread).toContainText(REPLY);
  await expect(thread.getByRole('button', { name: 'Delete reply' })).toHaveCount(0); // not the coder's to delete
  await shot(coder.page, 'memo-replies-coder-live');
  // the reply is not a memo of its own in the list
  await expect(coder.page.locator('.memo-list > .memo').filter({ hasText: REPLY })).toHaveCount(1);

  await coder.page.reload();
  await expect(jottingItem(coder).getByTestId('memo-reply')).toHaveText(new RegExp(REPLY.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')));

  const observer = await signIn(browser, account('observer'), baseURL!);
  await openMemos(observer);
  await expect(jottingItem(observer).getByTestId('memo-reply')).toContainText(REPLY);
  await expect(observer.page.getByRole('button', { name: 'Reply', exact: true })).toHaveCount(0);
  await expect(observer.page.getByRole('button', { name: 'Keep memo' })).toHaveCount(0);
  await expect(observer.page.getByTestId('memos-read-only')).toBeVisible();
  await shot(observer.page, 'memo-replies-observer');

  for (const p of [coder, lead, observer]) await p.context.close();
});
