// Two coders on one text, each in their own browser context: each codes, and the other's segment
// appears under the turn, named (DESIGN §2: layers travel to others in standard, non-independent mode).
import { test, expect, account, signIn, openText, addCodes, selectWords, applyCode, segmentCount, shot } from './fixtures.js';

test('two coders see each other’s segments appear live', async ({ browser, baseURL }) => {
  const lead = await signIn(browser, account('lead'), baseURL!);
  await addCodes(lead, ['Sociability', 'Sense of duty']);

  const ann = await signIn(browser, account('coder', 1), baseURL!);
  const bo = await signIn(browser, account('coder', 2), baseURL!);
  await openText(ann, 'P01 — projection lead, Beacon Picture Hall');
  await openText(bo, 'P01 — projection lead, Beacon Picture Hall');

  const before = await segmentCount(bo.page);
  await selectWords(ann.page, 'pot of tea');
  const t0 = Date.now();
  await applyCode(ann.page, 'Sociability');
  // the other coder's margin gains the new segment (polled; the time taken is recorded, not asserted)
  await expect.poll(async () => await segmentCount(bo.page), { timeout: 10_000 }).toBe(before + 1);
  const ms = Date.now() - t0;
  test.info().annotations.push({ type: 'propagation-ms', description: String(ms) });
  process.stdout.write(`two-coders: segment seen by the other coder after ${ms} ms (apply, sync, resolve and draw)\n`);

  await selectWords(bo.page, 'Ray texts me if I miss a Friday');
  await applyCode(bo.page, 'Sense of duty');
  await expect.poll(async () => await segmentCount(ann.page), { timeout: 10_000 }).toBe(before + 2);

  // the other coder's segment is named under its turn without hovering: the code and the coder's initials
  const initials = (name: string) => name.split(/\s+/).map((w) => w[0]!.toUpperCase()).join('');
  const found = async (p: typeof bo, phrase: string, code: string, coder: string) => {
    const turn = p.page.locator('.transcript .turn').filter({ has: p.page.locator('.words', { hasText: phrase }) });
    await turn.scrollIntoViewIfNeeded();
    await expect(turn.locator('.turn-codes .code-chip').filter({ hasText: code }).filter({ hasText: initials(coder) })).not.toHaveCount(0);
  };
  await found(bo, 'pot of tea', 'Sociability', ann.name);
  await found(ann, 'Ray texts me if I miss a Friday', 'Sense of duty', bo.name);
  await shot(ann.page, 'coding-two-coders');
  await Promise.all([lead, ann, bo].map((p) => p.context.close()));
});
