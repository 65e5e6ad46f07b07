// Telling the truth (issue 15 item 2): each role is driven through each control of the coding view, and
// every message says what happened on the server. Controls a role may not use are not offered; an
// observer's key presses are refused in plain words and leave nothing behind after a reload; a change
// the server refuses (the person's role was lowered while the text was open) is reported at once and
// taken back on the page. Messages come from one table (apps/web/src/screens/coding/coding-actions.ts).
import { test, expect, account, signIn, openText, selectWords, applyCode, type Person } from './fixtures.js';

const TEXT = 'P03 — sound and setup, Ferrowgate Film Club';
const msg = (p: Person) => p.page.getByTestId('coding-message');
const tool = (p: Person, name: string) => p.page.getByRole('toolbar', { name: 'Coding tools' }).getByRole('button', { name, exact: true });
const chips = (p: Person) => p.page.locator('.transcript .turn-codes .code-chip');
const panel = (p: Person) => p.page.getByTestId('segment-panel');
const notesHere = (p: Person) => p.page.getByTestId('notes-here');
const turnWith = (p: Person, words: string) => p.page.locator('.transcript .turn').filter({ has: p.page.locator('.words', { hasText: words }) });
/** The words under the coding view's jotting marks (CSS highlight ranges), as the page paints them. */
const jottingMarks = (p: Person) => p.page.evaluate(() => [...((CSS as unknown as { highlights: Map<string, Set<Range>> }).highlights.get('gloss-jotting') ?? [])].map((r) => r.toString()));
async function ready(p: Person): Promise<void> {
  await expect(p.page.getByTestId('coding-view')).toHaveAttribute('data-ready', 'yes', { timeout: 20_000 });
  await expect(p.page.getByTestId('connection-status')).toHaveAttribute('data-state', 'online');
}
const RECODE = 'Recognition';

// one phrase per role, so the roles' segments and in vivo codes do not meet; none of them is a phrase
// corrections.spec rewrites, and the file runs after supervision.spec (whose reference is the lead's P03 layer)
const PHRASES: Record<string, { code: string; inVivo: string; jot: string }> = {
  owner: { code: 'the Tuesday yoga', inVivo: 'speakers from someone', jot: 'the industrial estate' },
  lead: { code: 'Everything that plugs in', inVivo: 'sorting it ever since', jot: 'three weekends' },
  coder: { code: 'Twice a month', inVivo: 'the summer outdoor one', jot: 'It\'s satisfying' },
  trainee: { code: 'the hall committee rings', inVivo: 'the licence person', jot: 'the toddlers in this morning' },
};
// A trainee reads only the texts assigned to them (issue 9); the demo assigns them P01 and P04.
const TEXT_OF: Record<string, string> = { trainee: 'P04 — chair and treasurer, Ferrowgate Film Club' };

