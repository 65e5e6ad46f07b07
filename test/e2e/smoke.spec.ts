// Smoke: the built app is served by the real server; a coder signs in, sees the demo study and opens a text.
import { test, expect, account, signIn, openText, shot } from './fixtures.js';

test('sign in, studies, study, coding view, sign out', async ({ browser, baseURL }) => {
  const coder = await signIn(browser, account('coder'), baseURL!);
  await shot(coder.page, 'studies');
  await openText(coder);
  await expect(coder.page.locator('.transcript .words').first()).not.toBeEmpty();
  await expect(coder.page.getByRole('region', { name: /Personal data/i }).or(coder.page.getByLabel('Data protection')).first()).toBeVisible();
  await shot(coder.page, 'coding');
  await coder.page.getByRole('button', { name: 'Sign out' }).click();
  await expect(coder.page.getByRole('button', { name: 'Sign in' })).toBeVisible();
  await coder.context.close();
});
