// Review in the browser: the lead compares one coder's layer with another's on a demo text, comments
// on a place the comparison found; that coder reads it under "Feedback for you" and replies; the reply
// reaches the lead's page live; the lead resolves the thread and the coder sees it resolved. axe-core
// finds no serious or critical violation on the screen. (Expected behaviour: the supervision issue.)
import AxeBuilder from '@axe-core/playwright';
import { test, expect, account, signIn, shot, type Person } from './fixtures.js';

const TEXT = 'P01 — projection lead, Beacon Picture Hall';

async function openReview(p: Person): Promise<void> {
  await p.page.getByRole('list', { name: 'Studies' }).getByRole('link').first().click();
  await p.page.getByRole('navigation', { name: 'Study screens' }).getByRole('link', { name: 'Review' }).click();
  await expect(p.page.getByRole('heading', { name: 'Feedback for you' })).toBeVisible();
}

test('compare two layers, comment on a difference, reply and resolve live', async ({ browser, baseURL }) => {
  test.setTimeout(180_000); // two people, live events and two axe passes: slow on a loaded machine
  const lead = await signIn(browser, account('lead'), baseURL!);
  const coder2 = account('coder', 2);
  const coder1 = account('coder', 1);
  await openReview(lead);
  await expect(lead.page.locator('.thread-list')).toContainText('Nothing for you yet.');

  await lead.page.getByLabel('Text', { exact: true }).selectOption({ label: TEXT });
  await expect(lead.page.getByLabel('Layer to review', { exact: true })).toBeEnabled();
  await lead.page.getByLabel('Layer to review', { exact: true }).selectOption({ label: `${coder2.name}’s layer` });
  await lead.page.getByLabel('Reference', { exact: true }).selectOption({ label: `${coder1.name}’s layer` });
  await lead.page.getByRole('button', { name: 'Compare' }).click();
  await expect(lead.page.locator('.compare-counts caption')).toContainText(`${coder2.name}’s layer against ${coder1.name}’s layer`);

  // The demo's two coders differ somewhere on this text: a place with the reviewed coder's segment in it.
  const place = lead.page.locator('li.place[data-category="otherCode"], li.place[data-category="extra"], li.place[data-category="otherBoundary"]').first();
  await expect(place).toBeVisible();
  const quote = (await place.locator('blockquote').textContent())!;
  await place.getByLabel('Comment on this place').fill('Look again at where this passage ends.');
  await place.getByRole('button', { name: 'Add comment' }).click();
  await expect(place.getByRole('status')).toHaveText('Comment saved.');
  await expect(place.locator('.comments')).toContainText('Look again at where this passage ends.');
  await shot(lead.page, 'review-lead-compare');

  const coder = await signIn(browser, coder2, baseURL!);
  await openReview(coder);
  const thread = coder.page.locator('.thread-list li.thread').first();
  await expect(thread).toContainText('Look again at where this passage ends.');
  await expect(thread.locator('blockquote')).toHaveText(quote);
  await thread.getByLabel('Reply').fill('I coded it on purpose: the next sentence carries the point.');
  await thread.getByRole('button', { name: 'Send reply' }).click();
  await expect(thread.getByRole('status')).toHaveText('Reply saved.');

  // Live: the lead's open comparison shows the reply without a reload.
  await expect(place.locator('.comments')).toContainText('the next sentence carries the point', { timeout: 15_000 });
  // The thread is feedback for the lead too (someone answered them): resolve it there.
  const leadThread = lead.page.locator('.thread-list li.thread').first();
  await expect(leadThread).toContainText('the next sentence carries the point', { timeout: 15_000 });
  await leadThread.getByRole('button', { name: 'Resolve' }).click();
  await expect(leadThread.getByRole('status')).toHaveText('Thread resolved.');
  await expect(coder.page.locator('.thread-list li.thread').first()).toHaveAttribute('data-resolved', 'yes', { timeout: 15_000 });
  await shot(coder.page, 'review-coder-feedback');

  for (const [p, name] of [[lead, 'lead'], [coder, 'coder']] as const) {
    const result = await new AxeBuilder({ page: p.page }).withTags(['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa']).analyze();
    const bad = result.violations.filter((v) => v.impact === 'serious' || v.impact === 'critical').map((v) => `${v.id}: ${v.help}`);
    expect(bad, `axe on the review screen as ${name}`).toEqual([]);
  }
  await lead.context.close();
  await coder.context.close();
});
