// Seeing the coding (issue 15 item 1): a coder codes two passages, one by mouse and one by keyboard, and
// both code names are read from the rendered page under their turns, without hovering anything; each
// coded passage is underlined in its code's colour and line, and undo / redo say what they undid.
import { test, expect, account, signIn, openText, selectWords, applyCode, shot } from './fixtures.js';

const TEXT = 'P03 — sound and setup, Ferrowgate Film Club';

test('a coder reads the codes of two passages from the page, no hovering', async ({ browser, baseURL }) => {
  const coder = await signIn(browser, account('coder', 2), baseURL!);
  const page = coder.page;
  await openText(coder, TEXT);
  const turnWith = (phrase: string) => page.locator('.transcript .turn').filter({ has: page.locator('.words', { hasText: phrase }) });
  const chipsIn = (phrase: string) => turnWith(phrase).locator('.turn-codes .code-chip');

  // by mouse: a drag-like page selection, then the picker
  await selectWords(page, 'Nobody compliments the wiring');
  await applyCode(page, 'Invisible work');

  // by keyboard: to the transcript, three turns down, two words, c, type, Enter
  await page.getByTestId('transcript').focus();
  await page.keyboard.press('Escape'); // start from the top: Escape clears the mouse selection
  for (let i = 0; i < 3; i++) await page.keyboard.press('ArrowDown');
  await page.keyboard.press('ArrowRight');
  await page.keyboard.press('Shift+ArrowRight');
  await expect(page.getByTestId('selection-info')).toHaveText('Selected: “So I\'m”');
  await page.keyboard.press('c');
  await page.keyboard.type('Pride in cr');
  await page.keyboard.press('Enter');
  await expect(page.getByTestId('coding-message')).toHaveText('Coded “Pride in craft”. Saved.');

  // the names are on the page as text, under each turn (read without any pointer event)
  await turnWith('Nobody compliments the wiring').scrollIntoViewIfNeeded();
  await expect(chipsIn('Nobody compliments the wiring').filter({ hasText: 'Invisible work' })).not.toHaveCount(0);
  await turnWith('So I\'m, um').scrollIntoViewIfNeeded();
  await expect(chipsIn('So I\'m, um').filter({ hasText: 'Pride in craft' })).not.toHaveCount(0);

  // the words themselves are underlined, in the colour and line of the code's swatch
  const chip = chipsIn('So I\'m, um').filter({ hasText: 'Pride in craft' }).first();
  const id = await chip.getAttribute('data-id');
  const line = turnWith('So I\'m, um').locator(`.seg-line[data-id="${id}"]`).first();
  await expect(line).toBeVisible();
  const swatch = await chip.locator('.code-swatch').evaluate((el) => getComputedStyle(el).borderBottomColor + ' ' + getComputedStyle(el).borderBottomStyle);
  expect(await line.evaluate((el) => getComputedStyle(el).borderBottomColor + ' ' + getComputedStyle(el).borderBottomStyle)).toBe(swatch);
  // choosing the segment (its name is a button) marks it chosen
  await chip.click();
  await expect(chip).toHaveAttribute('aria-pressed', 'true');
  await expect(page.getByTestId('segment-panel')).toContainText('Pride in craft');
  // a jotting on the chosen segment leaves a mark on its name in the text
  await page.getByRole('toolbar', { name: 'Coding tools' }).getByRole('button', { name: 'Jotting', exact: true }).click();
  await page.getByLabel('Jotting', { exact: true }).fill('He starts from what he can fix.');
  await page.getByRole('button', { name: 'Keep jotting' }).click();
  await expect(page.getByTestId('coding-message')).toHaveText('Jotting added to the memos. Saved.');
  await expect(chip.getByTestId('jotting-mark')).toHaveText(/1/);
  await shot(page, 'coding-view-two-passages');

  // undo and redo say what they undid, and that the server has it
  await page.getByRole('toolbar', { name: 'Coding tools' }).getByRole('button', { name: 'Undo' }).click();
  await expect(page.getByTestId('coding-message')).toHaveText('Undone: coded “Pride in craft”. Saved.');
  await expect(chipsIn('So I\'m, um').filter({ hasText: 'Pride in craft' })).toHaveCount(0);
  await page.getByRole('toolbar', { name: 'Coding tools' }).getByRole('button', { name: 'Redo' }).click();
  await expect(page.getByTestId('coding-message')).toHaveText('Redone: coded “Pride in craft”. Saved.');
  await expect(chipsIn('So I\'m, um').filter({ hasText: 'Pride in craft' })).toHaveCount(1);

  // the keyboard cursor is visible and named; keys select the sentence and the whole turn; Keys lists them
  await page.getByTestId('transcript').focus();
  await page.keyboard.press('Escape');
  for (let i = 0; i < 3; i++) await page.keyboard.press('ArrowDown');
  await expect(page.getByTestId('own-caret')).toBeVisible();
  await expect(page.getByTestId('selection-info')).toHaveText(/^Cursor in turn 4 of \d+ \(P03\); no words selected$/);
  await page.keyboard.press('s');
  await expect(page.getByTestId('selection-info')).toHaveText('Selected: “So I\'m, um, I suppose you\'d call me the technical side.”');
  await page.keyboard.press('t');
  await expect(page.getByTestId('selection-info')).toHaveText(/^Selected: “So I'm, um, I suppose you'd call me the technical side\. I'm an electrician/);
  await page.getByRole('toolbar', { name: 'Coding tools' }).getByRole('button', { name: 'Keys' }).click();
  await expect(page.getByRole('region', { name: 'Keys of the coding view' })).toContainText('select the sentence at the cursor');
  // every key has a control to press instead: the list names it, and the toolbar's carry their key
  await expect(page.getByRole('region', { name: 'Keys of the coding view' })).toContainText('or: Whole turn');
  const tools = page.getByRole('toolbar', { name: 'Coding tools' });
  for (const key of ['Control+Z', 'Control+Shift+Z', 'i', 'j', 't', 's', '[', ']', 'Escape', '?']) {
    await expect(tools.locator(`button[aria-keyshortcuts="${key}"]`), key).toHaveCount(1);
  }
  await tools.getByRole('button', { name: 'Next segment' }).click();
  await expect(page.getByTestId('coding-message')).toHaveText(/^Segment 1 of \d+: .+\.$/);
  await expect(page.getByTestId('segment-panel')).toBeVisible();
  await tools.getByRole('button', { name: 'Clear', exact: true }).click();
  await expect(page.getByTestId('segment-panel')).toHaveCount(0);
  await expect(page.getByTestId('selection-info')).toHaveText('Nothing selected: press ↓ or click the text to start');

  // and it is all still there after a reload (the server kept it)
  await page.reload();
  await expect(page.getByTestId('coding-view')).toHaveAttribute('data-ready', 'yes', { timeout: 20_000 });
  await turnWith('So I\'m, um').scrollIntoViewIfNeeded();
  await expect(chipsIn('So I\'m, um').filter({ hasText: 'Pride in craft' })).toHaveCount(1);
  await turnWith('Nobody compliments the wiring').scrollIntoViewIfNeeded();
  await expect(chipsIn('Nobody compliments the wiring').filter({ hasText: 'Invisible work' })).not.toHaveCount(0);
  await coder.context.close();
});
