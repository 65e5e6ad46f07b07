// Access that follows the study live, in the browser: a coder is removed from the study while a text is
// open; the server closes the page's connections (1008, issue 8 item 6) and the status bar says why in
// plain words instead of retrying forever. Axe (WCAG 2 A/AA, via @axe-core/playwright) on that state.
// The membership is restored at the end: the demo server is shared by every spec of a run.
import AxeBuilder from '@axe-core/playwright';
import { test, expect, account, signIn, openText, shot } from './fixtures.js';

test('a coder removed from the study is told so, and the page stops reconnecting', async ({ browser, baseURL }) => {
  const lead = await signIn(browser, account('lead'), baseURL!);
  const who = account('coder', 2);
  const coder = await signIn(browser, who, baseURL!);
  await openText(coder);

  // The lead removes the coder through the API (the members screen calls the same route).
  const api = lead.context.request;
  const headers = { origin: baseURL! };
  const studies = (await (await api.get('/api/studies')).json()) as Array<{ id: string }>;
  const studyId = studies[0]!.id;
  const members = (await (await api.get(`/api/studies/${studyId}/members`)).json()) as Array<{ userId: string; email: string }>;
  const member = members.find((m) => m.email === who.email)!;
  try {
    expect((await api.delete(`/api/studies/${studyId}/members/${member.userId}`, { headers })).status()).toBe(204);

    const status = coder.page.getByTestId('connection-status');
    await expect(status).toHaveAttribute('data-state', 'lost');
    await expect(coder.page.getByTestId('lost-access')).toContainText('You are no longer a member of this study.');
    await shot(coder.page, 'coding-access-lost');
    const result = await new AxeBuilder({ page: coder.page }).withTags(['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa']).analyze();
    const bad = result.violations.filter((v) => v.impact === 'serious' || v.impact === 'critical').map((v) => `${v.id}: ${v.help}`);
    expect(bad).toEqual([]);
  } finally {
    // Adding by email answers with a link to join (it never says whether the account exists); the coder follows it.
    const link = (await (await api.post(`/api/studies/${studyId}/members`, { headers, data: { email: who.email, role: 'coder' } })).json()) as { token: string };
    await coder.context.request.post(`/api/invitations/${link.token}/accept`, { headers, data: { password: who.password } });
    await Promise.all([lead, coder].map((p) => p.context.close()));
  }
});
