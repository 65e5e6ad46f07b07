/**
 * Shared helpers for the browser tests: people from the demo accounts, each in their own browser
 * context (so cookies, IndexedDB and awareness are separate, as for different people), and waits on
 * conditions rather than time.
 */
import { mkdirSync, readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { test as base, expect, type Browser, type BrowserContext, type Page } from '@playwright/test';


interface Account { email: string; password: string; role: string; name: string }
export const accounts: Account[] = JSON.parse(readFileSync(fileURLToPath(new URL('../../demo/accounts.json', import.meta.url)), 'utf8'));
export const account = (role: string, n = 1): Account => {
  const list = accounts.filter((a) => a.role === role);
  const a = list[n - 1];
  if (!a) throw new Error(`no demo account with role ${role} #${n}`);
  return a;
};

export const ARTIFACTS = fileURLToPath(new URL('../../test-results/screens/', import.meta.url));
mkdirSync(ARTIFACTS, { recursive: true });

export const test = base;
export { expect };

export interface Person { context: BrowserContext; page: Page; name: string }

export async function signIn(browser: Browser, who: Account, baseURL: string): Promise<Person> {
  const context = await browser.newContext({ baseURL, viewport: { width: 1400, height: 900 } });
  const page = await context.newPage();
  page.on('pageerror', (err) => process.stderr.write(`[${who.email}] page error: ${err.message}\n`));
  if (process.env.E2E_CONSOLE) page.on('console', (m) => process.stderr.write(`[${who.email}] ${m.type()}: ${m.text()}\n`));
  await page.goto('/');
  await page.getByLabel('Email').fill(who.email);
  await page.getByLabel('Password').fill(who.password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await expect(page.getByRole('heading', { name: 'Your studies' })).toBeVisible();
  return { context, page, name: who.name };
}

/**
 * The demo study in the studies list, by its title: specs that run earlier on the same server make
 * studies of their own (imports, set-up), and a newer study may come first in the list.
 */
export function demoStudyLink(p: Person) {
  return p.page.getByRole('list', { name: 'Studies' }).getByRole('link', { name: /^Keeping the Lights On/ });
}

/** Opens the demo study, then the text with the given title (or the first text). */
export async function openText(p: Person, title?: string): Promise<void> {
  const tabs = p.page.getByRole('navigation', { name: 'Study screens' });
  if (await tabs.isVisible()) await tabs.getByRole('link', { name: 'Texts' }).click();
  else await demoStudyLink(p).click();
  await expect(p.page.getByRole('heading', { name: 'Texts' })).toBeVisible();
  const links = p.page.locator('table.texts a');
  await (title ? p.page.getByRole('link', { name: title }) : links.first()).click();
  await expect(p.page.getByTestId('coding-view')).toHaveAttribute('data-ready', 'yes', { timeout: 20_000 });
  await expect(p.page.getByTestId('connection-status')).toHaveAttribute('data-state', 'online');
}

/** Selects [start, end) of the transcript's characters by setting the page selection, as a drag would. */
export async function selectWords(page: Page, phrase: string, occurrence = 0): Promise<void> {
  await page.evaluate(
    ([phrase, occurrence]) => {
      const words = Array.from(document.querySelectorAll<HTMLElement>('.transcript .words'));
      let seen = 0;
      for (const el of words) {
        const text = el.firstChild?.textContent ?? '';
        for (let i = text.indexOf(phrase); i >= 0; i = text.indexOf(phrase, i + 1)) {
          if (seen++ < occurrence) continue;
          const r = document.createRange();
          r.setStart(el.firstChild!, i);
          r.setEnd(el.firstChild!, i + phrase.length);
          const s = document.getSelection()!;
          s.removeAllRanges();
          s.addRange(r);
          el.scrollIntoView({ block: 'center' });
          el.dispatchEvent(new MouseEvent('mouseup', { bubbles: true }));
          return;
        }
      }
      throw new Error(`phrase not in the transcript: ${phrase}`);
    },
    [phrase, occurrence] as const,
  );
}

export async function shot(page: Page, name: string): Promise<void> {
  await page.screenshot({ path: `${ARTIFACTS}${name}.png`, fullPage: false });
}

/** Goes to the study's codebook screen (from anywhere inside the study or the studies list). */
export async function openCodebook(p: Person): Promise<void> {
  if (!(await p.page.getByRole('navigation', { name: 'Study screens' }).isVisible())) {
    await demoStudyLink(p).click();
  }
  await p.page.getByRole('navigation', { name: 'Study screens' }).getByRole('link', { name: 'Codebook' }).click();
  await expect(p.page.getByRole('navigation', { name: 'Codebook' })).toBeVisible();
}

/** A lead adds codes through the codebook screen; returns when each is in the tree. */
export async function addCodes(lead: Person, labels: string[]): Promise<void> {
  await openCodebook(lead);
  for (const label of labels) {
    await lead.page.getByRole('form', { name: 'Add a code' }).getByLabel('New code').fill(label);
    await lead.page.getByRole('form', { name: 'Add a code' }).getByRole('button', { name: 'Add' }).click();
    await expect(lead.page.getByRole('tree', { name: 'Codes' }).getByRole('treeitem', { name: label, exact: true })).toBeVisible();
  }
}

/** Applies a code to the current selection through the type-ahead picker (mouse path). */
export async function applyCode(page: Page, label: string): Promise<void> {
  await page.getByTestId('code-search').fill(label);
  await page.getByRole('listbox', { name: 'Codes' }).getByRole('option', { name: label, exact: true }).click();
  // the message ends with what the server made of it: saved, or kept on this device while offline
  await expect(page.getByTestId('coding-message')).toHaveText(new RegExp(`^Coded “${label.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')}”\\. (Saved\\.|Kept on this device)`));
}

/** The code names listed under each turn near the viewport (one per segment and turn). */
export function codeChips(page: Page) {
  return page.locator('.transcript .turn-codes .code-chip');
}

/** Segments per layer as the coding view's layer list states them ("Name (12 segments)"), summed. */
export async function segmentCount(page: Page): Promise<number> {
  const rows = await page.locator('.coding-side .layers li').allTextContents();
  return rows.reduce((n, r) => n + Number(/\((\d+) segments?\)/.exec(r)?.[1] ?? 0), 0);
}

/** Distinct segments listed under turns near the viewport (turns far off-screen list none). */
export async function drawnSegmentIds(page: Page): Promise<string[]> {
  return page.locator('.transcript .turn-codes .code-chip').evaluateAll((els) => [...new Set(els.map((e) => (e as HTMLElement).dataset.id!))]);
}
