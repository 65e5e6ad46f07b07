// Supervision in the browser (issue 9): the lead assigns a text to the trainee; the trainee codes it;
// the lead compares the trainee's layer with their own (chosen as the text's reference), comments on
// two places and returns the text; the trainee sees the state, the note and the feedback, fixes one
// segment and replies; the lead compares again and accepts. A second test runs two calibration rounds
// with the trainee and checks that the progress chart and table show them, with the drift flag. (Expected behaviour: issue 9;
// categories: common practice in supervised coding review, defined in packages/model comparison.ts.)
import { test, expect, account, signIn, openText, selectWords, applyCode, shot, type Person } from './fixtures.js';

const TEXT = 'P03 — sound and setup, Ferrowgate Film Club';
const ROUND_TEXT = 'P02 — Saturday matinee and publicity, Beacon Picture Hall (with P02b)';
const ROUND_NAME = 'Supervised practice round';
const A = "I'm an electrician by trade"; // both: Pride in craft (the same)
const B = "The heating's on a timer that the hall committee controls"; // lead: Who decides; trainee: Money worries (other code)
const C = "It's always this cold"; // trainee only: Workload (extra)

async function openSupervision(p: Person): Promise<void> {
  const tabs = p.page.getByRole('navigation', { name: 'Study screens' });
  if (!(await tabs.isVisible())) await p.page.getByRole('list', { name: 'Studies' }).getByRole('link').first().click();
  await tabs.getByRole('link', { name: 'Supervision' }).click();
}

/** Same-origin API calls from a signed-in page (the browser sends the Origin the server checks). */
async function api<T>(p: Person, method: string, path: string, body?: unknown): Promise<T> {
  const out = await p.page.evaluate(
    async ([method, path, body]) => {
      const res = await fetch(path, { method, headers: body === undefined ? {} : { 'content-type': 'application/json' }, body: body === undefined ? undefined : JSON.stringify(body) });
      return { status: res.status, body: res.status === 204 ? null : await res.json() };
    },
    [method, path, body] as const,
  );
  if (out.status >= 300) throw new Error(`${method} ${path}: ${out.status} ${JSON.stringify(out.body)}`);
  return out.body as T;
}

