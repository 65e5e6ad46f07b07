/**
 * Issue 8 item 7 with stock y-websocket clients against a real server: a coder's in vivo code travels
 * to the server as a proposal in the codebook (the one thing a coder may write there), reaches the lead
 * and every other member, the lead accepts it under a new name, the coder sees that, and nothing is lost
 * across a reload. Memo ownership is the server's: a coder's edit, deletion or forgery of someone else's
 * memo is refused (a permission-denied message in words) and never stored (read back from the database).
 */
import { type Db, asc, eq, snapshots, updates } from '@gloss/db';
import { acceptProposal, addMemo, addReply, addSegment, getCodes, getMemoBody, listMemos, listProposals, listReplies, proposeCode, removeMemo } from '@gloss/model';
import * as decoding from 'lib0/decoding';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as Y from 'yjs';
import type { SegmentOut } from '../../apps/server/src/http/segments.js';
import { dbKinds, spawnServer, type SpawnedServer } from '../support/server.js';
import { clientFor, gcOffClient, seedCoding, until, type CodingSeed } from './support.js';

type Client = ReturnType<typeof gcOffClient>;

/** Collects the reasons of permission-denied messages the server sends this client (y-websocket message type 2). */
function refusals(c: Client): string[] {
  const seen: string[] = [];
  const handlers = (c.provider as unknown as { messageHandlers: Array<(...a: unknown[]) => void> }).messageHandlers;
  handlers[2] = (_encoder, decoder) => {
    const d = decoder as decoding.Decoder;
    if (decoding.readVarUint(d) === 0) seen.push(decoding.readVarString(d));
  };
  return seen;
}

async function storedDoc(db: Db, docId: string): Promise<Y.Doc> {
  const doc = new Y.Doc({ gc: false });
  const [snap] = await db.select().from(snapshots).where(eq(snapshots.docId, docId));
  if (snap) Y.applyUpdate(doc, snap.data);
  for (const r of await db.select().from(updates).where(eq(updates.docId, docId)).orderBy(asc(updates.seq))) if (!snap || r.seq > snap.seq) Y.applyUpdate(doc, r.data);
  return doc;
}

