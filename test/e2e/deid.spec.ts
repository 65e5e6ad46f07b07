// De-identification in the browser (issue 12 item 6), on a server of its own: an owner writes a memo
// naming a participant, finds the identifiers of two hand-built texts and of the memo (the screen says
// where each was found), accepts them (one pseudonym edited), applies, purges and reads "0 occurrences
// left in the database"; a second tab that held the text (and so the codebook and memos) open is
// closed with 4410, discards its IndexedDB copies of the old rooms, reloads onto the rebuilt ones and
// says why; the memo reads the pseudonym.
// Expected behaviour: the project brief (issue 12) and DESIGN §8.
import { test, expect, shot } from './fixtures.js';
import { startFreshServer, type FreshServer } from './fresh-server.js';

const OWNER = { email: 'noor.owner@example.test', name: 'Noor Vasquez', password: 'owner-password-1' };
const TEXTS = [
  { title: 'Helpers 1', content: 'I: Who helped you at first?\nP3: Dana Whitcombe did. Dana drove me to Lowmere every week.' },
  { title: 'Helpers 2', content: 'I: And later?\nP7: Later Dana Whitcombe moved to Lowmere for good.' },
];

let server: FreshServer;
let studyId = '';
let cookie = '';

async function api(method: string, path: string, body?: unknown): Promise<Response> {
  return fetch(server.url + path, { method, headers: { origin: server.url, 'content-type': 'application/json', ...(cookie ? { cookie } : {}) }, body: body === undefined ? undefined : JSON.stringify(body) });
}

test.beforeAll(async () => {
  test.setTimeout(300_000);
  server = await startFreshServer();
  const setup = await api('POST', '/api/setup', { ...OWNER, code: server.setupCode });
  expect(setup.status).toBe(201);
  cookie = setup.headers.getSetCookie().map((c) => c.split(';')[0]).join('; ');
  const study = await api('POST', '/api/studies', { title: 'Community transport', description: '', mode: 'standard', retentionUntil: null, ethicsNote: '' });
  studyId = ((await study.json()) as { id: string }).id;
  for (const t of TEXTS) expect((await api('POST', `/api/studies/${studyId}/texts`, t)).status).toBe(201);
});
test.afterAll(async () => server?.stop());

