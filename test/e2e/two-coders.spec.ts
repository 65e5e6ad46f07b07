// Two coders on one text, each in their own browser context: each codes, and the other's segment
// appears in their margin (DESIGN §2: layers travel to others in standard, non-independent mode).
import { test, expect, account, signIn, openText, addCodes, selectWords, applyCode, segmentIds, shot } from './fixtures.js';

test('two coders see each other’s segments appear live', async ({ browser, baseURL }) => {
  const lead = await signIn(browser, account('lead'), baseURL!);
  await addCodes(lead, ['Sociability', 'Sense of duty']);

  const ann = await signIn(browser, account('coder', 1), baseURL!);
  const bo = await signIn(browser, account('coder', 2), baseURL!);
  await openText(ann, 'P01 — projection lead, Beacon Picture Hall');
  await openText(bo, 'P01 — projection lead, Beacon Picture Hall');

  const before = (await segmentIds(bo.page)).length;
  await selectWords(ann.page, 'pot of tea');
  const t0 = Date.now();
  await applyCode(ann.page, 'Sociability');
  // the other coder's margin gains the new segment (polled; the time taken is recorded, not asserted)
  await expect.poll(async () => (await segmentIds(bo.page)).length, { timeout: 10_000 }).toBe(before + 1);
  test.info().annotations.push({ type: 'propagation-ms', description: String(Date.now() - t0) });

  await selectWords(bo.page, 'Ray texts me if I miss a Friday');
  await applyCode(bo.page, 'Sense of duty');
  await expect.poll(async () => (await segmentIds(ann.page)).length, { timeout: 10_000 }).toBe(before + 2);

  // hovering a bar shows the code, the coder and the brief definition
  const annIds = await segmentIds(ann.page);
  await ann.page.locator('.bar').last().hover();
  await expect(ann.page.getByRole('tooltip')).toContainText('Coder:');
  expect(annIds.length).toBe(before + 2);
  await shot(ann.page, 'coding-two-coders');
  await Promise.all([lead, ann, bo].map((p) => p.context.close()));
});