describe.each(dbKinds())('code proposals and memo ownership on %s', (db) => {
  let server: SpawnedServer<CodingSeed>;
  const open: Client[] = [];
  const client = (cookie: string, room: string) => {
    const c = gcOffClient(server.url, cookie, room);
    open.push(c);
    return c;
  };
  beforeAll(async () => {
    server = await spawnServer({ db, seed: seedCoding });
  }, 120_000);
  afterAll(async () => {
    for (const c of open) c.destroy();
    await server?.stop();
  });

  it("a coder's in vivo code reaches the lead and every member, the lead's rename reaches the coder, and a reload keeps it all", async () => {
    const s = server.seeded;
    const coder = await clientFor(server.url, 'coder');
    const lead = await clientFor(server.url, 'lead');
    const coder2 = await clientFor(server.url, 'coder2');
    const observer = await clientFor(server.url, 'observer');
    const text = await coder.call<{ layers: Array<{ room: string; mine: boolean }> }>('GET', `/api/texts/${s.codingTextId}`);
    const layerRoom = text.body.layers.find((l) => l.mine)!.room;

    const coderText = client(coder.cookie, s.codingTextRoom);
    const coderLayer = client(coder.cookie, layerRoom);
    const coderCb = client(coder.cookie, s.codebookRoom);
    const denied = refusals(coderCb);
    const others = [client(lead.cookie, s.codebookRoom), client(coder2.cookie, s.codebookRoom), client(observer.cookie, s.codebookRoom)];
    const [leadCb] = others;
    await until(() => [coderText, coderLayer, coderCb, ...others].every((c) => c.provider.synced), 'all clients synced');

    const words = 'lent me a spade';
    const start = coderText.doc.getText('text').toString().indexOf(words);
    const proposalId = proposeCode(coderCb.doc, { label: words, inVivo: true, author: s.users.coder.id, textId: s.codingTextId, quote: words });
    const segmentId = addSegment(coderLayer.doc, coderText.doc, { codeId: proposalId, start, end: start + words.length });

    for (const c of others) await until(() => listProposals(c.doc).some((p) => p.id === proposalId && p.status === 'pending'), 'the proposal reaches every member');
    expect(listProposals(leadCb!.doc)[0]).toMatchObject({ label: '“lent me a spade”', author: s.users.coder.id, inVivo: true });
    // The segment keeps the proposal until it is decided: its code id is the proposal's.
    const served = async () => (await lead.call<SegmentOut[]>('GET', `/api/texts/${s.codingTextId}/segments`)).body;
    await until(async () => (await served()).some((x) => x.id === segmentId && x.codeId === proposalId), 'the segment, coded with the proposal, is on the server');

    acceptProposal(leadCb!.doc, proposalId, { by: s.users.lead.id }, 'Borrowed tools (in their words)');
    await until(() => getCodes(coderCb.doc).some((k) => k.id === proposalId && k.label === 'Borrowed tools (in their words)'), 'the coder sees the renamed code');
    expect(listProposals(coderCb.doc)[0]).toMatchObject({ status: 'accepted', decidedBy: s.users.lead.id });
    expect(denied).toEqual([]); // nothing the coder wrote was refused

    // A reload: fresh documents from the server only.
    for (const c of [coderText, coderLayer, coderCb]) c.destroy();
    const again = client(coder.cookie, s.codebookRoom);
    const againLayer = client(coder.cookie, layerRoom);
    await until(() => again.provider.synced && againLayer.provider.synced, 'reloaded');
    expect(listProposals(again.doc)).toMatchObject([{ id: proposalId, status: 'accepted' }]);
    expect(getCodes(again.doc).find((k) => k.id === proposalId)?.label).toBe('Borrowed tools (in their words)');
    expect((againLayer.doc.getMap('segments').get(segmentId) as Y.Map<unknown>).get('codeId')).toBe(proposalId);
  }, 120_000);

  it("a coder cannot write codes, nor edit, delete or forge someone else's memo: refused in words, nothing stored", async () => {
    const s = server.seeded;
    const coder = await clientFor(server.url, 'coder');
    const lead = await clientFor(server.url, 'lead');
    const leadMemos = client(lead.cookie, s.memosRoom);
    await until(() => leadMemos.provider.synced, 'lead memos synced');
    const leadMemo = addMemo(leadMemos.doc, { author: s.users.lead.id, title: 'Plot rules', body: 'The committee decides.', attachedTo: { kind: 'study' } });
    const leadReply = addReply(leadMemos.doc, leadMemo, { author: s.users.lead.id, body: 'It meets on Tuesdays.' });

    const attempts: Array<[string, (d: Y.Doc) => void]> = [
      ['edit', (d) => getMemoBody(d, leadMemo).insert(0, 'Nobody knows. ')],
      ['delete', (d) => removeMemo(d, leadMemo)],
      ['forge', (d) => addMemo(d, { author: s.users.lead.id, title: 'Signed by the lead', body: 'forged', attachedTo: { kind: 'study' } })],
      // replies (issue 15 item 4) are entries of their writer's own: the same rule covers them
      ['edit a reply', (d) => getMemoBody(d, leadReply).insert(0, 'Never. ')],
      ['delete a reply', (d) => removeMemo(d, leadReply)],
      ['forge a reply', (d) => addReply(d, leadMemo, { author: s.users.lead.id, body: 'forged reply' })],
    ];
    for (const [what, attempt] of attempts) {
      // A fresh client each time: a refused change stays in the sender's copy, and later changes build on it.
      const c = client(coder.cookie, s.memosRoom);
      const denied = refusals(c);
      await until(() => c.provider.synced && listReplies(c.doc, leadMemo).some((m) => m.id === leadReply), `coder memos synced (${what})`);
      attempt(c.doc);
      await until(() => denied.length > 0, `the ${what} is refused`);
      expect(denied[0], what).toMatch(/your own memos|your own name/);
      c.destroy();
    }
    // Codes are the lead's: a coder's direct code is refused too.
    const cb = client(coder.cookie, s.codebookRoom);
    const cbDenied = refusals(cb);
    await until(() => cb.provider.synced, 'coder codebook synced');
    cb.doc.getMap('codes').set('k-sneaked', new Y.Map());
    await until(() => cbDenied.length > 0, 'the code is refused');
    expect(cbDenied[0]).toMatch(/only propose codes/);

    // The coder's own memo still goes through, after the refusals.
    const own = client(coder.cookie, s.memosRoom);
    await until(() => own.provider.synced, 'own memos synced');
    const ownMemo = addMemo(own.doc, { author: s.users.coder.id, title: 'Mine', body: 'Spades travel.', attachedTo: { kind: 'study' } });
    const ownReply = addReply(own.doc, leadMemo, { author: s.users.coder.id, body: 'Spades on Tuesdays, then.' });
    await until(() => listMemos(leadMemos.doc).some((m) => m.id === ownMemo), "the lead sees the coder's own memo");
    await until(() => listReplies(leadMemos.doc, leadMemo).some((m) => m.id === ownReply), "the lead sees the coder's own reply under the memo");
    expect(listReplies(leadMemos.doc, leadMemo).map((r) => r.body)).toEqual(['It meets on Tuesdays.', 'Spades on Tuesdays, then.']);
    expect(listMemos(leadMemos.doc).find((m) => m.id === leadMemo)?.body).toBe('The committee decides.');
    expect(listMemos(leadMemos.doc).some((m) => m.title === 'Signed by the lead')).toBe(false);

    // And in the database: the lead's memo as written, no forgery, no sneaked code.
    for (const c of open) c.destroy();
    await server.kill('SIGTERM');
    const memos = await server.withDb((d) => storedDoc(d, s.memosRoom));
    const stored = listMemos(memos);
    expect(stored.find((m) => m.id === leadMemo)?.body).toBe('The committee decides.');
    expect(stored.some((m) => m.title === 'Signed by the lead')).toBe(false);
    expect(stored.some((m) => m.id === ownMemo)).toBe(true);
    expect(listReplies(memos, leadMemo).map((r) => [r.author, r.body])).toEqual([[s.users.lead.id, 'It meets on Tuesdays.'], [s.users.coder.id, 'Spades on Tuesdays, then.']]);
    const codebook = await server.withDb((d) => storedDoc(d, s.codebookRoom));
    expect(codebook.getMap('codes').has('k-sneaked')).toBe(false);
  }, 120_000);
});
