// A team's first hour, in Chromium, on a server of its own that starts empty (no demo): the owner
// claims the server with the set-up code from its terminal, creates a study, uploads three
// transcripts of three formats (two broken files are refused per file and leave nothing), maps
// speakers to cases, invites a coder who accepts in a second browser context and codes; removing
// that coder closes their sockets; signing out leaves no IndexedDB database of the user.
// Expected behaviour: the project brief (issue 12) and DESIGN §8; WebSocket close from RFC 6455.
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import type { Page, WebSocket } from '@playwright/test';
import { test, expect, addCodes, selectWords, applyCode, openText, shot } from './fixtures.js';
import { startFreshServer, type FreshServer } from './fresh-server.js';

// fflate is the interchange package's ZIP library; borrowed from there to build a real .docx.
const { zipSync, strToU8 } = createRequire(new URL('../../packages/interchange/package.json', import.meta.url))('fflate') as {
  zipSync(files: Record<string, Uint8Array>): Uint8Array;
  strToU8(s: string): Uint8Array;
};
const fixture = (name: string) => readFileSync(new URL(`../../packages/interchange/src/fixtures/${name}`, import.meta.url));

// A minimal WordprocessingML package (ECMA-376 Parts 1 and 2, from memory), as test/coding/imports.test.ts builds it.
function docx(paragraphs: string[]): Buffer {
  const W = 'http://schemas.openxmlformats.org/wordprocessingml/2006/main';
  return Buffer.from(
    zipSync({
      '[Content_Types].xml': strToU8(
        '<?xml version="1.0" encoding="UTF-8"?><Types xmlns="http://schemas.openxmlformats.org/package/2006/content-types">' +
          '<Default Extension="rels" ContentType="application/vnd.openxmlformats-package.relationships+xml"/><Default Extension="xml" ContentType="application/xml"/>' +
          '<Override PartName="/word/document.xml" ContentType="application/vnd.openxmlformats-officedocument.wordprocessingml.document.main+xml"/></Types>',
      ),
      '_rels/.rels': strToU8(
        '<?xml version="1.0" encoding="UTF-8"?><Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships">' +
          '<Relationship Id="rId1" Type="http://schemas.openxmlformats.org/officeDocument/2006/relationships/officeDocument" Target="word/document.xml"/></Relationships>',
      ),
      'word/document.xml': strToU8(`<?xml version="1.0" encoding="UTF-8"?><w:document xmlns:w="${W}"><w:body>${paragraphs.map((p) => `<w:p><w:r><w:t xml:space="preserve">${p}</w:t></w:r></w:p>`).join('')}</w:body></w:document>`),
    }),
  );
}

const OWNER = { name: 'Wren Okafor', email: 'wren.okafor@example.test', password: 'first-owner-pw' };
const CODER = { name: 'Juno Varga', email: 'juno.varga@example.test', password: 'juno-password-1' };

async function glossDatabases(page: Page): Promise<string[]> {
  return page.evaluate(async () => (await indexedDB.databases()).map((d) => d.name ?? '').filter((n) => n.startsWith('gloss:')));
}

let server: FreshServer;
test.beforeAll(async () => {
  // a cold tsx start and a PGlite migration took over a minute on this loaded 2-core machine
  test.setTimeout(300_000);
  server = await startFreshServer();
});
test.afterAll(async () => {
  await server?.stop();
});