test('an owner finds, accepts, applies and purges; an open copy is discarded and reloaded', async ({ browser }) => {
  test.setTimeout(300_000);
  const context = await browser.newContext({ baseURL: server.url, viewport: { width: 1400, height: 900 } });
  const reader = await context.newPage();
  await reader.goto('/');
  await reader.getByLabel('Email').fill(OWNER.email);
  await reader.getByLabel('Password').fill(OWNER.password);
  await reader.getByRole('button', { name: 'Sign in' }).click();
  await reader.getByRole('list', { name: 'Studies' }).getByRole('link').first().click();
  await reader.getByRole('link', { name: 'Helpers 1' }).click();
  await expect(reader.getByTestId('coding-view')).toHaveAttribute('data-ready', 'yes', { timeout: 30_000 });
  await expect(reader.getByText('Dana Whitcombe did.')).toBeVisible();
  const oldRoom = ((await (await api('GET', `/api/studies/${studyId}/texts`)).json()) as Array<{ title: string; room: string }>).find((t) => t.title === 'Helpers 1')!.room;
  const copies = () => reader.evaluate(async () => (await indexedDB.databases()).map((d) => d.name ?? ''));
  await expect.poll(copies).toContain(`gloss:${oldRoom}`);

  const page = await context.newPage();
  // a memo names the participant too: the finder must look there, and the purge must rebuild it
  await page.goto(`/#/study/${studyId}`);
  await page.getByRole('navigation', { name: 'Study screens' }).getByRole('link', { name: 'Memos' }).click();
  await page.getByLabel('Title').fill('Who drives');
  await page.getByLabel('Memo', { exact: true }).fill('Dana Whitcombe drives half the participants; ask about Lowmere.');
  await page.getByRole('button', { name: 'Keep memo' }).click();
  await expect(page.locator('.memo-list')).toContainText('Who drives');
  // the memo is typed into the browser's copy first: wait until the server has it (the finder reads the server's)
  await expect
    .poll(async () => {
      const res = await api('POST', `/api/studies/${studyId}/deid/candidates`, { list: [] });
      const found = ((await res.json()) as { candidates: Array<{ original: string; where: string[] }> }).candidates;
      return found.find((c) => c.original === 'Dana Whitcombe')?.where ?? [];
    }, { timeout: 30_000 })
    .toContain('memos');
  const studyRooms = (await (await api('GET', `/api/studies/${studyId}`)).json()) as { codebookRoom: string; memosRoom: string };

  await page.goto(`/#/study/${studyId}/deid`);
  await expect(page.getByRole('heading', { name: 'De-identify the texts' })).toBeVisible();
  await page.getByLabel('Study-specific terms').fill('Lowmere');
  await page.getByRole('button', { name: 'Find identifiers' }).click();
  const table = page.getByRole('table', { name: 'Candidates' });
  await expect(table.getByRole('rowheader', { name: 'Dana Whitcombe', exact: true })).toBeVisible();
  await expect(table.getByRole('rowheader', { name: 'Lowmere', exact: true })).toBeVisible();
  // where each was found: the two texts and the memo
  await expect(table.getByRole('row', { name: /^Dana Whitcombe\b/ })).toContainText('in 2 text(s), memos');
  // the reviewer edits one pseudonym
  await page.getByLabel('Pseudonym for Lowmere').fill('[Town A]');
  await table.scrollIntoViewIfNeeded();
  await shot(page, 'deid-review-owner');
  await page.getByRole('button', { name: /^Apply \d+ replacement/ }).click();
  await expect(page.getByTestId('applied')).toContainText(/Replaced \d+ occurrence\(s\) in 2 text\(s\)/);
  await expect(page.getByTestId('applied')).toContainText('Also replaced: 2 in memos and replies.');
  // before the purge, the history still holds the originals, and the screen says so
  await expect(page.getByTestId('scan-result')).toContainText('still hold original words');
  await expect(reader.getByText('[Town A] every week')).toBeVisible();

  await page.getByRole('button', { name: 'Purge the originals…' }).click();
  await expect(page.getByRole('alertdialog', { name: 'Purge the originals?' })).toContainText('named versions');
  await page.getByRole('button', { name: 'Purge now' }).click();
  // this tab had the codebook open too: it reloads once the purge has answered and still shows the answer
  await expect(page.getByTestId('reload-notice')).toContainText('rebuilt', { timeout: 60_000 });
  await expect(page.getByTestId('scan-result')).toContainText('0 occurrences left in the database', { timeout: 60_000 });
  await page.getByTestId('scan-result').scrollIntoViewIfNeeded();
  await shot(page, 'deid-purged-owner');

  // the tab that held the old copy was told 4410: it dropped the copy, reloaded onto the new room and says why
  await expect(reader.getByTestId('reload-notice')).toContainText('rebuilt', { timeout: 30_000 });
  await expect(reader.getByTestId('coding-view')).toHaveAttribute('data-ready', 'yes', { timeout: 30_000 });
  await expect(reader.getByText('[Town A] every week')).toBeVisible();
  expect(await copies()).not.toContain(`gloss:${oldRoom}`);
  // the codebook and memos were rebuilt too: their old copies on this device are gone as well
  expect(await copies()).not.toContain(`gloss:${studyRooms.memosRoom}`);
  expect(await copies()).not.toContain(`gloss:${studyRooms.codebookRoom}`);
  await shot(reader, 'deid-reloaded-reader');
  await reader.goto(`/#/study/${studyId}`);
  await reader.getByRole('navigation', { name: 'Study screens' }).getByRole('link', { name: 'Memos' }).click();
  await expect(reader.locator('.memo-list')).toContainText('Who drives');
  await expect(reader.locator('.memo-list .memo-body').first()).toHaveText(/^\[Person \d+\] drives half the participants; ask about \[Town A\]\.$/);
  await expect(reader.locator('.memo-list')).not.toContainText('Dana');
  await shot(reader, 'deid-memo-after-owner');

  // the owner's key holds the originals; a lead or coder never sees this part
  await page.getByRole('button', { name: 'Show the key' }).click();
  await expect(page.getByRole('table', { name: 'Pseudonym key' })).toContainText('Dana Whitcombe');
  await shot(page, 'deid-key-owner');

  // deletion is offered with a confirmation that says what goes (the deletion itself: test/server/deletion.test.ts)
  const tabs = page.getByRole('navigation', { name: 'Study screens' });
  await tabs.getByRole('link', { name: 'Texts' }).click();
  await page.getByRole('button', { name: 'Delete Helpers 2' }).click();
  await expect(page.getByRole('alertdialog', { name: 'Delete Helpers 2?' })).toContainText('cannot be undone');
  await shot(page, 'delete-text-confirm-owner');
  await page.getByRole('button', { name: 'Keep it' }).click();
  await tabs.getByRole('link', { name: 'Settings' }).click();
  const zone = page.getByRole('form', { name: 'Delete this study' });
  await expect(zone.getByRole('button', { name: 'Delete the study and all its data' })).toBeDisabled();
  await zone.getByLabel('Type the study’s title to confirm').fill('Community transport');
  await expect(zone.getByRole('button', { name: 'Delete the study and all its data' })).toBeEnabled();
  await zone.scrollIntoViewIfNeeded();
  await shot(page, 'delete-study-owner');
  await context.close();
});
