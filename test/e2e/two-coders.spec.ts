// Two coders on one text, each in their own browser context: each codes, and the other's segment
// appears in their margin (DESIGN §2: layers travel to others in standard, non-independent mode).
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

  // the other coder's segment is drawn in the margin: hovering its bar names the code and the coder
  const found = async (p: typeof bo, code: string, coder: string) => {
    const all = p.page.locator('.transcript .margin .bar');
    for (let i = 0; i < Math.min(80, await all.count()); i++) {
      // (an event, not a pointer move: bars under the sticky status bar cannot be hovered by position)
      await all.nth(i).dispatchEvent('mouseover');
      const tip = (await p.page.getByRole('tooltip').allTextContents()).join(' ');
      if (tip.includes(code) && tip.includes(`Coder: ${coder}`)) return true;
    }
    return false;
  };
  expect(await found(bo, 'Sociability', ann.name)).toBe(true);
  expect(await found(ann, 'Sense of duty', bo.name)).toBe(true);
  await shot(ann.page, 'coding-two-coders');
  await Promise.all([lead, ann, bo].map((p) => p.context.close()));
});
