// A lead corrects words before, inside and at the edges of coded passages; the coder's quotes stay right.
// Expected quotes follow the anchoring rules of DESIGN §2 (Yjs v13 RelativePositions: start assoc 0,
// end assoc -1, so typing at either boundary stays outside; deleting inside shrinks the segment).
import { test, expect, account, signIn, openText, addCodes, selectWords, applyCode, type Person } from './fixtures.js';

const TEXT = 'P03 — sound and setup, Ferrowgate Film Club';

async function correct(lead: Person, words: string, replacement: string): Promise<void> {
  await selectWords(lead.page, words);
  await lead.page.getByRole('button', { name: 'Correct words…' }).click();
  await lead.page.getByTestId('correction-input').fill(replacement);
  await lead.page.getByRole('button', { name: 'Replace', exact: true }).click();
  await expect(lead.page.getByTestId('coding-message')).toHaveText('Words corrected. Saved.');
}

/** The coder's quotes, read by stepping through the segments with the keyboard. */
async function quotes(coder: Person, n: number): Promise<string[]> {
  const out: string[] = [];
  await coder.page.getByTestId('transcript').focus();
  for (let i = 0; i < n; i++) {
    await coder.page.keyboard.press(']');
    out.push((await coder.page.getByTestId('segment-quote').textContent()) ?? '');
  }
  return out.sort();
}

test('corrections before, inside and at the edges keep quotes right', async ({ browser, baseURL }) => {
  const lead = await signIn(browser, account('lead'), baseURL!);
  await addCodes(lead, ['Makeshift kit']);
  const coder = await signIn(browser, account('coder', 2), baseURL!);
  await openText(coder, TEXT);
  await openText(lead, TEXT);
  const existing = await coder.page.locator('.layers').textContent();
  // Specs before this one share the server and may have coded this text as this coder: count them, so the
  // walk below steps through every segment and the three made here are found among them.
  const before = Number(/\(you\) \((\d+) segments?\)/.exec(existing ?? '')?.[1]);
  expect(Number.isInteger(before), `the coder's own layer is listed with its count: ${existing}`).toBe(true);

  await selectWords(coder.page, 'a projector on a stack of hymn books');
  await applyCode(coder.page, 'Makeshift kit');
  await selectWords(coder.page, 'mixing desk from a church');
  await applyCode(coder.page, 'Makeshift kit');
  await selectWords(coder.page, 'extension leads');
  await applyCode(coder.page, 'Makeshift kit');

  // The correction form rewrites only the changed middle of the selected words (as a person retyping would).
  await correct(lead, 'when the club started up', 'when the club first started up'); // before every passage
  await correct(lead, 'hymn books', 'prayer books');                   // inside the first passage, up to its end
  await correct(lead, 'a mixing desk', 'a second-hand mixing desk');   // typed at the start edge of the second
  await correct(lead, 'from a church', 'from church');                 // deleted inside the second
  await correct(lead, 'extension leads across', 'extension leads, across'); // typed at the end edge of the third

  await expect.poll(() => quotes(coder, before + 3)).toEqual(expect.arrayContaining(['a projector on a stack of prayer books', 'extension leads', 'mixing desk from church']));
  // and the lead's text really changed
  await expect(coder.page.getByTestId('transcript')).toContainText('a second-hand mixing desk from church');
  await Promise.all([lead, coder].map((p) => p.context.close()));
});
