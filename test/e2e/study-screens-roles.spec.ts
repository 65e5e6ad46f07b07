// The study screens added for a study's life (settings, cases, upload, versions, audit, members with
// invitations, account), seen by each role of the demo study: what each role is offered, axe-core
// (the reference accessibility engine) finding no serious or critical WCAG 2 A/AA violation, and a
// screenshot of each kept for the closing note. Role rules: the project brief and the server's role table.
import AxeBuilder from '@axe-core/playwright';
import type { Page } from '@playwright/test';
import { test, expect, account, signIn, shot } from './fixtures.js';

async function audit(page: Page, screen: string): Promise<void> {
  const result = await new AxeBuilder({ page }).withTags(['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa']).analyze();
  const bad = result.violations
    .filter((v) => v.impact === 'serious' || v.impact === 'critical')
    .map((v) => `${v.id} (${v.impact}): ${v.help} — ${v.nodes.slice(0, 3).map((n) => n.target.join(' ')).join('; ')}`);
  await shot(page, screen);
  expect(bad, `axe on the ${screen} screen`).toEqual([]);
}

for (const role of ['owner', 'lead', 'coder', 'observer'] as const) {
  test(`study screens as ${role}`, async ({ browser, baseURL }) => {
    // eight screens with an axe pass each; the first role also pays the cold start (168 s seen at load 30)
    test.setTimeout(360_000);
    const p = await signIn(browser, account(role), baseURL!);
    const page = p.page;
    await page.getByRole('list', { name: 'Studies' }).getByRole('link').first().click();
    const tabs = page.getByRole('navigation', { name: 'Study screens' });
    await expect(tabs.getByRole('link', { name: 'Texts' })).toBeVisible();
    // only owners and leads are offered the audit log and the upload
    const leads = role === 'owner' || role === 'lead';
    await expect(tabs.getByRole('link', { name: 'Audit log' })).toHaveCount(leads ? 1 : 0);
    await expect(page.getByRole('link', { name: 'Upload texts' })).toHaveCount(leads ? 1 : 0);

    await tabs.getByRole('link', { name: 'Settings' }).click();
    await expect(page.getByRole('heading', { name: 'Study settings' })).toBeVisible();
    await expect(page.getByRole('button', { name: 'Save settings' })).toHaveCount(role === 'owner' ? 1 : 0);
    await audit(page, `roles-settings-${role}`);

    await tabs.getByRole('link', { name: 'Cases' }).click();
    await expect(page.getByRole('heading', { name: 'Cases and attributes' })).toBeVisible();
    await expect(page.getByRole('table', { name: 'Cases' }).or(page.getByTestId('no-cases'))).toBeVisible({ timeout: 20_000 });
    await expect(page.getByRole('form', { name: 'Add a case' })).toHaveCount(leads ? 1 : 0);
    await audit(page, `roles-cases-${role}`);

    await tabs.getByRole('link', { name: 'Versions' }).click();
    await expect(page.getByRole('heading', { name: 'Versions' })).toBeVisible();
    await expect(page.getByRole('table', { name: 'Named versions' }).or(page.getByTestId('no-versions'))).toBeVisible();
    await expect(page.getByRole('form', { name: 'Name a version' })).toHaveCount(leads ? 1 : 0);
    await audit(page, `roles-versions-${role}`);

    await tabs.getByRole('link', { name: 'Members' }).click();
    await expect(page.getByRole('heading', { name: 'Members and roles' })).toBeVisible();
    await expect(page.getByRole('form', { name: 'Invite by email' })).toHaveCount(leads ? 1 : 0);
    await expect(page.getByRole('button', { name: 'Password reset link' }).first()).toHaveCount(role === 'owner' ? 1 : 0);
    await audit(page, `roles-members-${role}`);

    // de-identification: owners and leads only (the server refuses the rest: test/server/deid.test.ts)
    await expect(tabs.getByRole('link', { name: 'De-identify' })).toHaveCount(leads ? 1 : 0);
    if (leads) {
      await tabs.getByRole('link', { name: 'De-identify' }).click();
      await expect(page.getByRole('heading', { name: 'De-identify the texts' })).toBeVisible();
      await expect(page.getByRole('heading', { name: /pseudonym key/ })).toHaveCount(role === 'owner' ? 1 : 0);
      await audit(page, `roles-deid-${role}`);
      if (role === 'lead') {
        // finding changes nothing: a lead reviews the demo's candidates and where each was found
        await page.getByRole('button', { name: 'Find identifiers' }).click();
        const found = page.getByRole('table', { name: 'Candidates' });
        await expect(found.getByTestId('candidate').first()).toBeVisible({ timeout: 30_000 });
        await expect(found.getByTestId('candidate').first()).toContainText(/in \d+ text\(s\)/);
        await found.scrollIntoViewIfNeeded();
        await shot(page, 'deid-candidates-lead');
      }
      await tabs.getByRole('link', { name: 'Audit log' }).click();
      await expect(page.getByRole('table', { name: 'Log entries' })).toBeVisible();
      await audit(page, `roles-audit-${role}`);
      await tabs.getByRole('link', { name: 'Texts' }).click();
      await page.getByRole('link', { name: 'Upload texts' }).click();
      await expect(page.getByRole('heading', { name: 'Upload texts' })).toBeVisible();
      await audit(page, `roles-upload-${role}`);
    } else {
      // a coder or observer who types the address is told in words, and the server refuses the data
      const studyPath = new URL(page.url()).hash.split('/').slice(0, 3).join('/');
      await page.goto(`/${studyPath}/audit`);
      await expect(page.getByText('Only owners and leads see the audit log.')).toBeVisible();
      await audit(page, `roles-audit-refused-${role}`);
    }

    await page.getByRole('link', { name: /your account/ }).click();
    await expect(page.getByRole('heading', { name: 'Change your password' })).toBeVisible();
    await audit(page, `roles-account-${role}`);
    await p.context.close();
  });
}