test('an owner starts a real study from nothing and brings in a coder', async ({ browser }) => {
  test.setTimeout(240_000);
  const ownerCtx = await browser.newContext({ baseURL: server.url, viewport: { width: 1400, height: 900 } });
  const owner = { context: ownerCtx, page: await ownerCtx.newPage(), name: OWNER.name };
  const page = owner.page;

  // first run: only the code from the terminal claims the server
  await page.goto('/');
  await expect(page.getByRole('heading', { name: 'Set up Gloss' })).toBeVisible();
  await shot(page, 'setup-first-run');
  await page.getByLabel('Set-up code').fill('AAAA-BBBB-CCCC');
  await page.getByLabel('Your name').fill(OWNER.name);
  await page.getByLabel('Email').fill(OWNER.email);
  await page.getByLabel(/^Password/).fill(OWNER.password);
  await page.getByRole('button', { name: 'Create the owner account' }).click();
  await expect(page.getByRole('alert')).toContainText('set-up code is not the one printed');
  await page.getByLabel('Set-up code').fill(server.setupCode);
  await page.getByRole('button', { name: 'Create the owner account' }).click();
  await expect(page.getByRole('heading', { name: 'Your studies' })).toBeVisible();
  await expect(page.getByTestId('no-studies')).toContainText('Create one below');
  await shot(page, 'setup-studies-empty');

  // a study from nothing
  const form = page.getByRole('form', { name: 'Create a study' });
  await form.getByLabel('Title').fill('Skerrow lighthouse keepers');
  await form.getByLabel('Description').fill('Life histories of retired keepers (an invented study).');
  await form.getByRole('radio', { name: /Coding reliability/ }).check();
  await form.getByLabel(/retention date/).fill('2031-06-30');
  await form.getByLabel(/Ethics approval/).fill('Skerrow College board (invented), ref. SC-21-04; consent covers transcripts.');
  await form.getByRole('button', { name: 'Create the study' }).click();
  await expect(page.getByRole('heading', { name: 'Study settings' })).toBeVisible();
  await expect(page.getByLabel(/Ethics approval/)).toHaveValue(/SC-21-04/);
  await shot(page, 'setup-settings-owner');

  // texts: empty state, then an upload of five files of which two are broken
  await page.getByRole('navigation', { name: 'Study screens' }).getByRole('link', { name: 'Texts' }).click();
  await expect(page.getByTestId('no-texts')).toContainText('Upload interview transcripts');
  await page.getByRole('link', { name: 'Upload texts' }).first().click();
  await page.getByTestId('file-input').setInputFiles([
    { name: 'harbour-interview.vtt', mimeType: 'text/vtt', buffer: fixture('harbour-interview.vtt') },
    { name: 'ferry-interview.srt', mimeType: 'application/x-subrip', buffer: fixture('ferry-interview.srt') },
    { name: 'choir.docx', mimeType: 'application/vnd.openxmlformats-officedocument.wordprocessingml.document', buffer: docx(['Interviewer: What did the choir sing?', 'P04: Mostly songs from the valley, and a hymn for the boats.']) },
    { name: 'broken.srt', mimeType: 'application/x-subrip', buffer: Buffer.from('1\n00:00:01,000 --> 00:00:03,000\nKAI: The ferry left at six.\n\n2\n00:00:0x,000 --> 00:00:05,000\nINTERVIEWER: Every day?\n') },
    { name: 'letter.docx', mimeType: 'application/vnd.openxmlformats-officedocument.wordprocessingml.document', buffer: Buffer.from('this is not a zip archive') },
  ]);
  const item = (name: string) => page.getByTestId('upload-item').filter({ has: page.getByText(name, { exact: true }) });
  for (const name of ['harbour-interview.vtt', 'ferry-interview.srt', 'choir.docx']) await expect(item(name)).toHaveAttribute('data-state', 'ready', { timeout: 30_000 });
  await expect(item('broken.srt')).toHaveAttribute('data-state', 'refused');
  await expect(item('broken.srt').getByRole('alert')).toContainText('line 6');
  await expect(item('broken.srt').getByRole('alert')).toContainText('Nothing from this file was stored');
  await expect(item('letter.docx')).toHaveAttribute('data-state', 'refused');
  await expect(item('letter.docx').getByRole('alert')).toContainText(/zip/i);
  // the preview: speakers and times before anything is stored
  await expect(item('harbour-interview.vtt').getByRole('table')).toContainText('Tobias Lund');
  await expect(item('harbour-interview.vtt')).toContainText('00:02');
  await expect(page.getByLabel('Case for INTERVIEWER in ferry-interview.srt')).toHaveValue('none');
  await expect(page.getByLabel('Case for GRETE in ferry-interview.srt')).toHaveValue('new');
  await page.getByLabel('Case for Interviewer in choir.docx').selectOption('none');
  await shot(page, 'setup-upload-preview');
  await page.getByRole('button', { name: 'Import 3 files' }).click();
  for (const name of ['harbour-interview.vtt', 'ferry-interview.srt', 'choir.docx']) await expect(item(name)).toHaveAttribute('data-state', 'done', { timeout: 60_000 });
  await expect(item('ferry-interview.srt').getByRole('status')).toContainText('linked to');
  await shot(page, 'setup-upload-done');

  // nothing of the refused files was left behind: exactly the three texts exist
  const texts = await page.evaluate(async (id) => (await (await fetch(`/api/studies/${id}/texts`)).json()) as Array<{ title: string; sourceFormat: string }>, page.url().split('/study/')[1]!.split('/')[0]!);
  expect(texts.map((t) => t.sourceFormat).sort()).toEqual(['docx', 'srt', 'vtt']);

  // speakers became cases, with their texts
  await page.getByRole('navigation', { name: 'Study screens' }).getByRole('link', { name: 'Cases' }).click();
  const cases = page.getByRole('table', { name: 'Cases' });
  await expect(cases.getByRole('rowheader')).toHaveText(['GRETE', 'P04', 'Tobias Lund'].sort((a, b) => a.localeCompare(b)));
  await expect(cases.getByRole('row', { name: /GRETE/ })).toContainText('(GRETE)');
  // an attribute, and a value checked against its type
  const attr = page.getByRole('form', { name: 'Add an attribute' });
  await attr.getByLabel('New attribute').fill('years of service');
  await attr.getByLabel('Type').selectOption('number');
  await attr.getByRole('button', { name: 'Add attribute' }).click();
  await page.getByLabel('years of service of GRETE').fill('many');
  await page.getByLabel('years of service of GRETE').press('Tab');
  await expect(page.getByRole('alert')).toContainText('does not fit number attribute years of service');
  await expect(page.getByLabel('years of service of GRETE')).toHaveAttribute('aria-invalid', 'true');
  await page.getByLabel('years of service of GRETE').fill('31');
  await page.getByLabel('years of service of GRETE').press('Tab');
  await expect(page.getByRole('alert')).toHaveCount(0);
  await shot(page, 'setup-cases-owner');

  // a code to use, then an invitation link for a coder
  await addCodes(owner, ['Learning the trade']);
  await page.getByRole('navigation', { name: 'Study screens' }).getByRole('link', { name: 'Members' }).click();
  const invite = page.getByRole('form', { name: 'Invite by email' });
  await invite.getByLabel('Email').fill(CODER.email);
  await invite.getByLabel('Role').selectOption('coder');
  await invite.getByRole('button', { name: 'Make invitation link' }).click();
  const link = await page.getByTestId('link').inputValue();
  expect(link).toMatch(/\/#\/invite\/[a-z2-7]{32}$/);
  await shot(page, 'setup-members-invite');

  // the coder, in a browser of their own
  const coderCtx = await browser.newContext({ viewport: { width: 1400, height: 900 } });
  const coder = { context: coderCtx, page: await coderCtx.newPage(), name: CODER.name };
  const sockets: WebSocket[] = [];
  coder.page.on('websocket', (ws) => sockets.push(ws));
  await coder.page.goto(link);
  await expect(coder.page.getByRole('heading', { name: 'Join a study' })).toBeVisible();
  await expect(coder.page.getByText('Skerrow lighthouse keepers')).toBeVisible();
  await shot(coder.page, 'setup-invitation');
  await coder.page.getByLabel(/Your name/).fill(CODER.name);
  await coder.page.getByLabel(/Choose a password/).fill(CODER.password);
  await coder.page.getByRole('button', { name: 'Join the study' }).click();
  await expect(coder.page.getByRole('heading', { name: 'Skerrow lighthouse keepers' })).toBeVisible();
  await openText(coder);
  await selectWords(coder.page, 'Rope splicing');
  await applyCode(coder.page, 'Learning the trade');
  expect((await glossDatabases(coder.page)).length).toBeGreaterThan(0);

  // the link worked once: a second visit is refused in words
  const again = await browser.newContext();
  const againPage = await again.newPage();
  await againPage.goto(link);
  await expect(againPage.getByRole('alert')).toContainText('used already');
  await again.close();

  // removing the coder closes their open connections at once
  const open = sockets.filter((ws) => !ws.isClosed());
  expect(open.length).toBeGreaterThan(0);
  await page.reload();
  await expect(page.getByRole('cell', { name: CODER.name })).toBeVisible();
  page.once('dialog', (d) => void d.accept());
  await page.getByRole('row', { name: new RegExp(CODER.name) }).getByRole('button', { name: 'Remove' }).click();
  await expect(page.getByRole('cell', { name: CODER.name })).toHaveCount(0);
  await expect.poll(() => open.filter((ws) => !ws.isClosed()).length, { timeout: 20_000, message: 'the removed coder’s sockets close' }).toBe(0);

  // sign-out forgets the coder's documents on that device
  await coder.page.getByRole('button', { name: 'Sign out' }).click();
  await expect(coder.page.getByRole('button', { name: 'Sign in' })).toBeVisible();
  await expect(coder.page.getByTestId('offline-copy-note')).toContainText('Signing out deletes that copy');
  await expect.poll(() => glossDatabases(coder.page), { timeout: 20_000 }).toEqual([]);
  expect(await coder.page.evaluate(() => Object.keys(localStorage).filter((k) => k.startsWith('gloss:')))).toEqual([]);
  await shot(coder.page, 'setup-signed-out');

  // the audit log shows what happened, filterable
  await page.getByRole('navigation', { name: 'Study screens' }).getByRole('link', { name: 'Audit log' }).click();
  await expect(page.getByRole('table', { name: 'Log entries' })).toContainText('member.join');
  await page.getByLabel('What').selectOption('member.');
  await expect(page.getByRole('table', { name: 'Log entries' }).locator('tbody tr')).not.toHaveCount(0);
  for (const action of await page.getByRole('table', { name: 'Log entries' }).locator('tbody code').allTextContents()) expect(action).toMatch(/^member\./);
  await shot(page, 'setup-audit-owner');

  // versions: name one of a text, change nothing, compare with now
  await page.getByRole('navigation', { name: 'Study screens' }).getByRole('link', { name: 'Versions' }).click();
  await expect(page.getByTestId('no-versions')).toBeVisible();
  await page.getByRole('form', { name: 'Name a version' }).getByLabel(/Name the current state/).fill('codebook at set-up');
  await page.getByRole('button', { name: 'Name version' }).click();
  await expect(page.getByRole('table', { name: 'Named versions' })).toContainText(OWNER.name);
  await page.getByRole('form', { name: 'Compare versions' }).getByLabel('Compare').selectOption({ label: 'codebook at set-up' });
  await page.getByRole('button', { name: 'Compare' }).click();
  await expect(page.getByTestId('codebook-changes')).toContainText('No change since this version');
  await shot(page, 'setup-versions-owner');

  await Promise.all([ownerCtx.close(), coderCtx.close()]);
});
