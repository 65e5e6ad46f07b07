// A whole coding pass by keyboard only: reach the transcript with Tab, select by word, find and apply a
// code, reuse it with a digit, step to a segment, remove it and undo the removal.
import { test, expect, account, signIn, openText, addCodes, type Person } from './fixtures.js';

const TEXT = 'P04 — chair and treasurer, Ferrowgate Film Club';
const mine = (p: Person) => p.page.locator('.layers li').filter({ hasText: '(you)' });

test('a coding pass by keyboard only', async ({ browser, baseURL }) => {
  const lead = await signIn(browser, account('lead'), baseURL!);
  await addCodes(lead, ['Paperwork load']);

  const coder = await signIn(browser, account('trainee'), baseURL!);
  await openText(coder, TEXT);
  const count = async () => Number(/\((\d+) segments?\)/.exec((await mine(coder).textContent()) ?? '')?.[1] ?? NaN);
  const n0 = await count();
  const page = coder.page;

  // Tab until the transcript has focus
  for (let i = 0; i < 40 && !(await page.evaluate(() => document.activeElement?.classList.contains('transcript'))); i++) await page.keyboard.press('Tab');
  await expect(page.getByTestId('transcript')).toBeFocused();

  // select three words of the third turn and code them through the type-ahead
  await page.keyboard.press('ArrowDown');
  await page.keyboard.press('ArrowDown');
  await page.keyboard.press('ArrowDown');
  await page.keyboard.press('ArrowRight');
  await page.keyboard.press('Shift+ArrowRight');
  await page.keyboard.press('Shift+ArrowRight');
  await expect(page.getByTestId('selection-info')).toHaveText('Selected: “I\'m the chair”');
  await page.keyboard.press('c');
  await expect(page.getByTestId('code-search')).toBeFocused();
  await page.keyboard.type('paperw');
  await page.keyboard.press('Enter');
  await expect(page.getByTestId('coding-message')).toHaveText('Coded “Paperwork load”. Saved.');
  await expect(page.getByTestId('transcript')).toBeFocused();
  await expect.poll(count).toBe(n0 + 1);

  // next turn, one word, digit 1 = the most recent code
  await page.keyboard.press('ArrowDown');
  await page.keyboard.press('ArrowRight');
  await page.keyboard.press('1');
  await expect.poll(count).toBe(n0 + 2);

  // step to a segment, remove it, undo the removal
  // (other people's segments on this text are in the way too: step on until one of mine is chosen)
  const remove = page.getByTestId('segment-panel').getByRole('button', { name: 'Remove' });
  for (let i = 0; i < 20 && !(await remove.isVisible()); i++) await page.keyboard.press(']');
  await expect(remove).toBeVisible();
  await page.keyboard.press('Delete');
  await expect.poll(count).toBe(n0 + 1);
  await expect(page.getByTestId('coding-message')).toHaveText(/^Removed the segment coded “.+”\. Saved\.$/);
  await page.keyboard.press('Control+z');
  await expect.poll(count).toBe(n0 + 2);
  // undo says what it undid, and what the server made of it
  await expect(page.getByTestId('coding-message')).toHaveText(/^Undone: removed the segment coded “.+”\. Saved\.$/);
  // (the lead stays signed in until here: closing a browser right after an edit may cut it off unsent)
  await Promise.all([lead, coder].map((p) => p.context.close()));
});
