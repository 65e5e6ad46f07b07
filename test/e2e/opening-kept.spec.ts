// The second open of a text on the same device (issue 11 item 1): every layer is drawn from the states
// this device kept of the first opening (IndexedDB `gloss:opening`, apps/web/src/sync/kept-states.ts)
// while the opening request is still held back by the test, and a room the server no longer gives is
// dropped from the device: one the opening leaves out, and all of a text whose opening is refused
// (the person removed from the study; membership restored at the end, as lost-access.spec does: the demo
// server is shared by every spec of a run). Expected behaviour: the project's own rules (issue 11 item 1,
// DESIGN §8 on what a device keeps).
import type { Page } from '@playwright/test';
import { test, expect, account, signIn, openText } from './fixtures.js';

const TEXT = 'P04 — chair and treasurer, Ferrowgate Film Club';
const NOT_GIVEN = 'room-the-server-no-longer-gives';

const textIdOf = (page: Page) => /\/text\/([^/?#]+)/.exec(page.url())![1]!;

/** What the device keeps for a text: its rooms and the rooms with a state vector ([] when the store does not exist). */
function kept(page: Page, textId: string): Promise<{ rooms: string[]; vectors: string[] }> {
  return page.evaluate(async (id) => {
    // never create the database here (the app creates it with its stores)
    if (!(await indexedDB.databases()).some((d) => d.name === 'gloss:opening')) return { rooms: [], vectors: [] };
    const db = await new Promise<IDBDatabase>((resolve, reject) => {
      const r = indexedDB.open('gloss:opening');
      r.onsuccess = () => resolve(r.result);
      r.onerror = () => reject(r.error);
    });
    const tx = db.transaction(['texts', 'vectors'], 'readonly');
    const get = <T,>(r: IDBRequest<T>) => new Promise<T>((resolve, reject) => ((r.onsuccess = () => resolve(r.result)), (r.onerror = () => reject(r.error))));
    const text = (await get(tx.objectStore('texts').get(id))) as { rooms: string[] } | undefined;
    const vectors = (await get(tx.objectStore('vectors').getAllKeys())) as string[];
    db.close();
    return { rooms: text?.rooms ?? [], vectors };
  }, textId);
}

/** Adds a room to what the device keeps for the text, as if an earlier opening had given it. */
function plant(page: Page, textId: string, room: string): Promise<void> {
  return page.evaluate(
    async ([id, r]) => {
      const db = await new Promise<IDBDatabase>((resolve, reject) => {
        const o = indexedDB.open('gloss:opening');
        o.onsuccess = () => resolve(o.result);
        o.onerror = () => reject(o.error);
      });
      const tx = db.transaction(['texts', 'vectors', 'rooms'], 'readwrite');
      const t = tx.objectStore('texts').get(id!);
      await new Promise((resolve) => (t.onsuccess = resolve));
      const text = t.result as { textId: string; rooms: string[] };
      tx.objectStore('texts').put({ ...text, rooms: [...text.rooms, r] });
      // an empty Yjs document: no structs, no deletions; its state vector names no client
      tx.objectStore('rooms').put({ room: r, updates: [new Uint8Array([0, 0])] });
      tx.objectStore('vectors').put({ room: r, sv: new Uint8Array([0]) });
      await new Promise((resolve) => (tx.oncomplete = resolve));
      db.close();
    },
    [textId, room],
  );
}

const layerRows = (page: Page) => page.locator('.coding-side .layers li').allTextContents();

test('a second open draws every layer from this device before the opening returns, then drops a room no longer given', async ({ browser, baseURL }) => {
  const coder = await signIn(browser, account('coder', 1), baseURL!);
  try {
    await openText(coder, TEXT);
    const textId = textIdOf(coder.page);
    // others' layers with segments: what the device must bring without the request
    const othersCoded = (rows: string[]) => rows.filter((r) => !/\(you\)/.test(r) && /\([1-9]\d* segments?\)/.test(r)).length;
    await expect.poll(async () => othersCoded(await layerRows(coder.page))).toBeGreaterThan(0);
    const rows = await layerRows(coder.page);
    await expect.poll(async () => (await kept(coder.page, textId)).rooms.length).toBeGreaterThan(1);
    await plant(coder.page, textId, NOT_GIVEN);

    // the opening request waits until the test lets it go
    let release!: () => void;
    const gate = new Promise<void>((resolve) => (release = resolve));
    let asked = 0;
    let answered = false;
    await coder.page.route('**/api/texts/*/opening?*', async (route) => {
      asked++;
      await gate;
      await route.continue();
      answered = true;
    });
    await coder.page.reload();
    await expect(coder.page.getByTestId('coding-view')).toHaveAttribute('data-ready', 'yes');
    await expect.poll(() => layerRows(coder.page)).toEqual(rows);
    expect(asked).toBe(1);
    expect(answered).toBe(false);

    release();
    await expect(coder.page.getByTestId('connection-status')).toHaveAttribute('data-state', 'online');
    // the opening did not give the planted room: it is gone from the device; the rooms given stay
    await expect.poll(async () => (await kept(coder.page, textId)).vectors).not.toContain(NOT_GIVEN);
    const after = await kept(coder.page, textId);
    expect(after.rooms).not.toContain(NOT_GIVEN);
    expect(after.rooms.length).toBeGreaterThan(1);
    expect(await layerRows(coder.page)).toEqual(rows);

    // signing out forgets what the device kept, with the other copies (sync/forget.ts)
    await coder.page.getByRole('button', { name: 'Sign out' }).click();
    await expect(coder.page.getByRole('button', { name: 'Sign in' })).toBeVisible();
    await expect.poll(() => coder.page.evaluate(async () => (await indexedDB.databases()).map((d) => d.name))).not.toContain('gloss:opening');
  } finally {
    await coder.context.close();
  }
});

test('a text whose opening is refused (removed from the study) keeps nothing on the device', async ({ browser, baseURL }) => {
  const lead = await signIn(browser, account('lead'), baseURL!);
  const who = account('coder', 2);
  const coder = await signIn(browser, who, baseURL!);
  const api = lead.context.request;
  const headers = { origin: baseURL! };
  const studies = (await (await api.get('/api/studies')).json()) as Array<{ id: string }>;
  const studyId = studies[0]!.id;
  const members = (await (await api.get(`/api/studies/${studyId}/members`)).json()) as Array<{ userId: string; email: string }>;
  const member = members.find((m) => m.email === who.email)!;
  try {
    await openText(coder, TEXT);
    const textId = textIdOf(coder.page);
    await expect.poll(async () => (await kept(coder.page, textId)).rooms.length).toBeGreaterThan(1);
    const rooms = (await kept(coder.page, textId)).rooms;

    expect((await api.delete(`/api/studies/${studyId}/members/${member.userId}`, { headers })).status()).toBe(204);
    await coder.page.reload();
    await expect.poll(async () => (await kept(coder.page, textId)).rooms).toEqual([]);
    const vectors = (await kept(coder.page, textId)).vectors;
    expect(vectors.filter((v) => rooms.includes(v))).toEqual([]);
    await expect(coder.page.getByTestId('coding-view')).toHaveCount(0);
  } finally {
    const link = (await (await api.post(`/api/studies/${studyId}/members`, { headers, data: { email: who.email, role: 'coder' } })).json()) as { token: string };
    await coder.context.request.post(`/api/invitations/${link.token}/accept`, { headers, data: { password: who.password } });
    await Promise.all([lead, coder].map((p) => p.context.close()));
  }
});