for (const role of ['owner', 'lead', 'coder', 'trainee'] as const) {
  test(`${role}: every control's message says what the server did`, async ({ browser, baseURL }) => {
    test.setTimeout(120_000); // every control of the view, two reloads: a minute is short on a loaded machine
    const p = await signIn(browser, account(role), baseURL!);
    await openText(p, TEXT_OF[role] ?? TEXT);
    const writesCodebook = role === 'owner' || role === 'lead';
    const ph = PHRASES[role]!;

    await selectWords(p.page, ph.code);
    await applyCode(p.page, 'Workload');
    await expect(msg(p)).toHaveText('Coded “Workload”. Saved.');
    await tool(p, 'Undo').click();
    await expect(msg(p)).toHaveText('Undone: coded “Workload”. Saved.');
    await tool(p, 'Redo').click();
    await expect(msg(p)).toHaveText('Redone: coded “Workload”. Saved.');

    // the segment panel of the segment just coded: each control, each message from the server's answer
    await expect(panel(p).getByRole('heading')).toContainText('Workload');
    // a jotting with nothing else selected goes on the segment, and is shown beside it with Reply
    await p.page.keyboard.press('j');
    await p.page.getByLabel('Jotting', { exact: true }).fill(`A ${role}'s jotting on a segment.`);
    await p.page.getByRole('button', { name: 'Keep jotting' }).click();
    await expect(msg(p)).toHaveText('Jotting added to the memos. Saved.');
    await expect(notesHere(p).getByTestId('note-here')).toContainText(`A ${role}'s jotting on a segment.`);
    await expect(notesHere(p).getByRole('button', { name: 'Reply', exact: true })).toBeVisible();
    const note = panel(p).getByLabel(/Note on this segment/);
    await note.fill(`The ${role}'s note.`);
    await note.press('Tab'); // leaving the note keeps it
    await expect(msg(p)).toHaveText('Note on “Workload” changed. Saved.');
    await panel(p).getByRole('button', { name: 'End one word later' }).click();
    await expect(msg(p)).toHaveText('Resized “Workload”. Saved.');
    await selectWords(p.page, ph.code);
    await panel(p).getByRole('button', { name: 'Fit to selection' }).click();
    await expect(msg(p)).toHaveText('Segment fitted to the selection. Saved.');
    await panel(p).getByRole('button', { name: 'Recode…' }).click();
    await applyCodeOption(p, RECODE);
    await expect(msg(p)).toHaveText(`Recoded as “${RECODE}”. Saved.`);
    await expect(panel(p).getByRole('button', { name: 'Use as example' })).toHaveCount(writesCodebook ? 1 : 0);
    if (writesCodebook) {
      await panel(p).getByRole('button', { name: 'Use as near-miss' }).click();
      await expect(msg(p)).toHaveText('Added as a near-miss. Saved.');
    }
    // what the server kept is what a reload shows: the recoded segment with its note and its jotting
    await p.page.reload();
    await ready(p);
    await turnWith(p, ph.code).scrollIntoViewIfNeeded();
    const chip = turnWith(p, ph.code).locator('.code-chip').filter({ hasText: RECODE }).filter({ has: p.page.getByTestId('note-mark') });
    await expect(chip).toHaveCount(1);
    await expect(chip.getByTestId('jotting-mark')).toHaveText('✉1 jottings');
    await chip.click();
    await expect(panel(p).getByLabel(/Note on this segment/)).toHaveValue(`The ${role}'s note.`);
    await expect(panel(p).getByTestId('segment-quote')).toHaveText(ph.code);
    await expect(notesHere(p)).toContainText(`A ${role}'s jotting on a segment.`);
    await panel(p).getByRole('button', { name: 'Remove' }).click();
    await expect(msg(p)).toHaveText(`Removed the segment coded “${RECODE}”. Saved.`);
    await p.page.reload();
    await ready(p);
    await turnWith(p, ph.code).scrollIntoViewIfNeeded();
    await expect(turnWith(p, ph.code).locator('.code-chip').filter({ has: p.page.getByTestId('note-mark') }).filter({ hasText: RECODE })).toHaveCount(0);

    await selectWords(p.page, ph.inVivo);
    await tool(p, 'In vivo code').click();
    await expect(msg(p)).toHaveText(writesCodebook
      ? `In vivo code “${ph.inVivo}” added and applied. Saved.`
      : `In vivo code “${ph.inVivo}” proposed to the lead and applied; it shows as “(proposed)” until they decide. Saved.`);

    await selectWords(p.page, ph.jot);
    await tool(p, 'Jotting').click();
    await p.page.getByLabel('Jotting', { exact: true }).fill(`A ${role}'s jotting.`);
    await p.page.getByRole('button', { name: 'Keep jotting' }).click();
    await expect(msg(p)).toHaveText('Jotting added to the memos. Saved.');
    // on those words, not the whole text: marked over them, listed under their turn, shown with Reply
    await expect.poll(() => jottingMarks(p)).toContain(ph.jot);
    await expect(turnWith(p, ph.jot).getByTestId('jotting-chip').filter({ hasText: ph.jot })).toHaveAttribute('aria-pressed', 'true');
    await expect(notesHere(p).getByTestId('note-here')).toContainText(`A ${role}'s jotting.`);
    await notesHere(p).getByRole('button', { name: 'Reply', exact: true }).click();
    await notesHere(p).getByLabel('Your reply').fill(`The ${role} answers their own jotting.`);
    await notesHere(p).getByRole('button', { name: 'Send reply' }).click();
    await expect(notesHere(p).getByTestId('reply-message')).toHaveText('Reply added. Saved.');
    await expect(notesHere(p).getByTestId('memo-reply')).toContainText(`The ${role} answers their own jotting.`);

    const form = p.page.getByRole('form', { name: writesCodebook ? 'New code' : 'Propose a code' });
    await form.getByRole('textbox').fill(`Checked by the ${role}`);
    await form.getByRole('button').click();
    await expect(msg(p)).toHaveText(writesCodebook
      ? `Code “Checked by the ${role}” added to the codebook. Saved.`
      : `Code “Checked by the ${role}” proposed to the lead: it shows as “(proposed)” until they decide. Saved.`);

    // correcting the transcript is offered only to those who may (the lead and the owner)
    await expect(tool(p, 'Correct words…')).toHaveCount(writesCodebook ? 1 : 0);
    await p.context.close();
  });
}

async function applyCodeOption(p: Person, label: string): Promise<void> {
  await p.page.getByTestId('code-search').fill(label);
  await p.page.getByRole('listbox', { name: 'Codes' }).getByRole('option', { name: label, exact: true }).click();
}

