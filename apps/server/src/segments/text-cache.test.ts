/**
 * The text cache answers exactly what a fresh computation from the log answers (segmentsWithFlags over
 * newly loaded documents), after every kind of change: a new segment, a text correction, a codebook
 * edit, a fold of the log into a snapshot. Seeded random edits; the memory store stands in for the
 * log here (the route runs on PGlite and PostgreSQL in test/coding/segments.test.ts).
 */
import { mulberry32 } from '@gloss/agreement';
import { addCode, addExclusiveSet, addSegment, correctText, createCodebookDoc, createTextDoc, getText, newLayerDoc, updateCodeField } from '@gloss/model';
import { describe, expect, it } from 'vitest';
import * as Y from 'yjs';
import { loadDoc, withDocs } from '../projection/load-doc.js';
import { createMemoryUpdateStore } from '../store/memory-update-store.js';
import type { UpdateStore } from '../sync/contracts.js';
import { createTextCache } from './text-cache.js';
import { segmentsWithFlags } from './with-flags.js';
import { appendChange } from '../../../../test/support/store-change.js';

const WORDS = ['tide', 'net', 'shed', 'winter', 'we', 'rowed', 'out', 'and', 'back'];

describe('text cache for the segments route', () => {
  it('matches a fresh computation after layer, text and codebook changes, and keeps an unchanged answer', async () => {
    const rand = mulberry32(1107);
    const store = createMemoryUpdateStore();
    const text = createTextDoc({
      turns: Array.from({ length: 6 }, (_, i) => ({ speaker: i % 2 ? 'P03' : 'I', startMs: null, endMs: null, text: Array.from({ length: 60 }, () => WORDS[Math.floor(rand() * WORDS.length)]).join(' ') })),
    });
    const cb = createCodebookDoc();
    const codes = Array.from({ length: 5 }, (_, i) => addCode(cb, { label: `Code ${i}` }, { by: 'lead' }));
    addExclusiveSet(cb, 'stance', codes.slice(0, 2), { by: 'lead' });
    await store.append('text', Y.encodeStateAsUpdate(text), null);
    await store.append('cb', Y.encodeStateAsUpdate(cb), null);
    const layers = ['ana', 'ben', 'cy'].map((coderId) => ({ layerDocId: `layer-${coderId}`, coderId }));
    for (const l of layers) await store.append(l.layerDocId, Y.encodeStateAsUpdate(newLayerDoc()), null);

    const cache = createTextCache({ store });
    const query = { textId: 't', textDocId: 'text', codebookId: 'cb', layers };
    const fresh = () =>
      withDocs(store, ['text', ...layers.map((l) => l.layerDocId), 'cb'], ([t, ...rest]) => {
        const c = rest.pop()!;
        return JSON.stringify(segmentsWithFlags(t!, c, layers.map((l, i) => ({ ...l, doc: rest[i]! }))));
      });

    const first = await cache.segments(query);
    expect(first.source).toBe('loaded');
    expect(first.body).toBe(await fresh());

    for (let step = 0; step < 40; step++) {
      const what = rand();
      if (what < 0.6) {
        const l = layers[Math.floor(rand() * layers.length)]!;
        const t = await loadDoc(store, 'text');
        const len = getText(t).length;
        const start = Math.floor(rand() * (len - 40));
        await appendChange(store, l.layerDocId, (doc) => void addSegment(doc, t, { codeId: codes[Math.floor(rand() * codes.length)]!, start, end: start + 5 + Math.floor(rand() * 30) }));
        t.destroy();
      } else if (what < 0.85) {
        await appendChange(store, 'text', (t) => {
          const at = Math.floor(rand() * (getText(t).length - 10));
          correctText(t, at, 1 + Math.floor(rand() * 6), WORDS[Math.floor(rand() * WORDS.length)]!);
        });
      } else {
        await appendChange(store, 'cb', (c) => updateCodeField(c, codes[Math.floor(rand() * codes.length)]!, 'inclusion', `step ${step}`, { by: 'lead' }));
      }
      const got = await cache.segments(query);
      expect(got.source).toBe('refreshed');
      expect(got.body, `step ${step}`).toBe(await fresh());
    }
    const again = await cache.segments(query);
    expect(again.source).toBe('kept');
    expect(JSON.parse(again.body).length).toBeGreaterThan(0);
    expect(JSON.parse(again.body).some((s: { flags: string[] }) => s.flags.length > 0)).toBe(true);
    cache.clear();
    expect(cache.size).toBe(0);
  });

  it('a folded log (a snapshot newer than what was read) is applied, and the least recently read text goes first', async () => {
    const store = createMemoryUpdateStore();
    const base = createTextDoc({ turns: [{ speaker: 'P01', startMs: null, endMs: null, text: 'The ferry stopped in winter and we walked.' }] });
    const update = Y.encodeStateAsUpdate(base);
    let snapshot: { seq: number; data: Uint8Array } | null = null;
    // A store whose reads behave as after compaction: `since` answers the snapshot (seq entry 0) first.
    const folding: UpdateStore = {
      ...store,
      load: async (id) => (id === 'text' && snapshot ? { updates: [snapshot.data], seq: snapshot.seq } : store.load(id)),
      since: async (id, seq) => (id === 'text' && snapshot && snapshot.seq > seq ? { updates: [snapshot.data], seq: snapshot.seq, seqs: [0] } : store.since(id, seq)),
    };
    for (const t of ['text', 'text2', 'text3']) await store.append(t, update, null);
    const cache = createTextCache({ store: folding, maxTexts: 2 });
    const q = (textDocId: string) => ({ textId: textDocId, textDocId, codebookId: null, layers: [] });
    await cache.segments(q('text'));
    const copy = new Y.Doc({ gc: false });
    Y.applyUpdate(copy, update);
    correctText(copy, 0, 3, 'A');
    snapshot = { seq: 99, data: Y.encodeStateAsUpdate(copy) };
    expect((await cache.segments(q('text'))).source).toBe('refreshed');
    await cache.segments(q('text2'));
    await cache.segments(q('text3'));
    expect(cache.size).toBe(2);
    expect((await cache.segments(q('text'))).source).toBe('loaded'); // it was dropped: least recently read
  });
});