test('assign, code, compare, comment, return, fix, reply, accept', async ({ browser, baseURL }) => {
  test.setTimeout(600_000); // two people, many screens and a round: slow on a loaded machine
  const traineeAccount = account('trainee');
  const lead = await signIn(browser, account('lead'), baseURL!);

  // The lead codes the reference: A and B.
  await openText(lead, TEXT);
  await selectWords(lead.page, A);
  await applyCode(lead.page, 'Pride in craft');
  await selectWords(lead.page, B);
  await applyCode(lead.page, 'Who decides');

  // The trainee cannot see the text before it is assigned.
  const trainee = await signIn(browser, traineeAccount, baseURL!);
  await trainee.page.getByRole('list', { name: 'Studies' }).getByRole('link').first().click();
  await expect(trainee.page.getByRole('heading', { name: 'Texts' })).toBeVisible();
  await expect(trainee.page.locator('table.texts')).not.toContainText(TEXT);

  // The lead assigns it.
  await openSupervision(lead);
  await lead.page.locator('#assign-text').selectOption({ label: TEXT });
  await lead.page.locator('#assign-person').selectOption({ label: `${traineeAccount.name} (trainee)` });
  await lead.page.getByRole('button', { name: 'Assign', exact: true }).click();
  await expect(lead.page.getByText(`Assigned “${TEXT}” to ${traineeAccount.name}.`)).toBeVisible();

  // The trainee finds it under their texts and codes it: A the same, B with another code, C extra.
  await openSupervision(trainee);
  const mine = trainee.page.locator('li.assignment', { hasText: TEXT });
  await expect(mine).toContainText('Being coded');
  await mine.getByRole('link', { name: TEXT }).click();
  await expect(trainee.page.getByTestId('coding-view')).toHaveAttribute('data-ready', 'yes', { timeout: 20_000 });
  await selectWords(trainee.page, A);
  await applyCode(trainee.page, 'Pride in craft');
  await selectWords(trainee.page, B);
  await applyCode(trainee.page, 'Money worries');
  await selectWords(trainee.page, C);
  await applyCode(trainee.page, 'Workload');

  // The lead opens the review, makes their own layer the reference and shares the comparison.
  await openSupervision(lead);
  const row = lead.page.locator('table.assignments tr', { hasText: TEXT });
  await row.getByRole('button', { name: `Review ${traineeAccount.name}` }).click();
  const review = lead.page.locator('.review-assignment');
  await review.getByLabel('Reference for this text').selectOption({ label: 'Your layer' });
  await review.getByRole('button', { name: 'Save reference' }).click();
  await expect(review.locator('.compare-counts caption')).toContainText(`${traineeAccount.name}’s layer against your layer`, { timeout: 20_000 });
  const count = (title: string) => review.locator(`section.compare-list[aria-label="${title}"] .count`);
  await expect(count('Other code')).toHaveText('1');
  await expect(count('Extra')).toHaveText('1');
  await expect(count('Missed')).toHaveText('0');
  // Side by side: the other-code place shows both codes; its row jumps to the place in the list.
  const sbs = review.locator('table.sbs tr[data-category="otherCode"]');
  await expect(sbs).toContainText('Who decides');
  await expect(sbs).toContainText('Money worries');
  await sbs.getByRole('link', { name: 'Other code' }).click();
  await expect(review.locator('li.place[data-category="otherCode"]')).toBeFocused();

  // Comments on two places.
  for (const [category, words] of [['otherCode', 'Read the definition of Who decides: B is about control, not cost.'], ['extra', 'Is the cold a workload, or the setting?']] as const) {
    const place = review.locator(`li.place[data-category="${category}"]`);
    await place.getByLabel('Comment on this place').fill(words);
    await place.getByRole('button', { name: 'Add comment' }).click();
    await expect(place.getByRole('status')).toHaveText('Comment saved.');
  }
  await review.getByLabel('Share the comparison', { exact: false }).check();
  await expect(review.locator(':scope > p.message')).toHaveText('Comparison shared.');
  await review.getByLabel('What to look at again (sent with a return)').fill('Look again at who decides about the heating, and at the first turn.');
  await review.getByRole('button', { name: 'Return with feedback' }).click();
  await expect(review.locator(':scope > p.message')).toHaveText('Returned with feedback.');
  await expect(row).toContainText('Returned with feedback');
  await shot(lead.page, 'supervision-lead-review');

  // The trainee sees the state, the note and the two threads; replies to one.
  await openSupervision(trainee);
  await expect(mine).toContainText('Returned with feedback');
  await expect(mine).toContainText('Look again at who decides about the heating');
  await mine.getByRole('button', { name: 'Compare with the reference' }).click();
  await expect(mine.locator('table.sbs')).toContainText('Who decides');
  await shot(trainee.page, 'supervision-trainee-returned');
  await trainee.page.getByRole('navigation', { name: 'Study screens' }).getByRole('link', { name: 'Review' }).click();
  const threads = trainee.page.locator('.thread-list li.thread');
  await expect(threads).toHaveCount(2);
  const onB = threads.filter({ hasText: 'Read the definition of Who decides' });
  await onB.getByLabel('Reply').fill('You are right: the committee decides. I have changed it.');
  await onB.getByRole('button', { name: 'Send reply' }).click();
  await expect(onB.getByRole('status')).toHaveText('Reply saved.');
  await shot(trainee.page, 'supervision-trainee-feedback');

  // The trainee fixes B: removes the Money worries segment and codes the words Who decides.
  await openText(trainee, TEXT);
  await trainee.page.getByTestId('transcript').focus();
  // Step through the trainee's own segments (the only layer drawn for them) until that one is chosen.
  const panelText = () => trainee.page.getByTestId('segment-panel').textContent({ timeout: 2_000 }).catch(() => '');
  for (let i = 0; i < 10 && !/Money worries/.test((await panelText()) ?? ''); i++) await trainee.page.keyboard.press(']');
  await expect(trainee.page.getByTestId('segment-panel')).toContainText('Money worries');
  await trainee.page.getByTestId('segment-panel').getByRole('button', { name: 'Remove' }).click();
  await selectWords(trainee.page, B);
  await applyCode(trainee.page, 'Who decides');

  // The lead compares again (the fix is stored once the count falls) and accepts.
  await expect
    .poll(async () => {
      await review.getByRole('button', { name: 'Compare' }).click();
      return count('Other code').textContent({ timeout: 5_000 }).catch(() => '');
    }, { timeout: 60_000 })
    .toBe('0');
  await expect(count('Extra')).toHaveText('1');
  await review.getByRole('button', { name: 'Accept' }).click();
  await expect(row).toContainText('Accepted');
  await trainee.page.reload();
  await openSupervision(trainee);
  await expect(mine).toContainText('Accepted');
  await Promise.all([lead, trainee].map((p) => p.context.close()));
});