test('observer: nothing to code with is offered, every key press is refused in words, nothing is left after reload', async ({ browser, baseURL }) => {
  test.setTimeout(120_000);
  const p = await signIn(browser, account('observer'), baseURL!);
  await openText(p, TEXT);
  for (const name of ['Undo', 'Redo', 'In vivo code', 'Jotting', 'Correct words…']) await expect(tool(p, name)).toHaveCount(0);
  await expect(p.page.getByTestId('code-search')).toHaveCount(0);
  await expect(p.page.getByRole('form', { name: /New code|Propose a code/ })).toHaveCount(0);
  const before = await chips(p).count();

  await selectWords(p.page, 'Nobody compliments the wiring');
  await p.page.getByTestId('transcript').focus();
  await p.page.keyboard.press('c');
  await expect(msg(p)).toHaveText('Not saved: observers cannot code passages.');
  await p.page.keyboard.press('i');
  await expect(msg(p)).toHaveText('Not saved: observers cannot create in vivo codes.');
  await p.page.keyboard.press('j');
  await expect(msg(p)).toHaveText('Not saved: observers cannot add jottings.');
  await p.page.keyboard.press('Control+z');
  await expect(msg(p)).toHaveText('Not saved: observers cannot undo coding.');

  // another's segment, chosen: read, with none of its coder's controls; its keys are refused in words
  await chips(p).first().click();
  await expect(panel(p)).toBeVisible();
  for (const name of ['Recode…', 'Remove', 'Fit to selection', 'Start one word earlier', 'End one word later', 'Use as example', 'Use as near-miss', 'Re-checked: still fits']) {
    await expect(panel(p).getByRole('button', { name })).toHaveCount(0);
  }
  await expect(panel(p).getByLabel(/Note on this segment/)).toHaveCount(0);
  await p.page.getByTestId('transcript').focus();
  await p.page.keyboard.press('r');
  await expect(msg(p)).toHaveText('Not saved: observers cannot recode segments.');
  await p.page.keyboard.press('n');
  await expect(msg(p)).toHaveText('Not saved: observers cannot add notes to segments.');
  await p.page.keyboard.press('Alt+ArrowRight');
  await expect(msg(p)).toHaveText('Not saved: observers cannot resize segments.');
  await p.page.keyboard.press('Delete');
  await expect(msg(p)).toHaveText('Not saved: observers cannot remove segments.');
  // the roles' jottings are on their words: an observer reads one and its replies, and is offered no Reply
  const jotted = turnWith(p, PHRASES.owner!.jot).getByTestId('jotting-chip').filter({ hasText: PHRASES.owner!.jot });
  await turnWith(p, PHRASES.owner!.jot).scrollIntoViewIfNeeded(); // a turn lists its codes and jottings once near the viewport
  await jotted.click();
  await expect(notesHere(p).getByTestId('note-here')).toContainText("A owner's jotting.");
  await expect(notesHere(p).getByTestId('memo-reply')).toContainText('The owner answers their own jotting.');
  await expect(notesHere(p).getByRole('button', { name: 'Reply', exact: true })).toHaveCount(0);

  await p.page.reload();
  await expect(p.page.getByTestId('coding-view')).toHaveAttribute('data-ready', 'yes', { timeout: 20_000 });
  await expect.poll(() => chips(p).count()).toBe(before);
  await p.page.getByRole('navigation', { name: 'Study screens' }).getByRole('link', { name: 'Memos' }).click();
  await expect(p.page.getByTestId('memo-search')).toBeVisible();
  await expect(p.page.getByText('On “Nobody compliments the wiring”')).toHaveCount(0);
  await p.context.close();
});

test('a change the server refuses is reported at once and taken back on the page', async ({ browser, baseURL }) => {
  const lead = await signIn(browser, account('lead'), baseURL!);
  const who = account('coder', 2);
  const coder = await signIn(browser, who, baseURL!);
  await openText(coder, TEXT);
  const api = lead.context.request;
  const headers = { origin: baseURL! };
  const studyId = ((await (await api.get('/api/studies')).json()) as Array<{ id: string }>)[0]!.id;
  const members = (await (await api.get(`/api/studies/${studyId}/members`)).json()) as Array<{ userId: string; email: string }>;
  const member = members.find((m) => m.email === who.email)!;
  const turn = coder.page.locator('.transcript .turn').filter({ has: coder.page.locator('.words', { hasText: 'Does it ever go bang?' }) });
  try {
    // lowered to observer while the text is open: the page still offers coding (it has not heard yet)
    expect((await api.patch(`/api/studies/${studyId}/members/${member.userId}`, { headers, data: { role: 'observer' } })).status()).toBe(200);
    await selectWords(coder.page, 'Does it ever go bang?');
    await coder.page.getByTestId('code-search').fill('Workload');
    await coder.page.getByRole('listbox', { name: 'Codes' }).getByRole('option', { name: 'Workload', exact: true }).click();
    await expect(msg(coder)).toHaveText('Not saved: the server refused it (you may now only read this document). It has been taken back here.');
    await expect(turn.locator('.turn-codes .code-chip')).toHaveCount(0);
    await coder.page.reload();
    await expect(coder.page.getByTestId('coding-view')).toHaveAttribute('data-ready', 'yes', { timeout: 20_000 });
    await turn.scrollIntoViewIfNeeded();
    await expect(turn.locator('.turn-codes .code-chip')).toHaveCount(0);
  } finally {
    await api.patch(`/api/studies/${studyId}/members/${member.userId}`, { headers, data: { role: 'coder' } });
    await Promise.all([lead, coder].map((p) => p.context.close()));
  }
});
