// A coder loses the connection, codes three segments, and comes back: the screen says what waits to be
// sent, and afterwards everyone has the segments (Yjs state exchange on reconnect; y-indexeddb keeps the
// offline copy).
import { test, expect, account, signIn, openText, addCodes, selectWords, applyCode, segmentCount, shot } from './fixtures.js';

const TEXT = 'P02 — Saturday matinee and publicity, Beacon Picture Hall (with P02b)';

test('offline coding is kept, shown as waiting, and merged on return', async ({ browser, baseURL }) => {
  const lead = await signIn(browser, account('lead'), baseURL!);
  await addCodes(lead, ['Getting hooked']);
  const away = await signIn(browser, account('coder', 1), baseURL!);
  const here = await signIn(browser, account('coder', 2), baseURL!);
  await openText(away, TEXT);
  await openText(here, TEXT);
  const before = await segmentCount(here.page);

  await away.context.setOffline(true);
  await away.page.getByRole('button', { name: 'Work offline' }).click();
  await expect(away.page.getByTestId('connection-status')).toHaveAttribute('data-state', /paused|offline/);

  await selectWords(away.page, 'I read it on the bus');
  await applyCode(away.page, 'Getting hooked');
  await selectWords(away.page, 'the best thing I');
  await applyCode(away.page, 'Getting hooked');
  await selectWords(away.page, 'I was hooked');
  await applyCode(away.page, 'Getting hooked');
  await expect(away.page.getByTestId('waiting')).toContainText('3 changes to your coding');
  await shot(away.page, 'coding-offline');
  // nothing has reached the other coder
  expect(await segmentCount(here.page)).toBe(before);

  await away.context.setOffline(false);
  await away.page.getByRole('button', { name: 'Resume syncing' }).click();
  await expect(away.page.getByTestId('connection-status')).toHaveAttribute('data-state', 'online');
  await expect(away.page.getByTestId('waiting')).toHaveText('Nothing waiting to be sent.');
  await expect.poll(async () => await segmentCount(here.page), { timeout: 10_000 }).toBe(before + 3);

  // and they are on the server: a fresh sign-in of the lead sees them too
  await lead.page.goto('/');
  await openText(lead, TEXT);
  await expect.poll(async () => await segmentCount(lead.page), { timeout: 10_000 }).toBeGreaterThanOrEqual(before + 3);
  await Promise.all([lead, away, here].map((p) => p.context.close()));
});