// Two rounds the trainee takes part in, each revealed; the supervisor's chart and table show both with
// the trainee's agreement with the reference, and flag the second as drift when it falls by more than the
// threshold the supervisor sets. The trainee opens each round text from the Texts list, as anyone would:
// the app takes a participant to the round's own coding view (their round layer), not the read-only one.
test('progress: the chart and the table show each revealed round the trainee took part in, with drift', async ({ browser, baseURL }) => {
  test.setTimeout(600_000); // two rounds, two people coding: slow on a loaded machine
  const traineeAccount = account('trainee');
  const lead = await signIn(browser, account('lead'), baseURL!);
  const trainee = await signIn(browser, traineeAccount, baseURL!);
  await openSupervision(lead);
  await expect(lead.page.getByRole('heading', { name: 'Progress across rounds' })).toBeVisible();

  const studyId = decodeURIComponent(/#\/study\/([^/]+)/.exec(new URL(lead.page.url()).hash)![1]!);
  const members = await api<Array<{ userId: string; name: string; role: string }>>(lead, 'GET', `/api/studies/${studyId}/members`);
  const texts = await api<Array<{ id: string; title: string }>>(lead, 'GET', `/api/studies/${studyId}/texts`);
  const participants = [members.find((m) => m.role === 'trainee')!.userId, members.find((m) => m.name === account('coder', 1).name)!.userId];
  const startRound = (name: string, textId: string) =>
    api<{ id: string }>(lead, 'POST', `/api/studies/${studyId}/rounds`, { name, textIds: [textId], participantIds: participants, unit: 'turn', statistic: 'percent-agreement' });

  /** The trainee opens a round text from the Texts list and codes in their round layer. */
  async function traineeCodes(title: string, phrase: string, code: string): Promise<void> {
    await openText(trainee, title);
    await expect(trainee.page.getByTestId('round-banner')).toContainText('independent coding');
    await expect(trainee.page.getByTestId('read-only-note')).toHaveCount(0);
    await selectWords(trainee.page, phrase);
    await applyCode(trainee.page, code);
    await expect(trainee.page.locator('.coding-side .layers li')).toHaveCount(1); // their round layer, nobody else's
    await expect(trainee.page.locator('.coding-side .layers li')).toContainText('(1 segment');
  }

  // Round 1 on P02: the lead codes the reference outside the round (they are not a participant) and
  // the trainee codes the same words with the same code, so they agree on every turn.
  const ROUND1 = `${ROUND_NAME} 1`;
  const text1 = texts.find((t) => t.title === ROUND_TEXT)!.id;
  const round1 = await startRound(ROUND1, text1);
  const PHRASE = 'I read it on the bus';
  await openText(lead, ROUND_TEXT);
  await selectWords(lead.page, PHRASE);
  await applyCode(lead.page, 'Belonging and friendship');
  await traineeCodes(ROUND_TEXT, PHRASE, 'Belonging and friendship');
  await shot(trainee.page, 'supervision-trainee-round-coding');
  const leadLayer = (await api<{ layers: Array<{ room: string; mine: boolean; round: string | null }> }>(lead, 'GET', `/api/texts/${text1}`)).layers.find((l) => l.mine && !l.round)!.room;
  await api(lead, 'PUT', `/api/texts/${text1}/reference`, { layer: leadLayer });
  await api(lead, 'POST', `/api/rounds/${round1.id}/reveal`);

  // Round 2 on P04, whose reference (demo) is the first coder's layer with the codebook's examples: the
  // trainee codes one phrase only, so they miss most of the reference and agree less.
  const ROUND2 = `${ROUND_NAME} 2`;
  const TEXT2 = 'P04 — chair and treasurer, Ferrowgate Film Club';
  const text2 = texts.find((t) => t.title === TEXT2)!.id;
  const round2 = await startRound(ROUND2, text2);
  await traineeCodes(TEXT2, 'It began in this kitchen, actually.', 'Memory of the place');
  await api(lead, 'POST', `/api/rounds/${round2.id}/reveal`);

  // The supervisor's progress: a row per round with the value (percent agreement, 3 decimals) and the chart.
  await openSupervision(lead);
  const rowOf = (name: string) => lead.page.locator('table.progress-table tbody tr', { hasText: name });
  await expect(rowOf(ROUND1)).toContainText(traineeAccount.name, { timeout: 30_000 });
  await expect(rowOf(ROUND2)).toContainText(traineeAccount.name);
  await expect(rowOf(ROUND1).locator('td').nth(2)).toHaveText('1.000'); // the same words, the same code: full agreement
  await expect(rowOf(ROUND2).locator('td').nth(2)).toHaveText(/^\d\.\d{3}$/);
  const v1 = Number(await rowOf(ROUND1).locator('td').nth(2).textContent());
  const v2 = Number(await rowOf(ROUND2).locator('td').nth(2).textContent());
  expect(v2).toBeLessThan(v1);
  await expect(rowOf(ROUND1).locator('td').nth(3)).toHaveText('1'); // same: the one reference segment
  const chart = lead.page.getByTestId('progress-chart').getByRole('img', { name: 'Agreement with the reference per round' });
  await expect(chart).toBeVisible();
  await expect(chart).toContainText(traineeAccount.name); // the legend
  // One dot per round, in round order, each titled with its value (the drift mark comes later).
  await expect(chart.locator('title')).toHaveText([v1, v2].map((v) => new RegExp(`^${traineeAccount.name}, Round \\d+: ${v.toFixed(3).replace('.', '\\.')}`)));

  // Drift: flagged when the fall is more than the threshold. A threshold just above the fall clears it;
  // one just below raises it (the saved setting recomputes the table).
  const fall = v1 - v2;
  const setThreshold = async (t: number) => {
    await lead.page.locator('#sup-threshold').fill(t.toFixed(2));
    // The save is followed by a fresh progress answer computed with it: wait for that one
    // (Only the save asks for progress again on this screen, and only after the PUT has been answered.)
    const recomputed = lead.page.waitForResponse((r) => r.request().method() === 'GET' && r.url().endsWith('/supervision/progress'));
    await lead.page.getByRole('button', { name: 'Save settings' }).click();
    await recomputed;
  };
  await setThreshold(Math.min(2, Math.ceil(fall * 100) / 100 + 0.01));
  await expect(rowOf(ROUND2)).toHaveAttribute('data-drift', 'no');
  await setThreshold(Math.max(0, Math.floor(fall * 100) / 100 - 0.01));
  await expect(rowOf(ROUND2)).toHaveAttribute('data-drift', 'yes');
  await expect(rowOf(ROUND2)).toContainText('▼ drift');
  await expect(rowOf(ROUND1)).toHaveAttribute('data-drift', 'no'); // a first round has nothing to fall from
  // The chart at the top of the window, the table under it.
  await chart.evaluate((el) => el.scrollIntoView({ block: 'start' }));
  await shot(lead.page, 'supervision-lead-progress');

  // The trainee's Supervision screen: their texts; no one's progress table.
  await openSupervision(trainee);
  await expect(trainee.page.getByRole('heading', { name: 'Progress across rounds' })).toHaveCount(0);
  await shot(trainee.page, 'supervision-trainee-progress');
  await Promise.all([lead, trainee].map((p) => p.context.close()));
});
