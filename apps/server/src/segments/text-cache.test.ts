/**
 * The text cache answers exactly what a fresh computation from the log answers (segmentsWithFlags over
 * newly loaded documents), after every kind of change: a new segment, a text correction, a codebook
 * edit, a fold of the log into a snapshot. Seeded random edits; the memory store stands in for the
 * log here (the route runs on PGlite and PostgreSQL in test/coding/segments.test.ts).
 */
import { mulberry32 } from '@gloss/agreement';
import { addCode, addExclusiveSet, addSegment, correctText, createCodebookDoc, createTextDoc, getText, listSegments, mergeCodes, newLayerDoc, recodeSegment, removeSegment, resizeSegment, retireCode, updateCodeField } from '@gloss/model';
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
    expect(first.body.toString('utf8')).toBe(await fresh());

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
      expect(got.body.toString('utf8'), `step ${step}`).toBe(await fresh());
    }
    const again = await cache.segments(query);
    expect(again.source).toBe('kept');
    expect(JSON.parse(again.body.toString('utf8')).length).toBeGreaterThan(0);
    expect(JSON.parse(again.body.toString('utf8')).some((s: { flags: string[] }) => s.flags.length > 0)).toBe(true);
    cache.clear();
    expect(cache.size).toBe(0);
  });

  it('answers byte for byte as a fresh computation for two views after seeded random edits of every kind', async () => {
    // Rows and flags are patched per layer (answer-rows.ts, flag-kinds.ts); a fresh computation from
    // the log is the oracle. Layers outside rounds, a round's layers and a consensus layer, seen by a
    // lead (all of them) and by one coder (their own two), so groups and kept answers are exercised.
    const rand = mulberry32(20261202);
    const store = createMemoryUpdateStore();
    const text = createTextDoc({
      turns: Array.from({ length: 8 }, (_, i) => ({ speaker: i % 2 ? 'P07' : 'I', startMs: null, endMs: null, text: Array.from({ length: 50 }, () => WORDS[Math.floor(rand() * WORDS.length)]).join(' ') + ' café ✓ "quoted" \\ end' })),
    });
    const cb = createCodebookDoc();
    const codes = Array.from({ length: 8 }, (_, i) => addCode(cb, { label: `Code ${i}` }, { by: 'lead' }));
    addExclusiveSet(cb, 'stance', codes.slice(0, 3), { by: 'lead' });
    await store.append('text', Y.encodeStateAsUpdate(text), null);
    await store.append('cb', Y.encodeStateAsUpdate(cb), null);
    const all = [
      { layerDocId: 'l-ana', coderId: 'ana', roundId: null },
      { layerDocId: 'l-ben', coderId: 'ben', roundId: null },
      { layerDocId: 'l-cy', coderId: 'cy', roundId: null },
      { layerDocId: 'r-ana', coderId: 'ana', roundId: 'round1' },
      { layerDocId: 'r-ben', coderId: 'ben', roundId: 'round1' },
      { layerDocId: 'r-cons', coderId: null, roundId: 'round1' },
    ];
    for (const l of all) await store.append(l.layerDocId, Y.encodeStateAsUpdate(newLayerDoc()), null);
    const views = [all, all.filter((l) => l.coderId === 'ana')];
    const cache = createTextCache({ store });
    // the previous way of answering, kept as the bench's reference, answers the same
    const previous = createTextCache({ store, previous: true });
    const fresh = (layers: typeof all) =>
      withDocs(store, ['text', ...layers.map((l) => l.layerDocId), 'cb'], ([t, ...rest]) => {
        const c = rest.pop()!;
        return JSON.stringify(segmentsWithFlags(t!, c, layers.map((l, i) => ({ ...l, doc: rest[i]! }))));
      });
    const pick = <T>(list: readonly T[]): T => list[Math.floor(rand() * list.length)]!;
    const live = () => codes.filter((c) => !retired.has(c));
    const retired = new Set<string>();
    const someSegment = async (layerDocId: string) => {
      const doc = await loadDoc(store, layerDocId);
      const ids = listSegments(doc).map((s) => s.id);
      doc.destroy();
      return ids.length > 0 ? pick(ids) : null;
    };
    const seen = { added: 0, removed: 0, resized: 0, recoded: 0, corrected: 0, codebook: 0 };

    for (let step = 0; step < 120; step++) {
      const what = rand();
      const l = pick(all).layerDocId;
      if (what < 0.4) {
        // new segments, sometimes several at once and often over the same words (overlaps, duplicates)
        const t = await loadDoc(store, 'text');
        const len = getText(t).length;
        const start = Math.floor(rand() * (len - 60));
        const ranges = Array.from({ length: 1 + Math.floor(rand() * 3) }, () => ({ codeId: pick(live()), start: start + Math.floor(rand() * 8), end: start + 10 + Math.floor(rand() * 40) }));
        await appendChange(store, l, (doc) => ranges.forEach((r) => void addSegment(doc, t, r)));
        // the same words in another layer too: equal offsets, ordered by coder then layer
        if (rand() < 0.4) await appendChange(store, pick(all).layerDocId, (doc) => ranges.forEach((r) => void addSegment(doc, t, r)));
        t.destroy();
        seen.added++;
      } else if (what < 0.5) {
        const id = await someSegment(l);
        if (id) await appendChange(store, l, (doc) => removeSegment(doc, id));
        seen.removed += id ? 1 : 0;
      } else if (what < 0.57) {
        const id = await someSegment(l);
        const t = await loadDoc(store, 'text');
        const start = Math.floor(rand() * (getText(t).length - 60));
        if (id) await appendChange(store, l, (doc) => resizeSegment(doc, t, id, start, start + 1 + Math.floor(rand() * 50)));
        t.destroy();
        seen.resized += id ? 1 : 0;
      } else if (what < 0.65) {
        const id = await someSegment(l);
        if (id) await appendChange(store, l, (doc) => recodeSegment(doc, id, pick(live())));
        seen.recoded += id ? 1 : 0;
      } else if (what < 0.88) {
        // corrections, some deleting whole segments' words (orphans)
        await appendChange(store, 'text', (t) => {
          const len = getText(t).length;
          const at = Math.floor(rand() * (len - 80));
          correctText(t, at, rand() < 0.2 ? 40 + Math.floor(rand() * 30) : 1 + Math.floor(rand() * 6), rand() < 0.3 ? '' : pick(WORDS));
        });
        seen.corrected++;
      } else {
        const r = rand();
        const [a, b] = [pick(live()), pick(live())];
        if (r < 0.3 && live().length > 4) {
          await appendChange(store, 'cb', (c) => retireCode(c, a, { by: 'lead' }));
          retired.add(a);
        } else if (r < 0.5 && a !== b && live().length > 4) {
          await appendChange(store, 'cb', (c) => mergeCodes(c, [a], b, { by: 'lead' }));
          retired.add(a);
        } else await appendChange(store, 'cb', (c) => updateCodeField(c, a, 'inclusion', `step ${step}`, { by: 'lead' }));
        seen.codebook++;
      }
      // both views after most steps; one of them only, sometimes (a kept answer of the other goes stale)
      for (const v of rand() < 0.3 ? [pick(views)] : views) {
        const got = await cache.segments({ textId: 't', textDocId: 'text', codebookId: 'cb', layers: v });
        const want = await fresh(v);
        expect(got.body.toString('utf8'), `step ${step}, ${v.length} layers`).toBe(want);
        if (step % 4 === 0) expect((await previous.segments({ textId: 't', textDocId: 'text', codebookId: 'cb', layers: v })).body.toString('utf8')).toBe(want);
      }
    }
    const final = JSON.parse(await fresh(all)) as Array<{ flags: string[]; quote: string }>;
    // the run met what it is meant to: flags of several kinds, orphans, non-ASCII quotes, every edit
    expect(new Set(final.flatMap((s) => s.flags)).size).toBeGreaterThan(2);
    expect(final.some((s) => s.quote === '')).toBe(true);
    expect(Object.values(seen).every((n) => n > 3), JSON.stringify(seen)).toBe(true);
    cache.clear();
    previous.clear();
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
